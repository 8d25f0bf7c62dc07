"""The CSV import page and the role table: technicians import new circuits into the jobs
they are assigned to; updating existing circuits by import is the lead's. Every import is
written to the security log."""

from __future__ import annotations

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.test import Client
from django.urls import reverse

from circuits.csv_io import circuits_to_csv
from circuits.models import Circuit
from shop import roles
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


@pytest.fixture
def job(technician):
    job = make_job(technicians=[technician])
    panel = make_device(job, name="DC panel", kind="dc_panel")
    lamp = make_device(job, name="Lamp", kind="load")
    make_circuit(job, panel, lamp, tag="D-01", name="Lamp feed")
    return job


def _upload(text: str) -> dict:
    return {"file": SimpleUploadedFile("c.csv", text.encode(), "text/csv")}


def _url(job) -> str:
    return reverse("circuit_csv_import", args=[job.number])


def _renamed(job) -> str:
    return circuits_to_csv(job).replace("Lamp feed", "Reading lamp")


def _with_new_circuit(job) -> str:
    """The export with D-01 taken out and a new D-02 in its place."""
    header, row = circuits_to_csv(job).splitlines()[:2]
    return f"{header}\r\n{row.replace('D-01', 'D-02', 1)}\r\n"


def test_technician_cannot_update_circuits_by_import(technician_client, job):
    response = technician_client.post(_url(job), _upload(_renamed(job)))
    page = response.content.decode()
    assert response.status_code == 200
    assert "Nothing was imported" in page
    assert "D-01 exists" in page
    assert job.circuits.get(tag="D-01").name == "Lamp feed"


def test_technician_imports_new_circuits_into_an_assigned_job(technician_client, job):
    response = technician_client.post(_url(job), _upload(_with_new_circuit(job)))
    assert "Imported 1 circuit" in response.content.decode()
    assert sorted(job.circuits.values_list("tag", flat=True)) == ["D-01", "D-02"]


def test_lead_updates_circuits_by_import(lead_client, job):
    response = lead_client.post(_url(job), _upload(_renamed(job)))
    assert "1 updated: D-01" in response.content.decode()
    assert job.circuits.get(tag="D-01").name == "Reading lamp"


def test_office_imports_new_circuits_but_does_not_update(office_client, job):
    assert "D-01 exists" in office_client.post(_url(job), _upload(_renamed(job))).content.decode()
    assert job.circuits.get(tag="D-01").name == "Lamp feed"
    office_client.post(_url(job), _upload(_with_new_circuit(job)))
    assert job.circuits.filter(tag="D-02").exists()


def test_the_page_says_who_may_update(technician_client, lead_client, job):
    assert "updating existing circuits by import is a lead" in (
        technician_client.get(_url(job)).content.decode()
    )
    assert "whose tag already exists on the job are updated" in (
        lead_client.get(_url(job)).content.decode()
    )


def test_unassigned_technician_cannot_import(job):
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    assert "ask a lead to add you" in client.get(_url(job)).content.decode()
    response = client.post(_url(job), _upload(_with_new_circuit(job)))
    assert response.status_code == 403
    assert not Circuit.objects.filter(tag="D-02").exists()


def test_an_import_is_logged(lead_client, job, caplog):
    with caplog.at_level("WARNING", logger="security"):
        lead_client.post(_url(job), _upload(_renamed(job)))
    logged = [r.getMessage() for r in caplog.records if r.name == "security"]
    assert any(
        "event=import" in m and f"job='{job.number}'" in m and "updated=1" in m and "who=lead" in m
        for m in logged
    ), logged
