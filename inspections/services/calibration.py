"""A wrench's calibrations: recording one, and what its history says about the readings
made with the wrench.

`wrench_calibration_record` appends a WrenchCalibration and, when it is the wrench's
newest, moves TorqueWrench.calibration_due to its next due date, in one transaction with
the wrench row locked. An older calibration typed in later (the history of a wrench the
shop had before Ampwright) is kept without moving the due date, since a later one
already set it.

No AuditEvent: an AuditEvent belongs to a job, and a wrench is shop equipment (see
inspections.services.wrenches). The calibration row is its own trail instead: who
recorded it and when are stored on it, and like the evidence it is never changed or
removed (the model refuses, and the triggers of migration 0008 refuse at the database);
a mistyped calibration is put right by recording the calibration again with a note."""

from __future__ import annotations

import datetime
from dataclasses import dataclass
from decimal import Decimal

from django.db import transaction
from django.utils import timezone

from inspections.models import TorqueRecord, TorqueWrench, WrenchCalibration
from inspections.services.common import (
    Errors,
    add_error,
    clean_text,
    parse_decimal,
    raise_if,
    require_perm,
)
from inspections.services.wrenches import CHANGE_PERM, MAX_DUE_AHEAD, MIN_DUE

MAX_DONE_BY = 120
MAX_CERTIFICATE = 60
MAX_NOTES = 2000
# Permissible deviation of a click-type (setting) hand torque wrench: ±4 % of the set
# value (ISO 6789-1:2017, types II classes A, D, G; ±6 % for some other classes and for
# small screwdrivers; from memory). A wrench found beyond this before adjustment casts
# doubt on the readings made with it since its previous calibration.
AS_FOUND_LIMIT_PCT = Decimal("4")


def _date(value: object, *, field: str, what: str, errors: Errors) -> datetime.date | None:
    if isinstance(value, datetime.datetime):
        value = value.date()
    if isinstance(value, str) and value.strip():
        try:
            value = datetime.date.fromisoformat(value.strip())
        except ValueError:
            value = None
    if not isinstance(value, datetime.date):
        add_error(errors, field, f"Give the {what} as a date, e.g. 2026-03-31.")
        return None
    return value


def _error_pct(value: object, errors: Errors) -> Decimal | None:
    if value is None or (isinstance(value, str) and not value.strip()):
        return None  # not stated on the certificate
    number = parse_decimal(
        value, field="as_found_error_pct", what="as-found error", places=1, errors=errors
    )
    if number is not None and not Decimal(-100) <= number <= Decimal(100):
        add_error(
            errors,
            "as_found_error_pct",
            "The as-found error is a percentage of the set value between -100 and 100.",
        )
        return None
    return number


def wrench_calibration_record(
    *,
    wrench: TorqueWrench,
    calibrated_on: object,
    due_on: object,
    done_by: object,
    by,
    certificate: object = "",
    as_found_error_pct: object = None,
    adjusted: bool = False,
    notes: object = "",
) -> WrenchCalibration:
    """Record one calibration of `wrench` (see the module docstring). Every unmet
    condition is listed in one ValidationError keyed by field; nothing is saved unless
    all pass."""
    require_perm(by, CHANGE_PERM, "Only the office records a wrench's calibration.")
    errors: Errors = {}
    today = timezone.localdate()
    done = _date(calibrated_on, field="calibrated_on", what="calibration date", errors=errors)
    if done is not None and done > today:
        add_error(errors, "calibrated_on", f"{done:%d %b %Y} is in the future.")
        done = None
    elif done is not None and done < MIN_DUE:
        add_error(errors, "calibrated_on", f"{done:%d %b %Y} is not a date to record; check it.")
        done = None
    due = _date(due_on, field="due_on", what="next due date", errors=errors)
    if done is not None and due is not None:
        if due <= done:
            add_error(errors, "due_on", "The next due date must come after the calibration.")
        elif due > done + MAX_DUE_AHEAD:
            add_error(
                errors,
                "due_on",
                f"A wrench due on {due:%d %b %Y}, ten years after its calibration, is a typo;"
                " check the year.",
            )
    who = clean_text(
        done_by, field="done_by", what="laboratory or person", limit=MAX_DONE_BY, errors=errors
    )
    if not who:
        add_error(errors, "done_by", "Say which laboratory or person calibrated the wrench.")
    certificate = clean_text(
        certificate,
        field="certificate",
        what="certificate number",
        limit=MAX_CERTIFICATE,
        errors=errors,
    )
    error_pct = _error_pct(as_found_error_pct, errors)
    notes = clean_text(notes, field="notes", what="notes", limit=MAX_NOTES, errors=errors)
    with transaction.atomic():
        wrench = TorqueWrench.objects.select_for_update().get(pk=wrench.pk)
        if (
            done is not None
            and WrenchCalibration.objects.filter(
                wrench=wrench, calibrated_on=done, certificate=certificate
            ).exists()
        ):
            add_error(
                errors,
                "calibrated_on",
                f"This calibration of {wrench.code} on {done:%d %b %Y} is already recorded.",
            )
        raise_if(errors)
        newest = WrenchCalibration.objects.filter(wrench=wrench).order_by("-calibrated_on").first()
        calibration = WrenchCalibration(
            wrench=wrench,
            calibrated_on=done,
            due_on=due,
            done_by=who,
            certificate=certificate,
            as_found_error_pct=error_pct,
            adjusted=bool(adjusted),
            notes=notes,
            recorded_by=by,
        )
        calibration.full_clean()
        calibration.save()
        if newest is None or done >= newest.calibrated_on:
            wrench.calibration_due = due
            wrench.save(update_fields=["calibration_due"])
    return calibration


@dataclass(frozen=True)
class CalibrationRow:
    calibration: WrenchCalibration
    beyond_limit: bool  # as found beyond AS_FOUND_LIMIT_PCT
    since: datetime.date | None  # the previous calibration, if recorded
    readings: int  # made with the wrench from `since` (or ever) up to this calibration


def calibration_history(wrench: TorqueWrench) -> list[CalibrationRow]:
    """The wrench's calibrations, newest first, each with the count of readings made
    with it since the calibration before (the readings its as-found error speaks for)."""
    calibrations = list(
        WrenchCalibration.objects.filter(wrench=wrench)
        .select_related("recorded_by")
        .order_by("calibrated_on", "pk")
    )
    rows = []
    previous: datetime.date | None = None
    readings = TorqueRecord.objects.filter(wrench=wrench)
    for calibration in calibrations:
        span = readings.filter(recorded_at__date__lte=calibration.calibrated_on)
        if previous is not None:
            span = span.filter(recorded_at__date__gt=previous)
        error = calibration.as_found_error_pct
        rows.append(
            CalibrationRow(
                calibration=calibration,
                beyond_limit=error is not None and abs(error) > AS_FOUND_LIMIT_PCT,
                since=previous,
                readings=span.count(),
            )
        )
        previous = calibration.calibrated_on
    rows.reverse()
    return rows


__all__ = [
    "AS_FOUND_LIMIT_PCT",
    "CalibrationRow",
    "calibration_history",
    "wrench_calibration_record",
]
