"""The audit trail: every write leaves one event, in the same transaction, with who, when,
what, before and after; a refused write leaves none."""

from __future__ import annotations

import datetime

import pytest
from django.core.exceptions import ValidationError
from django.utils import timezone

from inspections.models import AuditEvent, TorqueRecord
from inspections.services import heat_cycle_log, thermal_reading_create, torque_record_correct
from tests.inspections.factories import new_key, read

pytestmark = pytest.mark.django_db


def test_a_reading_leaves_one_event_naming_who_what_and_the_record(
    install, job, termination, wrench, technician
):
    record = read(termination, install, "10.5", technician=technician, wrench=wrench)
    event = AuditEvent.objects.get()
    assert (event.job, event.kind, event.actor) == (job, AuditEvent.Kind.READING, technician)
    assert (event.subject_type, event.subject_id) == ("inspections.torquerecord", str(record.pk))
    assert str(termination) in event.summary and "10.5 N·m" in event.summary
    assert event.before is None
    assert event.after["value"] == "10.5" and event.after["result"] == "within"


def test_a_correction_leaves_an_event_with_before_and_after(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    torque_record_correct(
        record=wrong,
        value="12",
        unit="N*m",
        wrench=wrench,
        technician=technician,
        reason="typed 21 for 12 on the keypad",
        client_key=new_key(),
    )
    event = AuditEvent.objects.get(kind=AuditEvent.Kind.CORRECTION)
    assert event.before["value"] == "21" and event.after["value"] == "12"
    assert event.after["reason"] == "typed 21 for 12 on the keypad"
    assert "21 N·m corrected to 12 N·m" in event.summary


def test_a_run_and_a_temperature_each_leave_an_event(heat_stage, job, termination, technician):
    now = timezone.now()
    run = heat_cycle_log(
        job=job,
        start=now - datetime.timedelta(hours=2),
        end=now - datetime.timedelta(hours=1),
        peak_current_a="150",
        ambient_c="18.5",
        by=technician,
    )
    thermal_reading_create(
        run=run, termination=termination, temperature_c="30", by=technician, client_key=new_key()
    )
    kinds = list(AuditEvent.objects.order_by("pk").values_list("kind", flat=True))
    # Logging the run signs the heat-cycle stage and opens the retorque: two more events.
    assert kinds == [
        AuditEvent.Kind.RUN_LOGGED,
        AuditEvent.Kind.STAGE_SIGNED,
        AuditEvent.Kind.STAGE_OPENED,
        AuditEvent.Kind.THERMAL_READING,
    ]
    assert "11.5 °C over ambient" in AuditEvent.objects.get(kind="thermal_reading").summary


def test_a_refused_write_leaves_no_event(install, termination, wrench, technician):
    with pytest.raises(ValidationError):
        read(termination, install, "-1", technician=technician, wrench=wrench)
    assert not AuditEvent.objects.exists() and not TorqueRecord.objects.exists()


def test_a_resend_leaves_no_second_event(install, termination, wrench, technician):
    key = new_key()
    for _ in range(3):
        read(termination, install, "10", client_key=key, technician=technician, wrench=wrench)
    assert AuditEvent.objects.count() == 1


def test_the_trail_reads_newest_first(install, termination, terminations, wrench, technician):
    read(terminations[0], install, "10", technician=technician, wrench=wrench)
    read(terminations[1], install, "10", technician=technician, wrench=wrench)
    events = list(AuditEvent.objects.all())
    assert events[0].subject_id > events[1].subject_id
