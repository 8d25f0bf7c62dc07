"""The circuit schedule: its own page and the job page region, sortable by column with
htmx swapping only the table, and the system's findings above it."""

from __future__ import annotations

import re

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import Device
from circuits.sizing import CAUTION
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


@pytest.fixture
def job():
    """Three branch circuits with different current, length and size, one of them solid
    (a blocking construction finding)."""
    job = make_job()
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    pump = make_device(job, name="Pump")
    fan = make_device(job, name="Fan")
    heater = make_device(job, name="Heater")
    make_circuit(job, bus, pump, tag="D-10", name="Pump", design_current_a=4, length_m=6.0)
    make_circuit(
        job, bus, fan, tag="D-02", name="Fan", design_current_a=2, length_m=10 * FOOT_M,
        length_unit="ft", construction="solid",
    )  # fmt: skip
    make_circuit(
        job, bus, heater, tag="D-07", name="Heater", design_current_a=12, length_m=1.5,
        conductor_size="10 AWG", protection_a=20,
    )  # fmt: skip
    return job


def _url(job, **query) -> str:
    url = reverse("circuit_schedule", args=[job.number])
    return url + ("?" + "&".join(f"{k}={v}" for k, v in query.items()) if query else "")


def _tags(html: str) -> list[str]:
    return re.findall(r'class="rowlink" href="[^"]+">([^<]+)</a>', html)


def test_anonymous_is_sent_to_sign_in(anon_client, job):
    response = anon_client.get(_url(job))
    assert response.status_code == 302
    assert "/login/" in response["Location"]


def test_staff_without_a_role_is_refused(job):
    client = Client()
    client.force_login(make_user())
    assert client.get(_url(job)).status_code == 403


def test_technician_sees_every_circuit_in_tag_order(technician_client, job):
    response = technician_client.get(_url(job))
    assert response.status_code == 200
    body = response.content.decode()
    assert _tags(body) == ["D-02", "D-07", "D-10"]
    assert "Busbar → Fan" in body
    assert "10 AWG" in body
    assert CAUTION in body


@pytest.mark.parametrize(
    ("sort", "expected"),
    [
        ("tag", ["D-02", "D-07", "D-10"]),
        ("name", ["D-02", "D-07", "D-10"]),  # Fan, Heater, Pump
        ("current", ["D-07", "D-10", "D-02"]),  # largest first: 12, 4, 2 A
        ("length", ["D-10", "D-02", "D-07"]),  # 6 m, 3.05 m, 1.5 m
        ("ampacity", ["D-07", "D-02", "D-10"]),  # 10 AWG first; equal 12 AWG by tag
        ("worst", ["D-02", "D-07", "D-10"]),  # the solid conductor is blocking
        ("nonsense", ["D-02", "D-07", "D-10"]),  # unknown column: tag order
    ],
)
def test_each_column_sorts(technician_client, job, sort, expected):
    body = technician_client.get(_url(job, sort=sort)).content.decode()
    assert _tags(body) == expected


def test_drop_sorts_the_largest_drop_first(technician_client, job):
    body = technician_client.get(_url(job, sort="drop")).content.decode()
    drops = [float(d) for d in re.findall(r'col-drop num" data-label="Drop">([\d.]+) %', body)]
    assert drops == sorted(drops, reverse=True)
    assert len(drops) == 3


def test_htmx_gets_only_the_table(technician_client, job):
    response = technician_client.get(_url(job, sort="current"), headers={"HX-Request": "true"})
    body = response.content.decode()
    assert response.status_code == 200
    assert body.lstrip().startswith('<div id="schedule-table"')
    assert "<html" not in body
    assert _tags(body) == ["D-07", "D-10", "D-02"]


def test_headers_are_links_with_htmx_beside_them(technician_client, job):
    body = technician_client.get(_url(job)).content.decode()
    link = _url(job, sort="drop")
    assert f'href="{link}"' in body
    assert f'hx-get="{link}"' in body
    assert 'aria-sort="ascending"' in body  # the tag column, sorted by default


def test_the_schedule_page_lists_the_circuits_and_their_findings(technician_client, job):
    body = technician_client.get(_url(job)).content.decode()
    assert body.index('id="schedule-table"') < body.index('id="findings"')
    assert "CONSTRUCTION_SOLID" in body
    assert "Blocking" in body
    assert _tags(body) == ["D-02", "D-07", "D-10"]
    assert CAUTION in body
    # Technicians cannot waive, so no waiver form is offered.
    assert "Waive this finding" not in body


def test_the_job_page_counts_the_findings_and_links_to_the_schedule(technician_client, job):
    body = technician_client.get(job.get_absolute_url()).content.decode()
    assert 'id="findings"' in body and _url(job) in body
    assert 'id="schedule-table"' not in body and "CONSTRUCTION_SOLID" not in body
    assert CAUTION in body


def test_lengths_show_in_the_unit_they_were_entered_in(technician_client, job):
    body = technician_client.get(_url(job)).content.decode()
    assert "10 ft" in body
    assert "6 m" in body


def test_a_job_without_circuits_says_so(technician_client):
    body = technician_client.get(_url(make_job())).content.decode()
    assert "No circuits recorded for this job yet." in body
