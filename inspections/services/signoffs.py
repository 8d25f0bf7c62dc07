"""What a signature covers: `signoff_content(stage=...)` gathers it, content_hash
(inspections.models.signoffs, where the canonical serialisation is documented) hashes
it, and `signoff_is_current` tells whether it has changed since it was signed.

The content of each stage (every value a string, integer, boolean or null; times in UTC):

* first install: the job number and stage; every termination of the job (ids); every
  current torque record at the stage (id, termination, value and unit as entered, N·m,
  spec in N·m, result, found loose, wrench and whether it was calibrated on the day,
  technician, time, the record it corrects); every checklist item other than torque
  items with its basis and latest mark; and each blocking finding (code, subject, open
  or not, the waiver covering it and the facts it rests on), as the gate reads them.
* retorque: the same for the retorque stage (no findings: they were the first install's
  to clear), plus the heat-cycle run the soak counted from and the latest temperature of
  each connection read after it (class, whether it blocks, the waiver of it).
* heat-cycle run: the run and the temperatures (the stage is signed by logging its run).
* re-check (a return visit's): as the first install (terminations, torque as found,
  checklist), plus the re-check run and the temperatures read on it.
* handover (the lead's approval and the owner's receipt): the hash of the first install
  and retorque contents as they are now, the sign-offs in force for them, the run and the
  blocking findings. Approval and receipt hash the same content: a receipt whose hash
  equals the approval's shows the owner received exactly what was approved.

Names (of people, circuits, wrenches) are left out on purpose, ids kept: renaming an
account or a wrench does not change what was signed. A circuit's tag does appear, as the
basis of its labels item, because the labels must then be changed too.
"""

from __future__ import annotations

import datetime

from django.utils import timezone

from circuits.models import Termination
from circuits.system import job_system_report
from inspections.models import SignOff, Stage, content_hash
from inspections.services.checklists import checklist_items_for
from inspections.services.queries import (
    current_readings,
    latest_run,
    recheck_run,
    thermal_results,
)
from inspections.services.queries import thermal_waivers as waivers_of_readings

SCHEMA = 1
SLUGS = {
    Stage.Kind.RECHECK: "recheck",
    Stage.Kind.FIRST_INSTALL: "first_install",
    Stage.Kind.HEAT_CYCLE: "heat_cycle",
    Stage.Kind.RETORQUE: "retorque",
    Stage.Kind.HANDOVER: "handover",
}
STAGE_SIGNOFF_KINDS = {
    Stage.Kind.RECHECK: SignOff.Kind.RECHECK,
    Stage.Kind.FIRST_INSTALL: SignOff.Kind.FIRST_INSTALL,
    Stage.Kind.RETORQUE: SignOff.Kind.RETORQUE,
}


def when(moment: datetime.datetime | None) -> str | None:
    if moment is None:
        return None
    return moment.astimezone(datetime.UTC).isoformat(timespec="microseconds")


def _text(value) -> str | None:
    return None if value is None else str(value)


def _torque(stage: Stage) -> list[dict]:
    entries = []
    for record in sorted(current_readings(stage).values(), key=lambda r: r.termination_id):
        day = timezone.localdate(record.recorded_at)
        entries.append(
            {
                "id": record.pk,
                "termination": record.termination_id,
                "value": str(record.value),
                "unit": record.unit,
                "value_nm": f"{record.value_nm:.4f}",
                "spec_nm": f"{record.spec_nm:.4f}",
                "tolerance_pct": str(record.spec_tolerance_pct),
                "result": record.result,
                "found_loose": record.found_loose,
                "wrench": {
                    "id": record.wrench_id,
                    "calibrated": not record.wrench.days_overdue(day),
                },
                "technician": record.technician_id,
                "recorded_at": when(record.recorded_at),
                "supersedes": record.supersedes_id,
            }
        )
    return entries


def _checklist(stage: Stage) -> list[dict]:
    entries = []
    for item in checklist_items_for(stage=stage):
        if item.derived or (not item.generated and item.mark is None):
            # Torque items are covered by the records; a shop item nobody marked (added
            # after the stage was signed) is not part of what was signed.
            continue
        mark = item.mark
        entries.append(
            {
                "key": item.key,
                "basis": item.basis,
                "mark": None
                if mark is None
                else {
                    "id": mark.pk,
                    "result": mark.result,
                    "note": mark.note,
                    "text": mark.item_text,
                    "basis": mark.item_basis,
                    "by": mark.marked_by_id,
                    "at": when(mark.marked_at),
                    "photo": mark.photo.name if mark.photo else "",
                },
            }
        )
    return sorted(entries, key=lambda entry: entry["key"])


def _findings(job) -> list[dict]:
    entries = []
    for finding in job_system_report(job).all_findings:
        if finding.severity != "blocking":
            continue
        waiver = getattr(finding, "waiver", None)
        entries.append(
            {
                "code": finding.code,
                "subject": finding.subject,
                "open": finding.open_blocking,
                "waiver": None if finding.open_blocking or waiver is None else waiver.pk,
                "facts": getattr(finding, "facts_hash", ""),
            }
        )
    return sorted(entries, key=lambda e: (e["code"], e["subject"], e["facts"]))


def _run(job) -> dict | None:
    run = latest_run(job)
    if run is None:
        return None
    return {
        "id": run.pk,
        "started_at": when(run.started_at),
        "ended_at": when(run.ended_at),
        "peak_current_a": str(run.peak_current_a),
        "ambient_c": str(run.ambient_c),
        "logged_by": run.logged_by_id,
    }


def _recheck_run(job) -> dict | None:
    run = recheck_run(job)
    if run is None:
        return None
    return {
        "id": run.pk,
        "started_at": when(run.started_at),
        "ended_at": when(run.ended_at),
        "peak_current_a": str(run.peak_current_a),
        "ambient_c": str(run.ambient_c),
        "logged_by": run.logged_by_id,
    }


def _thermal(job, *, recheck: bool = False) -> list[dict]:
    waivers = waivers_of_readings(job)
    entries = []
    for termination_id, result in sorted(thermal_results(job, recheck=recheck).items()):
        waiver = waivers.get(result.reading.pk)
        entries.append(
            {
                "termination": termination_id,
                "reading": result.reading.pk,
                "run": result.reading.run_id,
                "temperature_c": str(result.reading.temperature_c),
                "class": result.thermal_class.name.lower(),
                "blocks": result.blocks_retorque,
                "waiver": None if waiver is None else waiver.pk,
            }
        )
    return entries


def signoff_in_force(stage: Stage) -> SignOff | None:
    """The latest sign-off of a signed stage; None while the stage is not signed (sent
    back, reopened, open): an earlier signature no longer stands for it."""
    if stage.state != Stage.State.SIGNED:
        return None
    return stage.signoffs.exclude(kind=SignOff.Kind.RECEIPT).order_by("-signed_at", "-pk").first()


def signoff_content(*, stage: Stage) -> dict:
    """Everything a signature on `stage` covers, as it stands now (the module docstring
    lists it). Pass it to content_hash for the hash."""
    job = stage.job
    content: dict = {"schema": SCHEMA, "job": job.number, "stage": SLUGS[stage.kind]}
    if stage.takes_torque_readings:
        terminations = Termination.objects.filter(circuit__job=job).order_by("pk")
        content["terminations"] = list(terminations.values_list("pk", flat=True))
        content["torque"] = _torque(stage)
        content["checklist"] = _checklist(stage)
    if stage.kind == Stage.Kind.FIRST_INSTALL:
        content["findings"] = _findings(job)
    if stage.kind == Stage.Kind.RECHECK:
        content["recheck_run"] = _recheck_run(job)
        content["thermal"] = _thermal(job, recheck=True)
    if stage.kind in (Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE, Stage.Kind.HANDOVER):
        content["heat_cycle"] = _run(job)
    if stage.kind in (Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE):
        content["thermal"] = _thermal(job)
    if stage.kind == Stage.Kind.HANDOVER:
        stages = {s.kind: s for s in Stage.objects.filter(job=job).select_related("job")}
        covered: dict = {}
        signed: dict = {}
        # Only the stages the job has (a build job has no re-check, so its content is
        # as it always was); a build stage marked not needed is named as such.
        not_needed = []
        for kind in STAGE_SIGNOFF_KINDS:
            if kind not in stages:
                continue
            if stages[kind].state == Stage.State.NOT_NEEDED:
                not_needed.append(SLUGS[kind])
            covered[SLUGS[kind]] = content_hash(signoff_content(stage=stages[kind]))
            in_force = signoff_in_force(stages[kind])
            signed[SLUGS[kind]] = (
                None
                if in_force is None
                else {"id": in_force.pk, "content_sha256": in_force.content_sha256}
            )
        content["stages"] = covered
        content["signoffs"] = signed
        if not_needed:
            content["not_needed"] = not_needed
        content["findings"] = _findings(job)
    return content


def signoff_is_current(signoff: SignOff) -> bool:
    """Whether what `signoff` covers is still as it was signed."""
    stage = Stage.objects.select_related("job").get(pk=signoff.stage_id)
    return content_hash(signoff_content(stage=stage)) == signoff.content_sha256


__all__ = ["signoff_content", "signoff_in_force", "signoff_is_current"]
