"""Helpers of the return-visit tests: an approved job with one circuit (four ends at a
10 N·m ±10 % spec from the device manual), read 10 N·m at first install and at retorque
(one end corrected at retorque to 10.5 N·m), and a return visit booked from it.

Spec figures are the tests' own (a device manual's value, as the factories give it);
the band is the shop's default tolerance of 10 % (common practice)."""

from __future__ import annotations

import datetime

from django.utils import timezone

from circuits.models import Termination
from inspections.models import Stage, TorqueRecord
from inspections.services import heat_cycle_log, job_approve, torque_record_correct
from inspections.services.return_visit import return_visit_create
from tests.inspections.factories import (
    PASSWORD,
    log_soaked_run,
    mark_all,
    new_key,
    read,
    read_all,
    sign,
    signature,
    through_install,
)


def approved_job(job, *, technician, lead, wrench) -> TorqueRecord:
    """`job` approved as described above; returns the retorque correction (10 to 10.5)."""
    job.lead = lead
    job.save(update_fields=["lead"])
    through_install(job, technician=technician, wrench=wrench)
    log_soaked_run(job, technician)
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    first = TorqueRecord.objects.filter(stage=retorque).order_by("termination_id").first()
    correction = torque_record_correct(
        record=first,
        value="10.5",
        unit="N*m",
        wrench=wrench,
        technician=technician,
        reason="typed 10 for 10.5",
        client_key=new_key(),
    )
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    return correction


def book(job, *, by, title: str = "Yearly re-check"):
    return return_visit_create(job=job, by=by, title=title)


def ends(job) -> list[Termination]:
    return list(
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )


def recheck_of(job) -> Stage:
    return Stage.objects.select_related("job").get(job=job, kind=Stage.Kind.RECHECK)


def log_recheck_run(job, by):
    end = timezone.now() - datetime.timedelta(minutes=10)
    return heat_cycle_log(
        job=job,
        start=end - datetime.timedelta(minutes=30),
        end=end,
        peak_current_a="80",
        ambient_c="20",
        by=by,
    )


def read_as_found(job, values, *, technician, wrench, **kwargs) -> list[TorqueRecord]:
    """One as-found reading per end, in end order, from `values`."""
    stage = recheck_of(job)
    return [
        read(t, stage, value, technician=technician, wrench=wrench, **kwargs)
        for t, value in zip(ends(job), values, strict=True)
    ]
