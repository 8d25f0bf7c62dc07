"""Typed quantities at the Django boundary: the strict parser's ``UnitError`` becomes a
``ValidationError`` shown beside the field.

The reading itself is ``circuits.sizing.quantity`` (plain Python); this module holds what
the forms, the CSV import and the other apps share on top of it, with no web form in it:
the length entry that remembers the unit to show back, and the ValidationError adapters.
The form fields built on these are in ``circuits.form_fields``.
"""

from __future__ import annotations

from decimal import Decimal

from django.core.exceptions import ValidationError

from circuits.sizing import Parsed, UnitError, parse_quantity
from circuits.sizing.quantity import check_limit, from_number

__all__ = [
    "as_validation_error",
    "check_entry",
    "number_entry",
    "parse_entry",
    "parse_length_entry",
]

# Units that make us show a length back in feet; every other length unit shows in metres.
_IMPERIAL = {"ft", "in"}


def as_validation_error(exc: UnitError) -> ValidationError:
    """The parser's message as a sentence: capital first letter, full stop."""
    message = str(exc)
    return ValidationError(message[:1].upper() + message[1:] + ".", code="invalid")


def parse_entry(
    text: str,
    *,
    kind: str,
    field: str | None = None,
    default_unit: str | None = None,
    what: str | None = None,
) -> Parsed:
    """``parse_quantity`` raising ``ValidationError``."""
    try:
        return parse_quantity(text, kind=kind, field=field, default_unit=default_unit, what=what)
    except UnitError as exc:
        raise as_validation_error(exc) from None


def number_entry(
    value: float | Decimal,
    unit: str | None,
    *,
    kind: str,
    field: str | None = None,
    what: str | None = None,
) -> Parsed:
    """``from_number`` (a number read by a form field plus a unit picked beside it)
    raising ``ValidationError``."""
    try:
        return from_number(value, unit, kind=kind, field=field, what=what)
    except UnitError as exc:
        raise as_validation_error(exc) from None


def check_entry(value: float, *, field: str, what: str | None = None, shown: str) -> None:
    """``check_limit`` raising ``ValidationError``."""
    try:
        check_limit(value, field=field, what=what, shown=shown)
    except UnitError as exc:
        raise as_validation_error(exc) from None


def parse_length_entry(
    text: str,
    default_unit: str | None,
    *,
    allow_zero: bool = False,
    what: str | None = None,
) -> tuple[float, str]:
    """Read a typed length: "10 ft", "3 m", "120 in", or a bare number in `default_unit`
    (None: a unit must be written).

    Returns (metres, unit to show it back in: "m" or "ft"). A one-way length must be
    1 cm to 500 m; with ``allow_zero`` (a protection distance) 0 to 500 m. Raises
    ValidationError with a message fit to show beside the field.
    """
    field = "distance" if allow_zero else "length"
    parsed = parse_entry(text, kind="length", field=field, default_unit=default_unit, what=what)
    if not parsed.typed:
        return parsed.value, default_unit or "m"
    return parsed.value, "ft" if parsed.unit in _IMPERIAL else "m"
