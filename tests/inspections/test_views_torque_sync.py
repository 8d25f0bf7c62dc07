"""The offline queue's endpoint (torque_sync): each reading stored once however often it
is sent, answered stored or refused with its message; malformed requests answered 400;
role, assignment and the lock checked; each unit converted with its NIST factor."""

from __future__ import annotations

import json
import math
from decimal import Decimal

import pytest
from django.urls import reverse

from inspections.models import TorqueRecord
from inspections.units import to_nm
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    approved,
    make_spec_circuit,
)
from tests.inspections.torque_pages import (
    KGF_CM_NM,
    LBF_FT_NM,
    LBF_IN_NM,
    payload,
    signed_in,
    sync,
)


@pytest.fixture
def job(job, technician):
    """The conftest's job, with the technician assigned to it."""
    job.technicians.add(technician)
    return job


# ---- the offline queue's endpoint ----


def test_sync_stores_a_reading_once_however_often_it_is_sent(
    client, job, install, technician, wrench
):
    termination = make_spec_circuit(job).terminations.first()
    client = signed_in(client, technician)
    reading = payload(termination, wrench, key="tablet-1:reading-1")
    first = sync(client, job, [reading]).json()["results"][0]
    again = sync(client, job, [reading, reading]).json()["results"]
    assert first["status"] == "stored" and first["result"] == "ok"
    assert [r["status"] for r in again] == ["stored", "stored"]
    assert {r["record"] for r in again} == {first["record"]}
    assert TorqueRecord.objects.count() == 1


def test_sync_answers_each_reading_stored_or_refused_with_its_message(
    client, job, install, technician, wrench
):
    terminations = list(make_spec_circuit(job).terminations.all())
    foreign = make_spec_circuit(make_job()).terminations.first()
    readings = [
        payload(terminations[0], wrench, value="7"),
        payload(terminations[1], wrench, value="abc"),
        payload(terminations[2], wrench, unit="furlong"),
        payload(foreign, wrench),
        payload(terminations[3], None),
    ]
    results = sync(signed_in(client, technician), job, readings).json()["results"]
    assert [r["status"] for r in results] == ["stored", "refused", "refused", "refused", "refused"]
    assert results[0]["result"] == "low" and "Low by 3 N·m" in results[0]["message"]
    assert "value" in results[1]["errors"] and results[1]["record"] is None
    assert "unit" in results[2]["errors"]
    assert "termination" in results[3]["errors"]
    assert "wrench" in results[4]["errors"]
    assert TorqueRecord.objects.count() == 1


@pytest.mark.parametrize(
    "body",
    [
        "not json",
        json.dumps([]),
        json.dumps({"readings": "x"}),
        json.dumps({"readings": [1]}),
        json.dumps({"readings": [{"key": "k", "termination": "1"}]}),
        json.dumps({"readings": [{"key": "k", "termination": True, "stage": 1}]}),
        json.dumps({"readings": [{"key": "k", "termination": 2**70, "stage": 1, "value": "1"}]}),
    ],
)
def test_sync_answers_a_malformed_request_400_and_stores_nothing(
    client, job, install, technician, body
):
    response = signed_in(client, technician).post(
        reverse("torque_sync", args=[job.number]), data=body, content_type="application/json"
    )
    assert response.status_code == 400
    assert "error" in response.json()
    assert not TorqueRecord.objects.exists()


def test_sync_takes_at_most_fifty_readings(client, job, install, technician, wrench):
    termination = make_spec_circuit(job).terminations.first()
    readings = [payload(termination, wrench) for _ in range(51)]
    response = sync(signed_in(client, technician), job, readings)
    assert response.status_code == 400
    assert not TorqueRecord.objects.exists()


def test_sync_is_post_only_and_checks_role_and_assignment(client, job, install, wrench):
    termination = make_spec_circuit(job).terminations.first()
    url = reverse("torque_sync", args=[job.number])
    assert "/login/" in sync(client, job, [payload(termination, wrench)])["Location"]
    client.force_login(make_user(roles.OFFICE))
    assert sync(client, job, [payload(termination, wrench)]).status_code == 403
    client.force_login(make_user(roles.TECHNICIAN))
    response = sync(client, job, [payload(termination, wrench)])
    assert response.status_code == 403 and "not assigned" in response.json()["error"]
    assert client.get(url).status_code == 405
    assert not TorqueRecord.objects.exists()


def test_sync_refuses_readings_on_a_locked_job(client, job, technician, lead, wrench):
    approved(job, technician=technician, lead=lead, wrench=wrench)
    termination = job.circuits.first().terminations.first()
    before = TorqueRecord.objects.count()
    result = sync(signed_in(client, technician), job, [payload(termination, wrench)]).json()
    assert result["results"][0]["status"] == "refused"
    assert TorqueRecord.objects.count() == before


@pytest.mark.parametrize(
    ("unit", "value", "nm_per_unit"),
    [
        ("lbf*in", "88.5", LBF_IN_NM),  # NIST SP 811, B.9
        ("lbf*ft", "7.4", LBF_FT_NM),  # NIST SP 811, B.9
        ("kgf*cm", "102", KGF_CM_NM),  # NIST SP 811, B.9
    ],
)
def test_sync_converts_each_unit_with_the_nist_factor(
    client, job, install, technician, wrench, unit, value, nm_per_unit
):
    termination = make_spec_circuit(job).terminations.first()
    result = sync(
        signed_in(client, technician), job, [payload(termination, wrench, value=value, unit=unit)]
    ).json()["results"][0]
    record = TorqueRecord.objects.get(pk=result["record"])
    assert record.unit == unit and record.value == Decimal(value)
    assert math.isclose(record.value_nm, float(value) * nm_per_unit, rel_tol=1e-6)
    assert math.isclose(to_nm(1, unit), nm_per_unit, rel_tol=1e-6)
    assert result["result"] == "ok"  # all three are within 10 N·m ±10 %
