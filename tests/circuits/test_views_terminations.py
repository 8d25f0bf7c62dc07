"""Editing one termination's kind, stud size and torque spec."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import Termination, TorqueDefault
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


@pytest.fixture
def termination(technician):
    job = make_job(technicians=[technician])
    battery = make_device(job, name="House battery", kind="battery")
    make_terminal(battery, name="B+", polarity="pos", stud_size="M8")
    circuit = make_circuit(job, battery, make_device(job, name="Busbar", kind="busbar"))
    return circuit.terminations.get(end="from", polarity="pos")


def _url(termination: Termination) -> str:
    return reverse("termination_edit", args=[termination.circuit.job.number, termination.pk])


def _post(**fields) -> dict:
    data = {
        "kind": "lug",
        "stud_size": "M8",
        "torque_value": "",
        "torque_unit": "N*m",
        "torque_tolerance_pct": "10",
        "torque_source": "none",
        "torque_source_note": "",
    }
    data.update(fields)
    return data


def test_anonymous_and_roleless_staff_are_kept_out(anon_client, termination):
    assert anon_client.get(_url(termination)).status_code == 302
    client = Client()
    client.force_login(make_user())
    assert client.get(_url(termination)).status_code == 403
    assert client.post(_url(termination), _post(torque_value="5")).status_code == 403


def test_technician_records_a_torque_spec_with_its_source(technician_client, termination):
    page = technician_client.get(_url(termination))
    assert page.status_code == 200
    assert "House battery" in page.content.decode()
    data = _post(torque_value="12.5", torque_source="standard", torque_source_note="Lug table")
    response = technician_client.post(_url(termination), data)
    assert response.status_code == 302
    assert response["Location"] == termination.circuit.get_absolute_url()
    termination.refresh_from_db()
    assert termination.torque_value == Decimal("12.5")
    assert termination.torque_source == "standard"


def test_a_value_without_a_source_is_refused_beside_the_source(technician_client, termination):
    response = technician_client.post(_url(termination), _post(torque_value="12"))
    body = response.content.decode()
    assert response.status_code == 200
    assert 'id="id_torque_source_error"' in body
    termination.refresh_from_db()
    assert termination.torque_value is None


def test_a_blank_torque_takes_the_shop_default_for_the_stud_and_kind(
    technician_client, termination
):
    TorqueDefault.objects.create(
        stud_size="M10", kind="lug", value=Decimal("18"), unit="N*m", tolerance_pct=5,
        source="Shop table for M10 lugs",
    )  # fmt: skip
    response = technician_client.post(_url(termination), _post(stud_size="M10"))
    assert response.status_code == 302
    termination.refresh_from_db()
    assert termination.stud_size == "M10"
    assert termination.torque_value == Decimal("18")
    assert termination.torque_source == Termination.SpecSource.SHOP_DEFAULT


def test_the_circuit_page_lists_the_spec_and_its_source(technician_client, termination):
    termination.torque_value = Decimal("150")
    termination.torque_unit = "lbf*in"
    termination.torque_tolerance_pct = Decimal("10")
    termination.torque_source = "standard"
    termination.save()
    body = technician_client.get(termination.circuit.get_absolute_url()).content.decode()
    assert "150 lbf·in ± 10 %" in body
    assert "Standard" in body
    assert _url(termination) in body


def test_a_termination_of_another_job_is_not_found(technician_client, technician, termination):
    other = make_job(technicians=[technician])
    url = reverse("termination_edit", args=[other.number, termination.pk])
    assert technician_client.get(url).status_code == 404


def test_unassigned_technician_cannot_edit_a_termination(termination):
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    response = client.post(_url(termination), _post(torque_value="5", torque_source="manual"))
    assert response.status_code == 403
    assert "ask a lead to add you" in response.content.decode()
    termination.refresh_from_db()
    assert termination.torque_value is None


@pytest.mark.parametrize("wanted", ["NaN", "job_list", "https://elsewhere.example/", "//x.example"])
def test_a_next_that_is_not_a_same_site_path_returns_to_the_circuit(
    technician_client, termination, wanted
):
    data = _post(stud_size="M8")
    response = technician_client.post(_url(termination) + f"?next={wanted}", data)
    assert response.status_code == 302
    assert response["Location"] == termination.circuit.get_absolute_url()
