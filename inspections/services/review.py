"""Reads for the lead's review: the queue of jobs waiting for approval, and what one job's
review page lists (readings worth a second look, checklist fails and not-applicables,
thermal results with their waivers). Nothing here writes."""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.db.models import Exists, OuterRef, QuerySet, Subquery

from circuits.system import SystemReport, job_system_report
from inspections.models import SignOff, Stage, ThermalWaiver, TorqueRecord
from inspections.services.checklists import ChecklistItem, checklist_items_for
from inspections.services.queries import (
    ThermalResult,
    current_readings,
    thermal_results,
    thermal_waivers,
)
from shop.models import Job

# The stages whose work the lead reviews (the heat-cycle run is its logged run).
# A return visit's re-check is reviewed too: what was found loose again is in its readings.
WORK_KINDS = (Stage.Kind.RECHECK, Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE)


def jobs_awaiting_review() -> QuerySet[Job]:
    """Jobs whose retorque is signed and whose handover is not yet approved, the one
    waiting longest first (by when its retorque was last signed)."""
    # A return visit whose build stages a lead marked not needed waits on its re-check.
    retorque_signed = Stage.objects.filter(
        job=OuterRef("pk"),
        kind=Stage.Kind.RETORQUE,
        state__in=(Stage.State.SIGNED, Stage.State.NOT_NEEDED),
    )
    approved = Stage.objects.filter(
        job=OuterRef("pk"), kind=Stage.Kind.HANDOVER, state=Stage.State.SIGNED
    )
    last_retorque = (
        SignOff.objects.filter(job=OuterRef("pk"), kind=SignOff.Kind.RETORQUE)
        .order_by("-signed_at", "-pk")
        .values("signed_at")[:1]
    )
    return (
        Job.objects.select_related("vehicle__owner", "lead")
        .filter(Exists(retorque_signed))
        .exclude(Exists(approved))
        .annotate(waiting_since=Subquery(last_retorque))
        .order_by("waiting_since", "pk")
    )


@dataclass(frozen=True)
class ReadingNote:
    """A reading the lead should see: out of tolerance or found loose, with the reading
    that counts for its termination at that stage now."""

    record: TorqueRecord
    now: TorqueRecord | None

    @property
    def put_right(self) -> bool:
        """A later reading of the same termination at that stage is within tolerance."""
        return self.now is not None and self.now.pk != self.record.pk and self.now.within_tolerance


def notable_readings(job) -> list[ReadingNote]:
    """Every uncorrected reading of the job that was out of tolerance or found loose,
    by stage and time. A corrected entry (a typing slip, put right with a reason) is left
    out: what counts is the correction, which appears here if it is itself notable."""
    stages = {s.pk: s for s in Stage.objects.filter(job=job, kind__in=WORK_KINDS)}
    now = {pk: current_readings(stage) for pk, stage in stages.items()}
    records = (
        TorqueRecord.objects.current()
        .filter(stage__in=stages)
        .exclude(result=TorqueRecord.Result.WITHIN, found_loose=False)
        .select_related("termination__circuit", "stage", "wrench", "technician")
        .order_by("stage__kind", "recorded_at", "pk")
    )
    return [ReadingNote(r, now[r.stage_id].get(r.termination_id)) for r in records]


@dataclass(frozen=True)
class ThermalLine:
    result: ThermalResult
    waiver: ThermalWaiver | None


def thermal_lines(job) -> list[ThermalLine]:
    """Each connection's latest temperature, blocking ones first, with any waiver."""
    waivers = thermal_waivers(job)
    lines = [
        ThermalLine(result, waivers.get(result.reading.pk))
        for result in thermal_results(job).values()
    ]
    lines.sort(
        key=lambda line: (not line.result.blocks_retorque, str(line.result.reading.termination))
    )
    return lines


def checklist_exceptions(stage: Stage) -> list[ChecklistItem]:
    """Items of the stage marked fail or not applicable (each carries its note)."""
    return [
        item
        for item in checklist_items_for(stage=stage)
        if not item.derived and item.mark is not None and item.mark.result in ("fail", "na")
    ]


def open_findings(report: SystemReport) -> list:
    """Blocking and warning findings not covered by a waiver (notes left out)."""
    return [f for f in report.all_findings if f.severity != "note" and not f.waived]


@dataclass
class QueueRow:
    job: Job
    waiting_since: datetime.datetime | None
    out_of_tolerance: int
    found_loose: int
    hot: int
    open_findings: int


def queue_rows(jobs) -> list[QueueRow]:
    """The queue's cards: per job, terminations read out of tolerance at some point
    (at either stage), found loose at retorque, hot connections (probable deficiency or
    worse, waived or not) and open findings."""
    rows = []
    for job in jobs:
        readings = notable_readings(job)
        out = {
            (n.record.stage_id, n.record.termination_id)
            for n in readings
            if not n.record.within_tolerance
        }
        loose = {
            n.record.termination_id
            for n in readings
            if n.record.found_loose and n.record.stage.kind == Stage.Kind.RETORQUE
        }
        hot = sum(1 for r in thermal_results(job).values() if r.blocks_retorque)
        rows.append(
            QueueRow(
                job=job,
                waiting_since=getattr(job, "waiting_since", None),
                out_of_tolerance=len(out),
                found_loose=len(loose),
                hot=hot,
                open_findings=len(open_findings(job_system_report(job))),
            )
        )
    return rows


__all__ = [
    "QueueRow",
    "ReadingNote",
    "ThermalLine",
    "checklist_exceptions",
    "jobs_awaiting_review",
    "notable_readings",
    "open_findings",
    "queue_rows",
    "thermal_lines",
]
