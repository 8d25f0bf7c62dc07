"""Once a lead approves a job (its handover stage signed) every write to the job's
electrical system is refused with the lock's message and saves nothing, through the
services and through the pages; after a reopen the same writes go through again.
(The issue's "Gates": approval "locks the job: every write to the job's system ... is
refused while locked".)"""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError
from django.core.files.uploadedfile import SimpleUploadedFile
from django.test import Client
from django.urls import reverse

from circuits.csv_io import circuits_from_csv, circuits_to_csv
from circuits.forms import DeviceForm, TerminalFormSet, device_save_values
from circuits.models import Circuit, Device, Termination, Waiver
from circuits.services import (
    circuit_create,
    circuit_delete,
    circuit_update,
    device_delete,
    device_save,
    termination_update,
    terminations_sync,
    waiver_create,
    waiver_withdraw,
)
from inspections.services import job_reopen
from shop.services import job_update
from tests.circuits.factories import make_device
from tests.factories import make_job
from tests.html_forms import form_fields
from tests.inspections.factories import approved, make_spec_circuit, make_wrench

pytestmark = pytest.mark.django_db

LOCKED = "a lead must reopen it first"
REOPEN_REASON = "Owner wants a second USB outlet by the bed."


@pytest.fixture
def job(technician, lead):
    job = make_job(lead=lead)
    job.technicians.add(technician)
    return job


@pytest.fixture
def circuit(job):
    return make_spec_circuit(job, tag="D-01")


@pytest.fixture
def spare(job):
    """A device no circuit uses (so it may be deleted when the job is not locked)."""
    return make_device(job, name="Spare lamp")


@pytest.fixture
def locked(job, circuit, technician, lead):
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    return job


def _refused(call) -> str:
    with pytest.raises(ValidationError) as caught:
        call()
    text = " ".join(caught.value.messages)
    assert LOCKED in text
    return text


def _device_forms(job, device, data=None):
    data = data or {
        "name": device.name,
        "kind": device.kind,
        "mounting": device.mounting,
        "terminals-TOTAL_FORMS": "0",
        "terminals-INITIAL_FORMS": "0",
    }
    form = DeviceForm(data, instance=device, job=job)
    terminals = TerminalFormSet(data, instance=device, prefix="terminals")
    assert form.is_valid(), form.errors
    assert terminals.is_valid(), terminals.errors
    return form, terminals


def test_every_system_write_is_refused_while_locked(locked, circuit, spare, lead):
    job = locked
    devices = list(job.devices.exclude(pk=spare.pk))
    before = (
        Circuit.objects.filter(job=job).count(),
        Termination.objects.filter(circuit__job=job).count(),
        Device.objects.filter(job=job).count(),
    )
    _refused(lambda: circuit_create(job=job, **_fields(devices, tag="D-02")))
    _refused(lambda: circuit_update(circuit=circuit, name="Renamed while locked"))
    _refused(lambda: terminations_sync(circuit=circuit))
    _refused(lambda: circuit_delete(circuit=circuit, user=lead))
    _refused(lambda: device_delete(device=spare, user=lead))
    form, terminals = _device_forms(job, spare)
    _refused(lambda: device_save(**device_save_values(form, terminals)))
    termination = circuit.terminations.first()
    termination.torque_value = Decimal("12")
    _refused(lambda: termination_update(termination=termination))
    _refused(lambda: termination_update(termination=termination, refill=True))
    _refused(lambda: job_update(job=job, title="Changed after approval"))
    result = circuits_from_csv(job=job, text=circuits_to_csv(job))
    assert not result.ok and LOCKED in " ".join(e.message for e in result.errors)
    after = (
        Circuit.objects.filter(job=job).count(),
        Termination.objects.filter(circuit__job=job).count(),
        Device.objects.filter(job=job).count(),
    )
    assert after == before
    circuit.refresh_from_db()
    assert circuit.name != "Renamed while locked"
    assert Termination.objects.get(pk=termination.pk).torque_value == Decimal("10")


def test_waivers_are_neither_granted_nor_withdrawn_while_locked(job, technician, lead):
    # A solid-core run whose ends carry a spec: CONSTRUCTION_SOLID (blocking) on D-09,
    # waived so the job can be approved.
    make_spec_circuit(job, tag="D-09", construction="solid")
    reason = "Short test lead, replaced with stranded cable at first service."
    waiver = waiver_create(
        job=job, code="CONSTRUCTION_SOLID", subject="D-09", reason=reason, lead=lead
    )
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    _refused(lambda: waiver_withdraw(waiver=waiver, user=lead, reason="no longer"))
    _refused(
        lambda: waiver_create(
            job=job, code="CONSTRUCTION_SOLID", subject="D-09", reason=reason, lead=lead
        )
    )
    waiver.refresh_from_db()
    assert waiver.is_active and Waiver.objects.filter(job=job).count() == 1
    job_reopen(job=job, lead=lead, reason=REOPEN_REASON)
    waiver_withdraw(waiver=waiver, user=lead, reason="")
    waiver.refresh_from_db()
    assert not waiver.is_active


def test_after_a_reopen_the_writes_go_through(locked, circuit, spare, lead):
    job = locked
    job_reopen(job=job, lead=lead, reason=REOPEN_REASON)
    devices = list(job.devices.exclude(pk=spare.pk))
    created = circuit_create(job=job, **_fields(devices, tag="D-02"))
    circuit_update(circuit=circuit, name="Renamed after reopen")
    termination = circuit.terminations.first()
    termination.torque_value = Decimal("12")
    termination_update(termination=termination)
    form, terminals = _device_forms(job, spare)
    device_save(**device_save_values(form, terminals))
    job_update(job=job, title="Changed after reopen")
    circuit_delete(circuit=created, user=lead)
    device_delete(device=spare, user=lead)
    assert Termination.objects.get(pk=termination.pk).torque_value == Decimal("12")
    assert not Device.objects.filter(pk=spare.pk).exists()


def _fields(devices, **extra) -> dict:
    fields = {
        "name": "New feed",
        "role": Circuit.Role.DC_BRANCH,
        "nominal_voltage": 12,
        "design_current_a": Decimal("10"),
        "length_m": 2.0,
        "conductor_size": "12 AWG",
        "conductors": Circuit.Conductors.PAIR,
        "colour_a": "red",
        "colour_b": "black",
        "protection_type": Circuit.ProtectionType.FUSE,
        "protection_a": Decimal("15"),
        "from_device": devices[0],
        "to_device": devices[1],
    }
    return {**fields, **extra}


# ---- the pages ----


def _client(user) -> Client:
    client = Client()
    client.force_login(user)
    return client


def test_the_pages_show_the_lock_and_offer_no_write_buttons(locked, circuit, lead, technician):
    job = locked
    client = _client(lead)
    device = job.devices.first()
    for url in [
        reverse("circuit_schedule", args=[job.number]),
        reverse("device_list", args=[job.number]),
        reverse("device_detail", args=[job.number, device.pk]),
        circuit.get_absolute_url(),
    ]:
        body = client.get(url).content.decode()
        assert "Approved, locked." in body and LOCKED in body, url
        assert "Add circuit" not in body and "Add device" not in body, url
        assert "Edit device" not in body and "Delete circuit" not in body, url
        assert reverse("termination_edit", args=[job.number, 1])[:-2] not in body, url
    body = client.get(job.get_absolute_url()).content.decode()
    assert "Add circuit" not in body and "Import CSV" not in body


def test_the_forms_say_why_nothing_was_saved(locked, circuit, lead):
    job = locked
    client = _client(lead)
    termination = circuit.terminations.first()
    response = client.post(
        reverse("termination_edit", args=[job.number, termination.pk]),
        {
            "kind": termination.kind,
            "stud_size": termination.stud_size,
            "torque_value": "12",
            "torque_unit": termination.torque_unit,
            "torque_tolerance_pct": "10",
            "torque_source": termination.torque_source,
            "torque_source_note": "",
        },
    )
    assert response.status_code == 200 and LOCKED in response.content.decode()
    assert Termination.objects.get(pk=termination.pk).torque_value == Decimal("10")

    response = client.post(
        reverse("job_edit", args=[job.number]),
        {"vehicle": job.vehicle_id, "title": "Changed", "booked_in_on": "2026-01-05"},
    )
    assert response.status_code == 200 and LOCKED in response.content.decode()

    upload = SimpleUploadedFile("c.csv", circuits_to_csv(job).encode(), "text/csv")
    response = client.post(reverse("circuit_csv_import", args=[job.number]), {"file": upload})
    assert response.status_code == 200 and LOCKED in response.content.decode()

    # The circuit form posted untouched, as the page offers it.
    page = client.get(circuit.get_absolute_url()).content.decode()
    data = form_fields(page, action_contains=circuit.get_absolute_url())
    response = client.post(circuit.get_absolute_url(), data | {"name": "Renamed"})
    assert response.status_code == 200 and LOCKED in response.content.decode()
    assert Circuit.objects.get(pk=circuit.pk).name != "Renamed"
    response = client.post(
        reverse("circuit_delete", args=[job.number, circuit.pk]), {"confirm": "yes"}
    )
    assert response.status_code == 409 and LOCKED in response.content.decode()
    assert Circuit.objects.filter(pk=circuit.pk).exists()

    spare = make_device_for_lock(job)
    response = client.post(
        reverse("device_delete", args=[job.number, spare.pk]), {"confirm": "yes"}
    )
    assert response.status_code == 409 and LOCKED in response.content.decode()
    assert Device.objects.filter(pk=spare.pk).exists()


def make_device_for_lock(job):
    # Devices are refused while locked, so the test's spare is written as the admin would
    # see it: straight to the table (this test is about the page's refusal).
    device = Device(job=job, name="Spare fan", kind=Device.Kind.LOAD, mounting="body")
    device.save()
    return device
