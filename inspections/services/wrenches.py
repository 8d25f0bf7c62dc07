"""The shop's torque wrenches: adding one and changing its range, unit or calibration due
date (office work).

No audit event: an AuditEvent belongs to a job, and a wrench is shop equipment, not job
evidence. What a wrench was when a reading was made is kept by the reading itself (its
value, unit and result are stored on the torque record), and a wrench that has readings
keeps its shop id and its unit: the id is what the record names, and a change of unit
would change what the range it was used in meant. A recalibration may move its range and
due date."""

from __future__ import annotations

import datetime
import re
from decimal import Decimal

from django.core.exceptions import ValidationError
from django.db import transaction
from django.utils import timezone

from inspections.models import TorqueRecord, TorqueWrench
from inspections.services.common import (
    Errors,
    add_error,
    clean_text,
    parse_decimal,
    raise_if,
    require_perm,
)
from inspections.units import format_number, torque_unit_code, unit_label

ADD_PERM = "inspections.add_torquewrench"
CHANGE_PERM = "inspections.change_torquewrench"

# As marked on the wrench: letters and digits, with dashes, dots, slashes or spaces between.
CODE = re.compile(r"^[A-Za-z0-9](?:[A-Za-z0-9 ._/-]*[A-Za-z0-9])?$")
MAX_CODE = 20
MAX_DESCRIPTION = 120
MAX_NOTES = 2000
# The model's DecimalField(max_digits=7, decimal_places=2): up to 99 999.99.
RANGE_LIMIT = Decimal("99999.99")
# A due date further out than this is a typo (calibration intervals are about a year;
# common practice), and one before this year-2000 floor is not a date anyone means.
MAX_DUE_AHEAD = datetime.timedelta(days=10 * 366)
MIN_DUE = datetime.date(2000, 1, 1)


def _clean_code(code: object, errors: Errors) -> str:
    text = clean_text(code, field="code", what="shop id", limit=MAX_CODE, errors=errors)
    if not text:
        add_error(errors, "code", "Give the shop id marked on the wrench, e.g. TW-03.")
    elif len(text) <= MAX_CODE and not CODE.match(text):
        add_error(
            errors,
            "code",
            "Write the shop id with letters and digits (dashes, dots, slashes or spaces"
            " between them), e.g. TW-03.",
        )
    return text


def _clean_range_end(value: object, *, field: str, what: str, errors: Errors) -> Decimal | None:
    number = parse_decimal(value, field=field, what=what, places=2, errors=errors)
    if number is None:
        return None
    if number <= 0:
        add_error(errors, field, f"The {what} must be above zero.")
        return None
    if number > RANGE_LIMIT:
        add_error(
            errors, field, f"The {what} {format_number(number, 2)} is far too large; check it."
        )
        return None
    return number


def _clean_due(value: object, errors: Errors) -> datetime.date | None:
    if isinstance(value, datetime.datetime):
        value = value.date()
    if isinstance(value, str) and value.strip():
        try:
            value = datetime.date.fromisoformat(value.strip())
        except ValueError:
            value = None
    if not isinstance(value, datetime.date):
        add_error(errors, "calibration_due", "Give the calibration due date, e.g. 2026-03-31.")
        return None
    latest = timezone.localdate() + MAX_DUE_AHEAD
    if value < MIN_DUE or value > latest:
        add_error(
            errors,
            "calibration_due",
            f"A calibration due on {value:%d %b %Y} is not a date a wrench is due on;"
            " check the year.",
        )
        return None
    return value


def wrench_save(
    *,
    wrench: TorqueWrench | None = None,
    code: object,
    description: object,
    range_min: object,
    range_max: object,
    unit: object,
    calibration_due: object,
    by,
    in_service: bool = True,
    notes: object = "",
) -> TorqueWrench:
    """Add a wrench (`wrench` None) or change one. Every unmet condition is listed in one
    ValidationError keyed by field; nothing is saved unless all pass."""
    if wrench is None:
        require_perm(by, ADD_PERM, "Only the office adds torque wrenches.")
    else:
        require_perm(by, CHANGE_PERM, "Only the office changes torque wrenches.")
    errors: Errors = {}
    code = _clean_code(code, errors)
    description = clean_text(
        description, field="description", what="description", limit=MAX_DESCRIPTION, errors=errors
    )
    low = _clean_range_end(range_min, field="range_min", what="start of the range", errors=errors)
    high = _clean_range_end(range_max, field="range_max", what="end of the range", errors=errors)
    if low is not None and high is not None and high <= low:
        add_error(
            errors,
            "range_max",
            f"The range must end above where it starts ({format_number(low, 2)}).",
        )
    try:
        unit_code = torque_unit_code(unit)
    except ValidationError as exc:
        unit_code = None
        add_error(errors, "unit", exc)
    due = _clean_due(calibration_due, errors)
    notes = clean_text(notes, field="notes", what="notes", limit=MAX_NOTES, errors=errors)
    with transaction.atomic():
        if wrench is not None:
            wrench = TorqueWrench.objects.select_for_update().get(pk=wrench.pk)
        clash = TorqueWrench.objects.filter(code__iexact=code)
        if wrench is not None:
            clash = clash.exclude(pk=wrench.pk)
        if code and clash.exists():
            add_error(errors, "code", f"Another wrench already has the shop id {clash[0].code}.")
        if wrench is not None and TorqueRecord.objects.filter(wrench=wrench).exists():
            if code and code != wrench.code:
                add_error(
                    errors,
                    "code",
                    f"{wrench.code} has torque readings that name it; it keeps its shop id."
                    " Add the renamed wrench as a new one and take this one out of service.",
                )
            if unit_code and unit_code != wrench.unit:
                add_error(
                    errors,
                    "unit",
                    f"{wrench.code} has torque readings made in its range in"
                    f" {unit_label(wrench.unit)}; it keeps that unit. Add a wrench that reads"
                    " in another unit as a new one.",
                )
        raise_if(errors)
        if wrench is None:
            wrench = TorqueWrench()
        wrench.code = code
        wrench.description = description
        wrench.range_min = low
        wrench.range_max = high
        wrench.unit = unit_code
        wrench.calibration_due = due
        wrench.in_service = bool(in_service)
        wrench.notes = notes
        wrench.full_clean()
        wrench.save()
    return wrench


__all__ = ["wrench_save"]
