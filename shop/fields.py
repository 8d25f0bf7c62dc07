"""Record ids from a URL or a form, read strictly.

``str.isdigit`` accepts superscripts ("²") that ``int`` then refuses, and an id of 10**308
passes ``int`` but overflows SQLite's 64-bit integers (``OverflowError``, a 500). Ids are
ASCII digits within a signed 64-bit integer; anything else is no id at all.
"""

from __future__ import annotations

from django import forms
from django.core.exceptions import ValidationError
from django.db import models

__all__ = ["MAX_ID", "IdChoiceField", "IdMultipleChoiceField", "parse_id"]

MAX_ID = 2**63 - 1  # the largest value of a 64-bit id column (SQLite, PostgreSQL bigint)
_MAX_DIGITS = len(str(MAX_ID))


def parse_id(text: object) -> int | None:
    """The id in ``text`` (ASCII digits only, at most 2**63 - 1), else None."""
    if isinstance(text, int) and not isinstance(text, bool):
        return text if 0 <= text <= MAX_ID else None
    if not isinstance(text, str) or not 0 < len(text) <= _MAX_DIGITS:
        return None  # the length first: no work on a long text
    if not (text.isascii() and text.isdigit()):
        return None
    value = int(text)
    return value if value <= MAX_ID else None


def _integer_key(field: forms.ModelChoiceField) -> bool:
    """Whether the choices are looked up by an integer column (the usual id)."""
    opts = field.queryset.model._meta
    key = opts.get_field(field.to_field_name) if field.to_field_name else opts.pk
    return isinstance(key, (models.IntegerField, models.AutoField))


def _shown(value: object) -> str:
    text = str(value)
    return text if len(text) <= 20 else text[:20] + "…"


class IdChoiceField(forms.ModelChoiceField):
    """A ModelChoiceField that refuses a non-ASCII or out-of-range id with its usual
    "Select a valid choice" message instead of passing it to the database."""

    def to_python(self, value):
        if value in self.empty_values or isinstance(value, self.queryset.model):
            return super().to_python(value)
        if _integer_key(self) and parse_id(value) is None:
            raise ValidationError(
                self.error_messages["invalid_choice"],
                code="invalid_choice",
                params={"value": _shown(value)},
            )
        return super().to_python(value)


class IdMultipleChoiceField(forms.ModelMultipleChoiceField):
    """The same for several choices (checkboxes, multiple selects)."""

    def _check_values(self, value):
        if _integer_key(self):
            try:
                values = frozenset(value)
            except TypeError:
                values = frozenset()  # the parent says "Enter a list of values."
            for pk in values:
                if not isinstance(pk, self.queryset.model) and parse_id(pk) is None:
                    raise ValidationError(
                        self.error_messages["invalid_choice"],
                        code="invalid_choice",
                        params={"value": _shown(pk)},
                    )
        return super()._check_values(value)
