"""The return visit: a vehicle back for its yearly check, a fault or an add-on gets a new
job made from its last approved record, with the same devices, terminals, circuits and
terminations (specs kept), and the last record's final readings kept beside each end.

* `return_visit_create` books it from this shop's approved job (`Job.follows`);
  `prior_record_import` keeps the readings of another shop's record read by
  wiring.importing (`follows` empty). Either way the last record's facts are copied once
  into PriorRecord/PriorReading (append-only): they are what the re-check is read
  against, and later changes to the earlier job (a reopen) do not rewrite them.
* The re-check stage (open first) records each end as found, before any re-tightening
  (inspections.services.torque refuses a second reading there), and the re-check run's
  temperatures; its gate is inspections.services.gates.recheck_blockers.
* `build_stages_skip`: nothing found to put right and no new work, so the lead marks the
  build stages not needed with a reason and the job awaits approval on its re-check.

Waivers of the earlier job are not carried over: a waiver is a lead's decision about
that job's facts, and a return visit's lead decides again on what they see now.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation

from django.db import transaction
from django.utils.dateparse import parse_datetime

from circuits.models import Circuit, Device, Terminal, Termination
from circuits.services import circuit_create, termination_update
from inspections.models import AuditEvent, PriorReading, PriorRecord, SignOff, Stage, TorqueRecord
from inspections.services.common import (
    Errors,
    add_error,
    audit,
    clean_text,
    locked_stages,
    person,
    raise_if,
    require_perm,
)
from inspections.services.gates import skip_blockers
from inspections.services.queries import current_readings
from inspections.services.signing import REVIEW_PERM, set_state
from inspections.services.status import job_is_locked, job_status_sync, latest_signoff
from shop.models import Job, ShopProfile
from shop.services import job_create

BOOK_PERM = "shop.add_job"
MIN_REASON = 10
# Which pass of the earlier record is its final word on an end, last first.
FINAL_PASSES = (
    (Stage.Kind.RETORQUE, "retorque"),
    (Stage.Kind.FIRST_INSTALL, "first install"),
    (Stage.Kind.RECHECK, "re-check"),
)
# The system is copied field by field, every stored field but the keys that tie a row to
# its job, device, circuit or terminal (set by the copy), so a field added to the
# electrical system later comes over without a change here.
DEVICE_SKIP = {"id", "job"}
TERMINAL_SKIP = {"id", "device"}
CIRCUIT_SKIP = {"id", "job", "from_device", "to_device", "from_terminal", "to_terminal"}
TERMINATION_SKIP = {"id", "circuit", "terminal", "end", "polarity", "conductor_index"}


def _fields(model, skip: set[str]) -> list[str]:
    return [f.name for f in model._meta.concrete_fields if f.name not in skip]


def end_key(termination: Termination) -> tuple[str, str, str, int]:
    return (
        termination.circuit.tag,
        termination.end,
        termination.polarity,
        termination.conductor_index,
    )


def _label(termination: Termination) -> str:
    """As the record labels an end (wiring.render.evidence.termination_label)."""
    t = termination
    index = f" #{t.conductor_index}" if t.circuit.parallel > 1 else ""
    return f"{t.circuit.tag} {t.end} {t.get_polarity_display()}{index}"


@dataclass(frozen=True)
class FinalReading:
    record: TorqueRecord
    pass_name: str
    found_loose: bool


def final_readings(job) -> dict[int, FinalReading]:
    """termination id -> the job's final word on it: the current retorque reading (a
    correction in its place), else first install, else re-check; found loose when any
    current reading of that pass was."""
    stages = {s.kind: s for s in Stage.objects.filter(job=job)}
    final: dict[int, FinalReading] = {}
    for kind, name in FINAL_PASSES:
        stage = stages.get(kind)
        if stage is None or stage.state == Stage.State.NOT_NEEDED:
            continue
        loose = set(
            TorqueRecord.objects.current()
            .filter(stage=stage, found_loose=True)
            .values_list("termination_id", flat=True)
        )
        for pk, record in current_readings(stage).items():
            if pk not in final:
                final[pk] = FinalReading(record, name, pk in loose)
    return final


def _copy_system(source, target) -> None:
    """The earlier job's devices, terminals and circuits onto `target` (circuits through
    circuit_create, which makes one termination per conductor end), then each end's kind,
    stud size and torque spec as the earlier job had them (termination_update)."""
    devices: dict[int, Device] = {}
    terminals: dict[int, Terminal] = {}
    device_fields, terminal_fields = _fields(Device, DEVICE_SKIP), _fields(Terminal, TERMINAL_SKIP)
    for device in source.devices.prefetch_related("terminals").order_by("pk"):
        copy = Device(job=target, **{name: getattr(device, name) for name in device_fields})
        copy.full_clean()
        copy.save()
        devices[device.pk] = copy
        for terminal in device.terminals.all().order_by("pk"):
            new = Terminal(device=copy, **{n: getattr(terminal, n) for n in terminal_fields})
            new.full_clean()
            new.save()
            terminals[terminal.pk] = new
    fields = _fields(Circuit, CIRCUIT_SKIP)
    for circuit in source.circuits.order_by("pk"):
        circuit_create(
            job=target,
            from_device=devices[circuit.from_device_id],
            to_device=devices[circuit.to_device_id],
            from_terminal=terminals.get(circuit.from_terminal_id),
            to_terminal=terminals.get(circuit.to_terminal_id),
            **{name: getattr(circuit, name) for name in fields},
        )
    ends = Termination.objects.filter(circuit__job=source).select_related("circuit")
    earlier = {end_key(t): t for t in ends}
    for termination in Termination.objects.filter(circuit__job=target).select_related("circuit"):
        was = earlier.get(end_key(termination))
        if was is None:
            continue
        for name in _fields(Termination, TERMINATION_SKIP):
            setattr(termination, name, getattr(was, name))
        termination_update(termination=termination)


def _prior_from_job(source, target) -> PriorRecord:
    approval = latest_signoff(source, SignOff.Kind.APPROVAL)
    prior = PriorRecord.objects.create(
        job=target,
        source=PriorRecord.Source.THIS_SHOP,
        job_number=source.number,
        shop_name=ShopProfile.load().name,
        approved_at=approval.signed_at if approval else None,
        circuits=[{"tag": c.tag, "name": c.name} for c in source.circuits.order_by("tag")],
    )
    terminations = {
        t.pk: t for t in Termination.objects.filter(circuit__job=source).select_related("circuit")
    }
    PriorReading.objects.bulk_create(
        [
            PriorReading(
                record=prior,
                circuit_tag=t.circuit.tag,
                end=t.end,
                polarity=t.polarity,
                conductor_index=t.conductor_index,
                label=_label(t),
                pass_name=final.pass_name,
                value=final.record.value,
                unit=final.record.unit,
                value_nm=final.record.value_nm,
                spec_display=final.record.spec_display,
                result=final.record.result,
                found_loose=final.found_loose,
                wrench=final.record.wrench.code,
                technician=person(final.record.technician)[:120],
                recorded_at=final.record.recorded_at,
            )
            for pk, final in final_readings(source).items()
            if (t := terminations.get(pk)) is not None
        ]
    )
    return prior


def latest_approved(vehicle) -> Job | None:
    """The vehicle's job approved last (and not reopened since): the record a return
    visit starts from."""
    approved = [j for j in Job.objects.filter(vehicle=vehicle) if job_is_locked(j)]
    dated = [(latest_signoff(j, SignOff.Kind.APPROVAL), j) for j in approved]
    dated = [(s.signed_at, j.pk, j) for s, j in dated if s is not None]
    return max(dated)[2] if dated else None


def return_visit_create(
    *,
    job,
    by,
    title: str,
    description: str = "",
    booked_in_on: datetime.date | None = None,
    lead=None,
    technicians=(),
) -> Job:
    """A return visit for the vehicle of approved `job`: a new job (kind return visit,
    following `job`), its re-check stage open, the same system, and the last readings
    kept. Lead or office (who book work in). One transaction: all or nothing."""
    require_perm(by, BOOK_PERM, "Only a lead or the office books a return visit.")
    errors: Errors = {}
    title = clean_text(title, field="title", what="title", limit=160, errors=errors)
    if not title:
        add_error(errors, "title", "Give the return visit a title, e.g. 'Yearly re-check'.")
    description = clean_text(
        description, field="description", what="description", limit=4000, errors=errors
    )
    if not job_is_locked(job):
        add_error(
            errors,
            "job",
            f"Job {job.number} is not approved; a return visit starts from an approved record.",
        )
    else:
        latest = latest_approved(job.vehicle)
        if latest is not None and latest.pk != job.pk:
            add_error(
                errors,
                "job",
                f"Job {latest.number} is the vehicle's latest approved record; book the return"
                " visit from it.",
            )
    raise_if(errors)
    with transaction.atomic():
        fields = {
            "vehicle": job.vehicle,
            "title": title,
            "description": description,
            "kind": Job.Kind.RETURN_VISIT,
            "follows": job,
            "lead": lead if lead is not None else job.lead,
        }
        if booked_in_on is not None:
            fields["booked_in_on"] = booked_in_on
        visit = job_create(technicians=technicians or job.technicians.all(), **fields)
        _copy_system(job, visit)
        _prior_from_job(job, visit)
    return visit


# --- another shop's record --------------------------------------------------------------


def _decimal(value) -> Decimal | None:
    try:
        number = Decimal(str(value))
    except (InvalidOperation, ValueError, TypeError):
        return None
    return number if number.is_finite() and number > 0 else None


def _reading_row(prior: PriorRecord, termination: dict, reading: dict, pass_name: str):
    value = _decimal(reading.get("value"))
    if value is None:
        return None
    try:
        value_nm = float(reading.get("value_nm"))
    except (TypeError, ValueError):
        return None
    moment = parse_datetime(str(reading.get("recorded_at") or ""))
    return PriorReading(
        record=prior,
        circuit_tag=str(termination.get("circuit") or "")[:12],
        end=str(termination.get("end") or "")[:4],
        polarity=str(termination.get("polarity") or "")[:10],
        conductor_index=int(termination.get("conductor_index") or 1),
        label=str(termination.get("label") or "")[:80],
        pass_name=pass_name,
        value=value,
        unit=str(reading.get("unit") or "")[:10],
        value_nm=value_nm,
        spec_display=str(reading.get("spec_display") or "")[:60],
        result=str(reading.get("result") or "")[:6],
        found_loose=bool(reading.get("found_loose")),
        wrench=str(reading.get("wrench") or "")[:40],
        technician=str(reading.get("technician") or "")[:120],
        recorded_at=moment,
    )


def prior_record_import(*, job, record: dict) -> PriorRecord:
    """Keep the last readings of a record read from a PDF (schema.md: `terminations`
    and `torque_log` list the same ends in the same order) on return visit `job`. Call
    inside the import's transaction. A reading the record does not give in full is left
    out (the end then shows no last reading) rather than guessed."""
    source = record.get("job") or {}
    approval = record.get("approval") or {}
    prior = PriorRecord.objects.create(
        job=job,
        source=PriorRecord.Source.IMPORTED,
        job_number=str(source.get("number") or "?")[:40],
        shop_name=str((record.get("shop") or {}).get("name") or "")[:160],
        approved_at=parse_datetime(str(approval.get("signed_at") or "")),
        circuits=[
            {"tag": str(c.get("tag") or ""), "name": str(c.get("name") or "")}
            for c in record.get("circuits") or []
            if isinstance(c, dict)
        ],
    )
    ends = {str(t.get("label")): t for t in record.get("terminations") or [] if isinstance(t, dict)}
    rows, seen = [], set()
    for entry in record.get("torque_log") or []:
        if not isinstance(entry, dict):
            continue
        termination = ends.get(str(entry.get("termination")))
        if termination is None:
            continue
        for key, name in (("retorque", "retorque"), ("first_install", "first install")):
            reading = entry.get(key)
            if isinstance(reading, dict):
                row = _reading_row(prior, termination, reading, name)
                if row is not None and row.key not in seen:
                    seen.add(row.key)
                    rows.append(row)
                break
    # A return visit's own record whose build stages were not needed: its final word on
    # an end is the re-check's as-found reading (schema.md, `changes`).
    for entry in (record.get("changes") or {}).get("rows") or []:
        termination = ends.get(str(entry.get("termination"))) if isinstance(entry, dict) else None
        reading = entry.get("as_found") if termination is not None else None
        if isinstance(reading, dict):
            row = _reading_row(prior, termination, reading, "re-check")
            if row is not None and row.key not in seen:
                seen.add(row.key)
                rows.append(row)
    PriorReading.objects.bulk_create(rows)
    return prior


def last_readings(job) -> dict[int, PriorReading]:
    """termination id -> the last record's final reading of the same end (by circuit tag,
    end, polarity and conductor), for a return visit; empty for any other job."""
    prior = PriorRecord.objects.filter(job=job).first()
    if prior is None:
        return {}
    by_key = {reading.key: reading for reading in prior.readings.all()}
    found = {}
    for termination in Termination.objects.filter(circuit__job=job).select_related("circuit"):
        reading = by_key.get(end_key(termination))
        if reading is not None:
            found[termination.pk] = reading
    return found


# --- no build work ----------------------------------------------------------------------

SKIPPED = (Stage.Kind.FIRST_INSTALL, Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE)


def build_stages_skip(*, job, lead, reason: str) -> Stage:
    """A lead marks a return visit's first install, heat-cycle run and retorque not
    needed, saying why: the re-check is signed and found nothing to put right, and there
    is no new work (gates.skip_blockers). The handover opens for approval, which then
    rests on the re-check. Sending the re-check back sets them back to not started."""
    require_perm(lead, REVIEW_PERM, "Only a lead decides that no build work is needed.")
    errors: Errors = {}
    reason = clean_text(reason, field="reason", what="reason", limit=2000, errors=errors)
    if len(reason) < MIN_REASON:
        add_error(
            errors,
            "reason",
            f"Say why no build work is needed, in at least {MIN_REASON} characters: it stays"
            " in the record.",
        )
    with transaction.atomic():
        stages = locked_stages(job.pk)
        if job_is_locked(job):
            add_error(errors, "job", f"Job {job.number} is approved; nothing is left to decide.")
        else:
            for message in skip_blockers(job):
                add_error(errors, "job", message)
        raise_if(errors)
        for kind in SKIPPED:
            before = set_state(stages[kind], Stage.State.NOT_NEEDED)
            audit(
                job=job,
                kind=AuditEvent.Kind.STAGE_OPENED,
                actor=lead,
                summary=(
                    f"{stages[kind].get_kind_display()} marked not needed by {person(lead)}:"
                    f" {reason}"
                ),
                before={"state": before},
                after={"state": Stage.State.NOT_NEEDED, "reason": reason},
                subject=stages[kind],
            )
        handover = stages[Stage.Kind.HANDOVER]
        set_state(handover, Stage.State.OPEN, opened=True)
        audit(
            job=job,
            kind=AuditEvent.Kind.STAGE_OPENED,
            actor=lead,
            summary="Handover opened: the re-check found nothing to put right and no new work",
            before={"state": Stage.State.NOT_STARTED},
            after={"state": Stage.State.OPEN, "reason": reason},
            subject=handover,
        )
        job_status_sync(job=job)
    return handover


def skip_reason(job) -> str:
    """Why the lead marked the build stages not needed (for the record); empty if not."""
    event = (
        AuditEvent.objects.filter(job=job, kind=AuditEvent.Kind.STAGE_OPENED)
        .filter(after__state=Stage.State.NOT_NEEDED)
        .order_by("-at", "-pk")
        .first()
    )
    return (event.after or {}).get("reason", "") if event is not None else ""


def as_found_loose(record: TorqueRecord | None) -> bool:
    """Found loose again at a re-check: the fastener turned before the wrench clicked, or
    the as-found reading is below the spec's band."""
    return record is not None and (record.found_loose or record.result == record.Result.LOW)


__all__ = [
    "as_found_loose",
    "build_stages_skip",
    "final_readings",
    "last_readings",
    "prior_record_import",
    "return_visit_create",
    "skip_reason",
]
