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

A return visit (shop.models.Job.Kind.RETURN_VISIT) adds, before these:

* Re-check: every termination read as found, before any re-tightening, with a wrench
  calibrated on the day (out of tolerance is allowed: what was found is the record; one
  reading per end, corrections aside); the re-check run logged for the thermal check
  (its temperatures are recorded as found, hot ones are re-made at first install); the
  re-check checklist marked. Approval then also needs the re-check signed and unchanged.
* First install on a return visit is the re-tightening and any new work: an end found
  within tolerance at the re-check, not loose and not hot, keeps its as-found reading (a
  careful shop does not disturb a good joint); every other end (found loose or out of
  tolerance, hot, or new) is read within tolerance. The heat-cycle run and the retorque
  of every end after it follow as on any job: anything re-made is proven after heat.
* With nothing to re-tighten, nothing hot and no new work, a lead may mark the build
  stages not needed, with a reason (`skip_blockers` lists what forbids it); approval
  then rests on the re-check alone.
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
    recheck_run,
    soak_ends_at,
    thermal_results,
    thermal_unwaived,
)
from inspections.services.signoffs import STAGE_SIGNOFF_KINDS, signoff_in_force, signoff_is_current
from inspections.units import format_number


def _local(moment: datetime.datetime) -> str:
    return f"{timezone.localtime(moment):%d %b %Y %H:%M}"


def torque_blockers(
    stage: Stage,
    *,
    not_before: datetime.datetime | None = None,
    as_found: bool = False,
    carried: frozenset[int] = frozenset(),
) -> list[str]:
    """Terminations without a current reading within tolerance made with a wrench
    calibrated on the day (and, with `not_before`, made at or after that moment). With
    `as_found` (the re-check) any result counts: the reading is what was found. Ends in
    `carried` keep the re-check's reading (a return visit's first install)."""
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
    if as_found:
        again = "read as found"
    for termination in terminations:
        if termination.pk in carried and termination.pk not in current:
            continue
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
        if not record.within_tolerance and not as_found:
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


def as_found_good(job) -> frozenset[int]:
    """A return visit's ends found good at its signed re-check: read within tolerance,
    not found loose, not hot on the re-check run. Empty for any other job."""
    stage = Stage.objects.filter(job=job, kind=Stage.Kind.RECHECK).first()
    if stage is None or stage.state != Stage.State.SIGNED:
        return frozenset()
    hot = {pk for pk, r in thermal_results(job, recheck=True).items() if r.blocks_retorque}
    return frozenset(
        pk
        for pk, record in current_readings(stage).items()
        if record.within_tolerance and not record.found_loose and pk not in hot
    )


def install_blockers(stage: Stage) -> list[str]:
    carried = as_found_good(stage.job)
    return (
        torque_blockers(stage, carried=carried)
        + checklist_blockers(stage)
        + findings_blockers(stage.job)
    )


def recheck_blockers(stage: Stage) -> list[str]:
    run = (
        []
        if recheck_run(stage.job)
        else [
            "No re-check run is logged: run the system near its design load, log the run, and"
            " take the temperatures of the connections as found."
        ]
    )
    return torque_blockers(stage, as_found=True) + run + checklist_blockers(stage)


def skip_blockers(job) -> list[str]:
    """Why a return visit's build stages cannot be marked not needed (empty: they may):
    the re-check signed, and nothing found to put right and no new work (every end read
    as found within tolerance, none loose, none hot; nothing recorded at first install)."""
    stages = {s.kind: s for s in Stage.objects.filter(job=job)}
    recheck = stages.get(Stage.Kind.RECHECK)
    if recheck is None:
        return [f"Job {job.number} is not a return visit; its build stages are its work."]
    if recheck.state != Stage.State.SIGNED:
        return [
            f"The re-check is {recheck.get_state_display().lower()}; sign it before deciding"
            " that no build work is needed."
        ]
    messages = []
    found = current_readings(recheck)
    hot = {pk: r for pk, r in thermal_results(job, recheck=True).items() if r.blocks_retorque}
    terminations = (
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    for termination in terminations:
        record = found.get(termination.pk)
        if record is None:
            messages.append(f"{termination} has no as-found reading: it is new work.")
        elif record.found_loose or record.result == record.Result.LOW:
            messages.append(
                f"{termination} was found loose again ({record.value_display}); re-tighten it"
                " at first install."
            )
        elif not record.within_tolerance:
            messages.append(
                f"{termination} was found {record.get_result_display().lower()}"
                f" ({record.value_display}); put it right at first install."
            )
        elif termination.pk in hot:
            messages.append(
                f"{termination} was hot at the re-check run"
                f" ({format_number(hot[termination.pk].reading.temperature_c, 1)} °C); re-make it"
                " at first install."
            )
    first = stages.get(Stage.Kind.FIRST_INSTALL)
    if first is not None and first.torque_records.exists():
        messages.append("Readings are recorded at first install: the build work has begun.")
    later = [
        s for k, s in stages.items() if k in Stage.BUILD_KINDS and k != Stage.Kind.FIRST_INSTALL
    ]
    if any(s.state not in (Stage.State.NOT_STARTED, Stage.State.NOT_NEEDED) for s in later):
        messages.append("A later build stage has begun; the build work is under way.")
    return messages


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
        stage = stages.get(kind)
        if stage is None or stage.state == Stage.State.NOT_NEEDED:
            continue  # no re-check on a build job; a return visit's skipped build stage
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
    if stage.kind == Stage.Kind.RECHECK:
        return recheck_blockers(stage)
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
    "as_found_good",
    "install_blockers",
    "recheck_blockers",
    "retorque_blockers",
    "skip_blockers",
    "stage_blockers",
]
