"""The gates: what still stands between a stage and its signature, each condition in
plain words. The signing services (inspections.services.signing, .approval) refuse with
exactly this list; a page shows it under the signing pad.

* First install: every termination has a current reading within tolerance made with a
  wrench calibrated on the day; every checklist item is marked pass or not applicable
  (a fail is put right and marked again); no blocking finding is open (unwaived, or its
  waiver lapsed: circuits.system's `open_blocking`).
* Heat-cycle run: signed by logging the run (inspections.services.heat_cycle_log).
* Retorque: a run is logged and the shop's soak has passed since its end; every
  termination re-read at retorque after the soak, within tolerance, with a calibrated
  wrench; the retorque checklist marked; every hot connection re-made and read cooler,
  or waived by a lead.
* Handover (the lead's approval): first install and retorque signed and what each
  signature covers unchanged since; no blocking finding open.
"""

from __future__ import annotations

import datetime

from django.utils import timezone

from circuits.models import Termination
from circuits.system import job_system_report
from inspections.models import Stage
from inspections.services.checklists import checklist_items_for
from inspections.services.common import plural, stage_name
from inspections.services.queries import (
    current_readings,
    latest_run,
    soak_ends_at,
    thermal_unwaived,
)
from inspections.services.signoffs import STAGE_SIGNOFF_KINDS, signoff_in_force, signoff_is_current
from inspections.units import format_number


def _local(moment: datetime.datetime) -> str:
    return f"{timezone.localtime(moment):%d %b %Y %H:%M}"


def torque_blockers(stage: Stage, *, not_before: datetime.datetime | None = None) -> list[str]:
    """Terminations without a current reading within tolerance made with a wrench
    calibrated on the day (and, with `not_before`, made at or after that moment)."""
    name = stage_name(stage)
    terminations = list(
        Termination.objects.filter(circuit__job=stage.job_id)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    if not terminations:
        return [
            f"Job {stage.job.number} has no terminations recorded: record its electrical"
            " system (devices and circuits) first."
        ]
    current = current_readings(stage)
    unread: list[str] = []
    problems: list[str] = []
    again = "read again at retorque" if stage.kind == Stage.Kind.RETORQUE else "read"
    for termination in terminations:
        record = current.get(termination.pk)
        if record is None:
            unread.append(str(termination))
            continue
        if not_before is not None and record.recorded_at < not_before:
            problems.append(
                f"{termination} was read at {_local(record.recorded_at)}, before the soak ended"
                f" at {_local(not_before)}; read it again."
            )
            continue
        if not record.within_tolerance:
            problems.append(
                f"{termination} is out of tolerance: {record.value_display} is"
                f" {record.get_result_display().lower()} (spec {record.spec_display});"
                " tighten it and read it again."
            )
        overdue = record.wrench.days_overdue(timezone.localdate(record.recorded_at))
        if overdue:
            problems.append(
                f"{termination} was read with wrench {record.wrench.code}, whose calibration"
                f" was due on {record.wrench.calibration_due:%d %b %Y},"
                f" {plural(overdue, 'day')} before the reading; read it again with a"
                " calibrated wrench."
            )
    messages = []
    if unread:
        messages.append(
            f"{plural(len(unread), 'termination')} not {again} yet at {name}: {', '.join(unread)}."
        )
    return messages + problems


def checklist_blockers(stage: Stage) -> list[str]:
    """Checklist items (other than torque items) not marked, marked on what the record
    no longer says, or marked fail."""
    unmarked: list[str] = []
    problems: list[str] = []
    for item in checklist_items_for(stage=stage):
        if item.derived:
            continue
        state = item.state
        if state == "open":
            unmarked.append(f"“{item.text}”")
        elif state == "changed":
            problems.append(
                f"Checklist item “{item.text}” was marked for {item.mark.item_basis or 'another'}"
                " record, which has changed since; check it and mark it again."
            )
        elif state == "fail":
            problems.append(
                f"Checklist item “{item.text}” is marked fail ({item.mark.note}); put it right"
                " and mark it again."
            )
    messages = []
    if unmarked:
        messages.append(
            f"{plural(len(unmarked), 'checklist item')} not marked yet: {'; '.join(unmarked)}."
        )
    return messages + problems


def findings_blockers(job) -> list[str]:
    return [
        f"Blocking finding on {finding.subject} is open (not waived, or its waiver has"
        f" lapsed): {finding.message}"
        for finding in job_system_report(job).open_blocking
    ]


def thermal_blockers(job) -> list[str]:
    return [
        f"{result.reading.termination} was {format_number(result.reading.temperature_c, 1)} °C"
        f" after the heat-cycle run ({result.thermal_class.label.lower()}); re-make it and"
        " take its temperature again, or a lead waives it."
        for result in thermal_unwaived(job)
    ]


def soak_blockers(job, *, now: datetime.datetime | None = None) -> list[str]:
    run = latest_run(job)
    if run is None:
        return ["No heat-cycle run is logged yet; log the run, then wait out the soak."]
    ends = soak_ends_at(job)
    now = now or timezone.now()
    if now < ends:
        minutes = max(1, -(-int((ends - now).total_seconds()) // 60))
        return [
            f"The soak after the heat-cycle run lasts until {_local(ends)}"
            f" ({plural(minutes, 'minute')} left)."
        ]
    return []


def install_blockers(stage: Stage) -> list[str]:
    return torque_blockers(stage) + checklist_blockers(stage) + findings_blockers(stage.job)


def retorque_blockers(stage: Stage) -> list[str]:
    soak = soak_blockers(stage.job)
    ends = soak_ends_at(stage.job)
    return (
        soak
        + torque_blockers(stage, not_before=ends)
        + checklist_blockers(stage)
        + thermal_blockers(stage.job)
    )


def approval_blockers(job, stages: dict[int, Stage] | None = None) -> list[str]:
    """What stands between the job and the lead's approval."""
    if stages is None:
        stages = {s.kind: s for s in Stage.objects.filter(job=job).select_related("job")}
    if not stages:
        return [f"Job {job.number} has no stages yet; open its first install."]
    messages = []
    for kind in STAGE_SIGNOFF_KINDS:
        stage = stages[kind]
        signoff = signoff_in_force(stage)
        if signoff is None:
            messages.append(
                f"The {stage_name(stage)} stage is {stage.get_state_display().lower()};"
                " it must be signed before approval."
            )
        elif not signoff_is_current(signoff):
            messages.append(
                f"The {stage_name(stage)} sign-off by {signoff.printed_name} on"
                f" {_local(signoff.signed_at)} no longer matches what it covers (something"
                " changed since it was signed); send the stage back to be checked and signed"
                " again."
            )
    return messages + findings_blockers(job)


def stage_blockers(stage: Stage) -> list[str]:
    """What still stands between `stage` and its signature (empty: it may be signed)."""
    if stage.kind == Stage.Kind.FIRST_INSTALL:
        return install_blockers(stage)
    if stage.kind == Stage.Kind.RETORQUE:
        return retorque_blockers(stage)
    if stage.kind == Stage.Kind.HEAT_CYCLE:
        return (
            [] if latest_run(stage.job) else ["Log the heat-cycle run: logging it signs the stage."]
        )
    return approval_blockers(stage.job)


__all__ = [
    "approval_blockers",
    "install_blockers",
    "retorque_blockers",
    "stage_blockers",
]
