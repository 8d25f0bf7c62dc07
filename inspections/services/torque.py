"""Torque readings: record one, correct one. Each call checks everything, lists every
unmet condition in one ValidationError, and writes the record and its audit event in one
transaction. A reading is stored once per key the page made, however often it arrives."""

from __future__ import annotations

import datetime
from decimal import Decimal

from django.core.exceptions import ValidationError
from django.db import IntegrityError, transaction
from django.utils import timezone

from circuits.models import Termination
from inspections.models import AuditEvent, Stage, TorqueRecord, TorqueWrench
from inspections.services.common import (
    Errors,
    add_error,
    audit,
    check_photo,
    clean_client_key,
    clean_text,
    not_in_future,
    parse_decimal,
    parse_moment,
    raise_if,
    require_perm,
    shared_stage,
)
from inspections.services.queries import check_soak
from inspections.services.status import check_unlocked
from inspections.units import format_number, format_torque, from_nm, to_nm, torque_unit_code

RECORD_PERM = "inspections.add_torquerecord"
MIN_CORRECTION_REASON = 10
MAX_NOTE = 1000
# Comparisons in N·m after a unit conversion carry float rounding; a reading exactly on a
# tolerance or range limit must count as on it, not a hair outside.
_REL_EPS = 1e-9


def judge(value_nm: float, spec_nm: float, tolerance_pct: Decimal | float) -> str:
    """Within tolerance (limits included), low or high."""
    band = spec_nm * float(tolerance_pct) / 100.0
    slack = spec_nm * _REL_EPS
    if value_nm < spec_nm - band - slack:
        return TorqueRecord.Result.LOW
    if value_nm > spec_nm + band + slack:
        return TorqueRecord.Result.HIGH
    return TorqueRecord.Result.WITHIN


def _check_entry(value: object, unit: object, errors: Errors) -> tuple[Decimal | None, str | None]:
    number = parse_decimal(value, field="value", what="torque reading", places=3, errors=errors)
    if number is not None and number <= 0:
        add_error(errors, "value", f"A torque reading is greater than zero (got {number}).")
        number = None
    code = None
    try:
        code = torque_unit_code(unit)
    except ValidationError as exc:
        add_error(errors, "unit", exc)
    return number, code


def _check_wrench(
    wrench: TorqueWrench | None,
    *,
    on: datetime.date,
    value: Decimal | None,
    code: str | None,
    errors: Errors,
) -> None:
    if wrench is None:
        add_error(errors, "wrench", "Choose the wrench you used.")
        return
    if not wrench.in_service:
        add_error(errors, "wrench", f"Wrench {wrench.code} is out of service; use another.")
    overdue = wrench.days_overdue(on)
    if overdue:
        add_error(
            errors,
            "wrench",
            f"Wrench {wrench.code} was due for calibration on {wrench.calibration_due:%d %b %Y},"
            f" {overdue} day{'' if overdue == 1 else 's'} before this reading;"
            " use a calibrated wrench.",
        )
    if value is None or code is None:
        return
    value_nm = to_nm(value, code)
    low, high = wrench.range_nm()
    entered = format_torque(value, code)
    if value_nm < low * (1 - _REL_EPS):
        by = format_torque(from_nm(low - value_nm, code), code)
        add_error(
            errors,
            "value",
            f"{entered} is below the range of wrench {wrench.code} ({wrench.range_display})"
            f" by {by}; use a wrench that reads this low.",
        )
    elif value_nm > high * (1 + _REL_EPS):
        by = format_torque(from_nm(value_nm - high, code), code)
        add_error(
            errors,
            "value",
            f"{entered} is above the range of wrench {wrench.code} ({wrench.range_display})"
            f" by {by}; check the value, or use a wrench that reads this high.",
        )


def _check_stage(stage: Stage, *, found_loose: bool, errors: Errors) -> None:
    name = stage.get_kind_display().lower()
    if not stage.takes_torque_readings:
        add_error(
            errors,
            "stage",
            "Torque readings are taken at the re-check, at first install and at retorque,"
            f" not at {name}.",
        )
    elif not stage.accepts_work:
        if stage.state == Stage.State.SIGNED:
            why = " (a lead must send it back or reopen it first)"
        elif stage.kind == Stage.Kind.RETORQUE:
            why = " (it opens once a heat-cycle run is logged and the soak time has passed)"
        else:
            why = " (it opens when the stage before it is signed)"
        add_error(
            errors,
            "stage",
            f"The {name} stage is {stage.get_state_display().lower()}; readings are taken only"
            f" while it is open{why}.",
        )
    if found_loose and stage.kind not in (Stage.Kind.RETORQUE, Stage.Kind.RECHECK):
        add_error(
            errors,
            "found_loose",
            "'Found loose' is recorded at retorque only (and at a return visit's re-check),"
            " when a fastener turns before the wrench clicks.",
        )


def _check_as_found_once(termination: Termination, stage: Stage, errors: Errors) -> None:
    """At a re-check the reading is the connection as found. A second reading of the same
    end there would be a reading after re-tightening and would hide what was found: it is
    refused. A mistyped entry is put right by a correction (which keeps its time); the
    re-tightening is recorded at first install, which opens once the re-check is signed."""
    if stage.kind != Stage.Kind.RECHECK:
        return
    found = (
        TorqueRecord.objects.current()
        .filter(stage=stage, termination=termination)
        .order_by("recorded_at", "pk")
        .first()
    )
    if found is not None:
        add_error(
            errors,
            "termination",
            f"{termination} was already read as found at the re-check ({found.value_display},"
            f" {found.get_result_display().lower()}); it is read once there, before any"
            " re-tightening. Correct a wrong entry instead; re-tighten it at first install.",
        )


def _check_termination(termination: Termination, stage: Stage, errors: Errors) -> None:
    if termination.circuit.job_id != stage.job_id:
        add_error(
            errors,
            "termination",
            f"{termination} belongs to job {termination.circuit.job.number},"
            f" not to job {stage.job.number}.",
        )
    if termination.torque_value is None:
        add_error(
            errors,
            "termination",
            f"{termination} has no torque spec; give its terminal the device manual's value"
            " or add a shop default for its stud size before reading it.",
        )


def _snapshot(record: TorqueRecord) -> dict:
    return {
        "termination": str(record.termination),
        "value": format_number(record.value),
        "unit": record.unit,
        "value_nm": round(record.value_nm, 4),
        "spec": record.spec_display,
        "result": record.result,
        "wrench": record.wrench.code,
        "technician": record.technician.get_username(),
        "recorded_at": record.recorded_at.isoformat(),
        "found_loose": record.found_loose,
        "note": record.note,
    }


def _summary(record: TorqueRecord) -> str:
    loose = ", found loose" if record.found_loose else ""
    return (
        f"{record.termination}: {record.value_display} with {record.wrench.code},"
        f" {record.get_result_display().lower()} (spec {record.spec_display}){loose}"
    )


def _same_reading(stored: TorqueRecord, **given) -> bool:
    return all(getattr(stored, name) == value for name, value in given.items())


def _refuse_if_different(stored: TorqueRecord, given: dict) -> TorqueRecord:
    if not _same_reading(stored, **given):
        raise ValidationError(
            {
                "client_key": (
                    f"This entry's key was already used for another reading"
                    f" ({stored.value_display} on {stored.termination}); nothing was changed."
                    " Reload the page and enter the reading again."
                )
            }
        )
    return stored


def _resent(key: str, given: dict) -> TorqueRecord | None:
    """The record already stored under `key`, when this is a resend of the same reading;
    None when the key is new. A key reused for a different reading is refused."""
    stored = TorqueRecord.objects.filter(client_key=key).first()
    return None if stored is None else _refuse_if_different(stored, given)


def _insert_once(record: TorqueRecord) -> tuple[TorqueRecord, bool]:
    """Insert, relying on the unique client_key: when another request stored the same key
    first, its row comes back and nothing is written. The savepoint keeps the outer
    transaction usable after the constraint fires (PostgreSQL requires it)."""
    try:
        with transaction.atomic():
            record.save()
    except IntegrityError:
        stored = TorqueRecord.objects.filter(client_key=record.client_key).first()
        if stored is None:
            raise  # another constraint: not a resend
        return stored, False
    return record, True


def _spec_of(termination: Termination) -> dict:
    return {
        "spec_value": termination.torque_value,
        "spec_unit": termination.torque_unit,
        "spec_tolerance_pct": termination.torque_tolerance_pct,
        "spec_source": termination.torque_source,
        "spec_source_note": termination.torque_source_note,
        "spec_nm": to_nm(termination.torque_value, termination.torque_unit),
    }


def torque_record_create(
    *,
    termination: Termination,
    stage: Stage,
    value: object,
    unit: object,
    wrench: TorqueWrench | None,
    technician,
    found_loose: bool = False,
    note: str = "",
    client_key: object,
    photo=None,
    at: datetime.datetime | None = None,
) -> TorqueRecord:
    """Record one reading and judge it against the termination's spec (copied in).

    A resend with the same key and the same reading returns the stored record and writes
    nothing, even if the stage has been signed since; the same key with a different
    reading is refused."""
    require_perm(technician, RECORD_PERM, "Only technicians and leads record torque readings.")
    key = clean_client_key(client_key)
    found_loose = bool(found_loose)
    errors: Errors = {}
    number, code = _check_entry(value, unit, errors)
    moment = (
        timezone.now() if at is None else parse_moment(at, field="at", what="time", errors=errors)
    )
    if moment is not None:
        not_in_future(moment, field="at", what="reading's time", errors=errors)
    note = clean_text(note, field="note", what="note", limit=MAX_NOTE, errors=errors)
    # What does not depend on the stage's state is read and worked out before the write
    # transaction: on SQLite an IMMEDIATE transaction holds the database's one write lock
    # from its first statement, so the work done inside it is what caps how many readings
    # a second the shop stores. The stage (signed a moment ago?) and the lock are read
    # inside; the termination's spec and the wrench as they are at the moment of entry.
    termination = Termination.objects.select_related("circuit__job").get(pk=termination.pk)
    wrench = TorqueWrench.objects.filter(pk=getattr(wrench, "pk", None)).first()
    given = {
        "termination_id": termination.pk,
        "stage_id": stage.pk,
        "value": number,
        "unit": code,
        "wrench_id": getattr(wrench, "pk", None),
        "technician_id": technician.pk,
        "found_loose": found_loose,
        "supersedes_id": None,
    }
    # A resend of a stored reading is answered from the store, whatever has happened to
    # the stage since, and takes no write lock.
    stored = _resent(key, given)
    if stored is not None:
        return stored
    if moment is not None:
        _check_wrench(wrench, on=timezone.localdate(moment), value=number, code=code, errors=errors)
    photo = check_photo(photo, errors)
    spec = value_nm = None
    if termination.torque_value is not None:
        spec = _spec_of(termination)
        if number is not None and code is not None:
            value_nm = to_nm(number, code)
    with transaction.atomic():
        # On PostgreSQL the stage row is held in share mode: readings go in side by side,
        # and a signature of the same stage (an exclusive lock) cannot interleave with them.
        stage = shared_stage(stage.pk)
        _check_stage(stage, found_loose=found_loose, errors=errors)
        _check_termination(termination, stage, errors)
        _check_as_found_once(termination, stage, errors)
        check_unlocked(stage.job, errors)
        if moment is not None and stage.accepts_work:
            check_soak(stage, at=moment, errors=errors)
        raise_if(errors)
        record = TorqueRecord(
            termination=termination,
            stage=stage,
            value=number,
            unit=code,
            value_nm=value_nm,
            result=judge(value_nm, spec["spec_nm"], spec["spec_tolerance_pct"]),
            wrench=wrench,
            technician=technician,
            recorded_at=moment,
            found_loose=found_loose,
            note=note,
            photo=photo or "",
            client_key=key,
            **spec,
        )
        record, created = _insert_once(record)
        if not created:
            return _refuse_if_different(record, given)
        audit(
            job=stage.job,
            kind=AuditEvent.Kind.READING,
            actor=technician,
            summary=_summary(record),
            after=_snapshot(record),
            subject=record,
        )
    return record


def torque_record_correct(
    *,
    record: TorqueRecord,
    value: object,
    unit: object,
    wrench: TorqueWrench | None,
    technician,
    reason: str,
    client_key: object,
    found_loose: bool | None = None,
    note: str = "",
) -> TorqueRecord:
    """Put a wrongly entered reading right: a new record that supersedes `record`, keeps
    its time, its stage and the spec it was judged on, and says why. The old record stays
    as it was. `found_loose` None keeps the original's."""
    require_perm(technician, RECORD_PERM, "Only technicians and leads correct torque readings.")
    key = clean_client_key(client_key)
    errors: Errors = {}
    number, code = _check_entry(value, unit, errors)
    reason = str(reason or "").strip()
    if len(reason) < MIN_CORRECTION_REASON:
        add_error(
            errors,
            "reason",
            f"Say why the reading is corrected, in at least {MIN_CORRECTION_REASON} characters"
            " (e.g. 'typed 21 for 12').",
        )
    note = clean_text(note, field="note", what="note", limit=MAX_NOTE, errors=errors)
    with transaction.atomic():
        original = TorqueRecord.objects.select_related(
            "termination__circuit", "wrench", "technician"
        ).get(pk=record.pk)
        stage = shared_stage(original.stage_id)
        wrench = TorqueWrench.objects.filter(pk=getattr(wrench, "pk", None)).first()
        found_loose = original.found_loose if found_loose is None else bool(found_loose)
        given = {
            "termination_id": original.termination_id,
            "stage_id": stage.pk,
            "value": number,
            "unit": code,
            "wrench_id": getattr(wrench, "pk", None),
            "technician_id": technician.pk,
            "found_loose": found_loose,
            "supersedes_id": original.pk,
        }
        stored = _resent(key, given)
        if stored is not None:
            return stored
        later = TorqueRecord.objects.filter(supersedes=original).first()
        if later is not None:
            add_error(
                errors,
                "record",
                f"This reading was already corrected to {later.value_display}; correct that"
                " one instead.",
            )
        _check_stage(stage, found_loose=found_loose, errors=errors)
        check_unlocked(stage.job, errors)
        # The wrench is judged on the day the reading was taken, which the correction keeps.
        _check_wrench(
            wrench,
            on=timezone.localdate(original.recorded_at),
            value=number,
            code=code,
            errors=errors,
        )
        raise_if(errors)
        value_nm = to_nm(number, code)
        correction = TorqueRecord(
            termination=original.termination,
            stage=stage,
            value=number,
            unit=code,
            value_nm=value_nm,
            spec_value=original.spec_value,
            spec_unit=original.spec_unit,
            spec_tolerance_pct=original.spec_tolerance_pct,
            spec_source=original.spec_source,
            spec_source_note=original.spec_source_note,
            spec_nm=original.spec_nm,
            result=judge(value_nm, original.spec_nm, original.spec_tolerance_pct),
            wrench=wrench,
            technician=technician,
            recorded_at=original.recorded_at,
            found_loose=found_loose,
            note=note,
            supersedes=original,
            correction_reason=reason,
            client_key=key,
        )
        try:
            correction, created = _insert_once(correction)
        except IntegrityError as exc:
            # Another correction of the same record won the one-to-one index a moment ago.
            raise ValidationError(
                {"record": "This reading was corrected by someone else just now; reload it."}
            ) from exc
        if not created:
            return _refuse_if_different(correction, given)
        audit(
            job=stage.job,
            kind=AuditEvent.Kind.CORRECTION,
            actor=technician,
            summary=(
                f"{original.termination}: {original.value_display} corrected to"
                f" {correction.value_display} ({reason})"
            ),
            before=_snapshot(original),
            after={**_snapshot(correction), "reason": reason},
            subject=correction,
        )
    return correction


__all__ = ["judge", "torque_record_correct", "torque_record_create"]
