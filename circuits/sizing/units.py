"""The project's single pint unit registry and the parsers built on it.

Every app imports ``ureg`` from here so that quantities made in one place can be
compared with quantities made in another (pint refuses to mix registries).

pint is used only at the edges: text or quantities come in, plain SI floats
(metres, newton-metres) go out, and the sizing loop never touches pint.
"""

from __future__ import annotations

import math
import re

import pint

from .errors import UnitError

__all__ = [
    "Q_",
    "UnitError",
    "parse_length",
    "parse_positive",
    "parse_torque",
    "torque_unit",
    "ureg",
]

ureg: pint.UnitRegistry = pint.UnitRegistry()
Q_ = ureg.Quantity

# pint's default definitions already give lbf, kgf (force_kilogram) and ozf
# (force_ounce) with the exact factors NIST SP 811 uses (lb = 0.45359237 kg,
# g0 = 9.80665 m/s^2, in = 0.0254 m), so torque needs no new definitions; the
# aliases below only translate the ways a torque unit is written on a spec sheet
# or a wrench scale into an expression pint reads.
_TORQUE_ALIASES: dict[str, str] = {
    "nm": "newton * meter",
    "n.m": "newton * meter",
    "n-m": "newton * meter",
    "n*m": "newton * meter",
    "newton metre": "newton * meter",
    "newton meter": "newton * meter",
    "lbf*in": "force_pound * inch",
    "lbf-in": "force_pound * inch",
    "lb-in": "force_pound * inch",
    "lb*in": "force_pound * inch",
    "in-lb": "force_pound * inch",
    "in-lbs": "force_pound * inch",
    "in-lbf": "force_pound * inch",
    "in*lbf": "force_pound * inch",
    "inch-pound": "force_pound * inch",
    "inch-pounds": "force_pound * inch",
    "lbf*ft": "force_pound * foot",
    "lbf-ft": "force_pound * foot",
    "lb-ft": "force_pound * foot",
    "lb*ft": "force_pound * foot",
    "ft-lb": "force_pound * foot",
    "ft-lbs": "force_pound * foot",
    "ft-lbf": "force_pound * foot",
    "ft*lbf": "force_pound * foot",
    "foot-pound": "force_pound * foot",
    "foot-pounds": "force_pound * foot",
    "kgf*cm": "force_kilogram * centimeter",
    "kgf-cm": "force_kilogram * centimeter",
    "kg-cm": "force_kilogram * centimeter",
    "kgf*m": "force_kilogram * meter",
    "kgf-m": "force_kilogram * meter",
    "ozf*in": "force_ounce * inch",
    "ozf-in": "force_ounce * inch",
    "oz-in": "force_ounce * inch",
    "in-oz": "force_ounce * inch",
}

_NUMBER_THEN_REST = re.compile(r"^\s*([-+]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$")


def _normalise_torque_unit(unit: str) -> str:
    key = unit.strip().lower().replace("·", "*").replace("⋅", "*").replace(" ", "")
    key = key.replace("lbs", "lb") if key not in _TORQUE_ALIASES else key
    return _TORQUE_ALIASES.get(key, unit.replace("·", "*").replace("⋅", "*"))


def _to_quantity(value: object, unit: str | None, what: str) -> pint.Quantity:
    """Turn text, a number plus unit, or a quantity into a quantity of this registry."""
    if isinstance(value, pint.Quantity):
        if unit is not None:
            raise UnitError(f"give the {what} either as a quantity or with a unit, not both")
        try:
            return Q_(value.magnitude, str(value.units))
        except (pint.PintError, ValueError) as exc:  # a quantity from another registry
            raise UnitError(f"cannot read the {what} unit {value.units!s}") from exc
    if isinstance(value, bool):
        raise UnitError(f"the {what} must be a number with a unit")
    if isinstance(value, (int, float)):
        if unit is None:
            raise UnitError(f"the {what} {value!r} has no unit")
        return Q_(float(value), unit)
    if not isinstance(value, str) or not value.strip():
        raise UnitError(f"the {what} is empty; write a number and a unit")
    text = value.strip()
    if unit is None:
        match = _NUMBER_THEN_REST.match(text)
        if match is None:
            raise UnitError(f"cannot read the {what} {text!r}; write a number and a unit")
        number, unit = match.group(1), match.group(2)
        if not unit:
            raise UnitError(f"the {what} {text!r} has no unit")
        return Q_(float(number), unit)
    try:
        return Q_(float(text), unit)
    except ValueError as exc:
        raise UnitError(f"the {what} {text!r} is not a number") from exc


def _magnitude_in(value: object, unit: str | None, target: str, dimension: str, what: str) -> float:
    try:
        quantity = _to_quantity(value, unit, what)
        if quantity.dimensionality != ureg.get_dimensionality(dimension):
            raise UnitError(
                f"the {what} {value!s}{' ' + unit if unit else ''} is not a {what}"
                f" (its unit is {quantity.units:~P})"
            )
        magnitude = float(quantity.to(target).magnitude)
    except UnitError:
        raise
    except (pint.PintError, ValueError, TypeError, AttributeError) as exc:
        raise UnitError(f"cannot read the {what} {value!s}: {exc}") from exc
    if not math.isfinite(magnitude) or magnitude <= 0.0:
        raise UnitError(f"the {what} must be greater than zero (got {value!s})")
    return magnitude


def parse_length(value: object, unit: str | None = None) -> float:
    """Return a length in metres from ``"10 ft"``, ``"3 m"``, ``"120 in"``, a quantity,
    or a number with ``unit``.

    Raises ``UnitError`` when the text has no unit, the unit is not a length, or the
    length is not greater than zero.
    """
    return _magnitude_in(value, unit, "meter", "[length]", "length")


def torque_unit(unit: str) -> str:
    """Return the pint expression for a torque unit as people write it
    (``"in-lb"``, ``"ft·lbf"``, ``"Nm"``, ``"kgf-cm"``...)."""
    return _normalise_torque_unit(unit)


def parse_torque(value: object, unit: str | None = None) -> float:
    """Return a torque in newton-metres.

    ``value`` is text with its unit (``"25 lbf·in"``), a number with ``unit``
    (``parse_torque(25, "in-lb")``), or a pint quantity. Conversions are pint's exact
    definitions, which match NIST SP 811 Appendix B.9.
    """
    if isinstance(value, str) and unit is None:
        match = _NUMBER_THEN_REST.match(value.strip())
        if match is not None and match.group(2):
            value, unit = match.group(1), match.group(2)
    if unit is not None:
        unit = _normalise_torque_unit(unit)
    return _magnitude_in(value, unit, "newton * meter", "[torque]", "torque")


def parse_positive(value: object, unit: str, dimension: str, what: str) -> float:
    """Return ``value`` in ``unit`` (any unit of ``dimension`` accepted on input)."""
    return _magnitude_in(value, None, unit, dimension, what)
