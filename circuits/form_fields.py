"""Form fields that read what people type through the strict parser and its ranges
(circuits.sizing.quantity via circuits.entry), for every form of the project."""

from __future__ import annotations

from django import forms

from circuits.entry import parse_entry
from circuits.sizing import LIMITS

__all__ = ["CountField", "QuantityField", "strict_field"]


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
