"""Torque units at the edge of the inspections app: the unit codes a reading is entered
in, conversion to newton-metres through the project's one pint registry
(circuits.sizing.units), and errors turned into ValidationError for the pages.

The shop records in the four units a torque wrench scale carries: N·m, lbf·in, lbf·ft and
kgf·cm (circuits.models.TorqueUnit). The stored code ("lbf*in") is what forms post; the
label ("lbf·in") is what people read and what is handed to pint.
"""

from __future__ import annotations

from decimal import Decimal

from django.core.exceptions import ValidationError

from circuits.models import TorqueUnit
from circuits.sizing.units import UnitError, parse_torque

UNIT_CHOICES_TEXT = ", ".join(label for _, label in TorqueUnit.choices[:-1]) + (
    f" or {TorqueUnit.choices[-1][1]}"
)


def torque_unit_code(unit: object) -> str:
    """The stored code of a torque unit given as its code ("lbf*in") or its label
    ("lbf·in"). Anything else is refused with a message saying why: a unit that is not
    a torque, one pint does not know, or a torque unit this shop does not record in."""
    text = str(unit or "").strip()
    if not text:
        raise ValidationError("Choose the unit the wrench reads in.")
    for code, label in TorqueUnit.choices:
        if text in (code, label):
            return code
    try:
        parse_torque(1.0, text)
    except UnitError as exc:
        raise ValidationError(
            f"{text!r} is not a torque unit this shop records in ({exc}); use {UNIT_CHOICES_TEXT}."
        ) from exc
    raise ValidationError(
        f"{text} is a torque unit, but readings are recorded in {UNIT_CHOICES_TEXT}."
    )


def unit_label(code: str) -> str:
    return TorqueUnit(code).label


def to_nm(value: Decimal | float, code: str) -> float:
    """A torque in newton-metres; `code` must be a TorqueUnit code."""
    try:
        return parse_torque(float(value), unit_label(code))
    except UnitError as exc:
        raise ValidationError(f"Cannot convert {value} {unit_label(code)}: {exc}.") from exc


def nm_per_unit(code: str) -> float:
    """How many N·m one `code` is (1 lbf·in = 0.112 984 8 N·m)."""
    return to_nm(1.0, code)


def from_nm(value_nm: float, code: str) -> float:
    return value_nm / nm_per_unit(code)


def format_number(value: Decimal | float, places: int = 3) -> str:
    """A number without trailing zeros: 12.5, 12, 0.113."""
    text = f"{round(float(value), places):.{places}f}".rstrip("0").rstrip(".")
    return text if text not in ("", "-0") else "0"


def format_torque(value: Decimal | float, code: str, places: int = 3) -> str:
    return f"{format_number(value, places)} {unit_label(code)}"
