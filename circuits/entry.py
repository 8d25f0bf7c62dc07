"""Typed quantities at the Django boundary: the strict parser's ``UnitError`` becomes a
``ValidationError`` shown beside the field.

The reading itself is ``circuits.sizing.quantity`` (plain Python); this module holds what
forms and the CSV import share on top of it: the length entry that remembers the unit to
show back, and form fields that read numbers through the same parser and ranges.
"""

from __future__ import annotations

from decimal import Decimal

from django import forms
from django.core.exceptions import ValidationError

from circuits.sizing import LIMITS, Parsed, UnitError, parse_quantity
from circuits.sizing.quantity import check_limit, from_number

__all__ = [
    "CountField",
    "QuantityField",
    "as_validation_error",
    "check_entry",
    "number_entry",
    "parse_entry",
    "parse_length_entry",
    "strict_field",
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


class QuantityField(forms.DecimalField):
    """A number typed by a person, read by the strict parser: a unit of the kind's
    allow-list may be written ("20 A", "1.5 kA"), the value comes back as a Decimal in the
    SI unit, and ``LIMITS[field]`` bounds it. The model's digits and decimal places still
    apply (``max_digits``, ``decimal_places``)."""

    def __init__(
        self,
        *,
        kind: str,
        field: str,
        default_unit: str | None = None,
        what: str | None = None,
        **kwargs,
    ) -> None:
        self.kind, self.limit, self.default_unit = kind, field, default_unit
        self.what = what or LIMITS[field].what
        super().__init__(**kwargs)

    def to_python(self, value):
        if value in self.empty_values:
            return None
        parsed = parse_entry(
            str(value),
            kind=self.kind,
            field=self.limit,
            default_unit=self.default_unit,
            what=self.what,
        )
        return parsed.decimal


class CountField(forms.IntegerField):
    """A whole number read by the strict parser and bounded by ``LIMITS[field]``."""

    def __init__(self, *, field: str, what: str | None = None, **kwargs) -> None:
        self.limit = field
        self.what = what or LIMITS[field].what
        super().__init__(**kwargs)

    def to_python(self, value):
        if value in self.empty_values:
            return None
        limit = LIMITS[self.limit]
        parsed = parse_entry(str(value), kind=limit.kind, field=self.limit, what=self.what)
        return int(parsed.value)


def strict_field(
    form: forms.BaseForm,
    name: str,
    *,
    kind: str,
    field: str,
    default_unit: str | None = None,
    what: str | None = None,
) -> None:
    """Replace a ModelForm's number field with one read by the strict parser, keeping its
    label, help text, widget, required flag and (for decimals) digits."""
    old = form.fields[name]
    common = {
        "required": old.required,
        "label": old.label,
        "help_text": old.help_text,
        "widget": old.widget,
        "initial": old.initial,
        "what": what,
        "field": field,
    }
    if isinstance(old, forms.IntegerField) and not isinstance(old, forms.DecimalField):
        form.fields[name] = CountField(**common)
        return
    form.fields[name] = QuantityField(
        kind=kind,
        default_unit=default_unit,
        max_digits=old.max_digits,
        decimal_places=old.decimal_places,
        **common,
    )
