"""Approved jobs for the re-check tests, made through the real services: the first
install, the heat-cycle run, the retorque (with as many connections found loose as
asked) and the lead's approval.

    approved_job(technician=, lead=, wrench=, vehicle=None, loose=0, loose_withdrawn=0,
                 approved_at=None) -> Job   the first `loose_withdrawn` of the `loose`
                                            readings corrected to not found loose
    approval_due_in(days) -> datetime   an approval time whose 12-month re-check is due
                                        `days` days from today (negative: overdue)

`approved_at` back-dates the approval (job_approve's `at`, the one the demo's history
uses)."""

from __future__ import annotations

import datetime

from django.utils import timezone

from circuits.models import Termination
from inspections.models import Stage
from inspections.services import job_approve, torque_record_correct
from tests.factories import make_job
from tests.inspections.factories import (
    PASSWORD,
    log_soaked_run,
    mark_all,
    new_key,
    read,
    sign,
    signature,
    through_install,
)


def approval_due_in(days: int) -> datetime.datetime:
    """An approval moment (noon) whose 12-month re-check falls `days` days from today."""
    target = timezone.localdate() + datetime.timedelta(days=days)
    if (target.month, target.day) == (2, 29):
        target -= datetime.timedelta(days=1)  # a year before 29 February is no such day
    approved = target.replace(year=target.year - 1)
    return timezone.make_aware(datetime.datetime.combine(approved, datetime.time(12)))


def approved_job(
    *,
    technician,
    lead,
    wrench,
    vehicle=None,
    loose: int = 0,
    loose_withdrawn: int = 0,
    approved_at=None,
):
    job = make_job(vehicle=vehicle, lead=lead)
    through_install(job, technician=technician, wrench=wrench)
    log_soaked_run(job, technician)
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    ends = Termination.objects.filter(circuit__job=job).order_by("pk")
    for number, termination in enumerate(ends):
        record = read(
            termination,
            retorque,
            "10",
            technician=technician,
            wrench=wrench,
            found_loose=number < loose,
        )
        if number < loose_withdrawn:
            torque_record_correct(
                record=record,
                value="10",
                unit="N*m",
                wrench=wrench,
                technician=technician,
                reason="Found loose ticked by mistake: the nut held",
                client_key=new_key(),
                found_loose=False,
            )
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature(), at=approved_at)
    job.refresh_from_db()
    return job
