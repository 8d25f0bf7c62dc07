"""Evidence is append-only at every layer: the model, the queryset and the database
itself (triggers, on SQLite and PostgreSQL), and nothing above a reading can be deleted
out from under it."""

from __future__ import annotations

import datetime
from decimal import Decimal

import pytest
from django.db import DatabaseError, connection, transaction
from django.db.models import ProtectedError
from django.utils import timezone

from circuits.models import Circuit, Device
from circuits.services import circuit_update
from inspections.models import AppendOnlyError, AuditEvent, ThermalReading, TorqueRecord
from inspections.services import heat_cycle_log, thermal_reading_create
from shop.models import Job
from tests.factories import make_job
from tests.inspections.factories import new_key, read, stages_by_kind
from tests.inspections.guards import GUARDED_TABLES, clear_evidence, guard_triggers

pytestmark = pytest.mark.django_db


@pytest.fixture
def record(install, termination, wrench, technician):
    return read(termination, install, "10", technician=technician, wrench=wrench)


@pytest.fixture
def thermal(heat_stage, job, termination, technician):
    now = timezone.now()
    run = heat_cycle_log(
        job=job,
        start=now - datetime.timedelta(hours=2),
        end=now - datetime.timedelta(hours=1),
        peak_current_a="120",
        ambient_c="20",
        by=technician,
    )
    return thermal_reading_create(
        run=run, termination=termination, temperature_c="31", by=technician, client_key=new_key()
    )


def _raw(sql: str, params) -> None:
    # In a savepoint, so that on PostgreSQL the test's transaction stays usable after.
    with transaction.atomic(), connection.cursor() as cursor:
        cursor.execute(sql, params)


# --- the model and the queryset -----------------------------------------------------------


def test_saving_a_stored_torque_record_is_refused(record):
    record.value = Decimal("99")
    with pytest.raises(AppendOnlyError, match="append-only"):
        record.save()
    assert TorqueRecord.objects.get(pk=record.pk).value == Decimal("10")


def test_deleting_a_torque_record_is_refused(record):
    with pytest.raises(AppendOnlyError):
        record.delete()
    assert TorqueRecord.objects.filter(pk=record.pk).exists()


@pytest.mark.parametrize("model", [TorqueRecord, ThermalReading, AuditEvent])
def test_queryset_update_and_delete_are_refused(model, record, thermal):
    with pytest.raises(AppendOnlyError):
        model.objects.all().update(pk=0)
    with pytest.raises(AppendOnlyError):
        model.objects.all().delete()
    assert model.objects.exists()


def test_bulk_update_of_torque_records_is_refused(record):
    record.note = "changed"
    with pytest.raises(AppendOnlyError):
        TorqueRecord.objects.bulk_update([record], ["note"])


def test_saving_a_stored_thermal_reading_or_audit_event_is_refused(thermal):
    event = AuditEvent.objects.first()
    for row in (thermal, event):
        with pytest.raises(AppendOnlyError):
            row.save()
        with pytest.raises(AppendOnlyError):
            row.delete()


# --- the database -------------------------------------------------------------------------


def test_raw_sql_update_of_torque_record_fails(record):
    with pytest.raises(DatabaseError, match="torque records are append-only"):
        _raw("UPDATE inspections_torquerecord SET value = %s WHERE id = %s", [99, record.pk])
    assert TorqueRecord.objects.get(pk=record.pk).value == Decimal("10")


def test_raw_sql_delete_of_torque_record_fails(record):
    with pytest.raises(DatabaseError, match="torque records are append-only"):
        _raw("DELETE FROM inspections_torquerecord WHERE id = %s", [record.pk])
    assert TorqueRecord.objects.filter(pk=record.pk).exists()


def test_raw_sql_update_and_delete_of_thermal_readings_fail(thermal):
    with pytest.raises(DatabaseError, match="thermal readings are append-only"):
        _raw("UPDATE inspections_thermalreading SET temperature_c = %s", [20])
    with pytest.raises(DatabaseError, match="thermal readings are append-only"):
        _raw("DELETE FROM inspections_thermalreading WHERE id = %s", [thermal.pk])
    assert ThermalReading.objects.get(pk=thermal.pk).temperature_c == Decimal("31")


def test_raw_sql_update_and_delete_of_audit_events_fail(record):
    with pytest.raises(DatabaseError, match="audit events are append-only"):
        _raw("UPDATE inspections_auditevent SET summary = %s", ["nothing happened"])
    with pytest.raises(DatabaseError, match="audit events are append-only"):
        _raw("DELETE FROM inspections_auditevent", [])
    assert AuditEvent.objects.count() == 1


def test_every_guarded_table_has_its_triggers_after_all_migrations():
    # A later migration that alters one of these models on SQLite rebuilds the table and
    # drops its triggers; this fails until that migration installs them again.
    if connection.vendor == "sqlite":
        expected = sorted(f"{t}_no_{op}" for t in GUARDED_TABLES for op in ("delete", "update"))
    else:
        expected = sorted(f"{t}_append_only" for t in GUARDED_TABLES)
    assert guard_triggers() == expected


# --- nothing above a reading can vanish ---------------------------------------------------


def test_a_job_with_a_reading_cannot_be_deleted(record, job):
    with pytest.raises(ProtectedError):
        job.delete()
    assert Job.objects.filter(pk=job.pk).exists() and TorqueRecord.objects.count() == 1


def test_a_circuit_or_device_with_readings_cannot_be_deleted(record, circuit):
    with pytest.raises(ProtectedError):
        circuit.delete()
    with pytest.raises(ProtectedError):
        Device.objects.get(pk=circuit.to_device_id).delete()
    assert Circuit.objects.filter(pk=circuit.pk).exists()


def test_editing_a_circuit_so_an_end_with_a_reading_would_vanish_loses_nothing(record, circuit):
    # Today the database refuses (ProtectedError); circuits.services is to turn that into a
    # ValidationError for the form. Either way the reading and its termination remain.
    from django.core.exceptions import ValidationError

    other_polarity = "pos" if record.termination.polarity == "neg" else "neg"
    with pytest.raises((ProtectedError, ValidationError)):
        circuit_update(circuit=circuit, conductors=other_polarity)
    assert TorqueRecord.objects.get(pk=record.pk).termination.circuit_id == circuit.pk


def test_a_person_with_readings_cannot_be_deleted(record, technician):
    with pytest.raises(ProtectedError):
        technician.delete()


def test_a_job_without_evidence_can_still_be_deleted():
    job = make_job()
    stages_by_kind(job)
    job.delete()
    assert not Job.objects.filter(pk=job.pk).exists()


# --- the test runner's way out, and only its way -------------------------------------------


@pytest.mark.django_db(transaction=True)
def test_clearing_evidence_for_the_test_runner_puts_the_guard_back(evidence_cleared):
    from tests.factories import make_user
    from tests.inspections.factories import make_spec_circuit, make_wrench
    from tests.inspections.guards import grant_inspection_roles

    technician = make_user("Technician")
    grant_inspection_roles()
    job = make_job()
    install = stages_by_kind(job)[1]
    termination = make_spec_circuit(job).terminations.first()
    wrench = make_wrench()
    read(termination, install, "10", technician=technician, wrench=wrench)
    before = guard_triggers()
    clear_evidence()
    assert guard_triggers() == before and not TorqueRecord.objects.exists()
    kept = read(termination, install, "10", technician=technician, wrench=wrench)
    with pytest.raises(DatabaseError, match="append-only"):
        _raw("DELETE FROM inspections_torquerecord WHERE id = %s", [kept.pk])
