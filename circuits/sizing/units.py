"""The project's single pint unit registry and the parsers built on it.

Every app imports ``ureg`` from here so that quantities made in one place can be
compared with quantities made in another (pint refuses to mix registries).

pint is used only at the edges: text or quantities come in, plain SI floats
(metres, newton-metres) go out, and the sizing loop never touches pint. Text is read by
the strict parser in ``quantity`` (a unit allow-list per kind, never an expression).
"""

from __future__ import annotations

import pint

from .errors import UnitError
from .quantity import from_number, parse_quantity, registry_unit
from .registry import Q_, ureg

__all__ = [
    "Q_",
    "UnitError",
    "parse_length",
    "parse_positive",
    "parse_torque",
    "torque_unit",
    "ureg",
]

# The registry itself is in registry.py (with why torque needs no new definitions); the
# ways a torque unit is written on a spec sheet or a wrench scale are listed in quantity.py.

# Kind -> (its SI unit as quantity.py names it, the pint dimension, the SI unit's name).
_SI = {
    "length": ("m", "[length]", "meter"),
    "torque": ("N·m", "[torque]", "newton * meter"),
    "current": ("A", "[current]", "ampere"),
    "voltage": ("V", "[electric_potential]", "volt"),
}
_KIND_OF = {dimension: kind for kind, (_, dimension, _) in _SI.items()}


def _from_quantity(value: pint.Quantity, kind: str, field: str | None, what: str) -> float:
    """A pint quantity made in code (never text), checked like typed input."""
    if getattr(value, "_REGISTRY", None) is not ureg:
        raise UnitError(f"the {what} was made with another unit registry; use this one")
    key = _SI[kind][0]
    target = registry_unit(kind, key)
    if value.dimensionality != ureg.get_dimensionality(_SI[kind][1]):
        raise UnitError(f"the {what} {value:~P} is not a {kind}")
    try:
        magnitude = float(value.to(target).magnitude)
    except (TypeError, ValueError) as exc:
        raise UnitError(f"the {what} {value:~P} is not a single number") from exc
    return from_number(magnitude, key, kind=kind, field=field, what=what).value


def _read(value: object, unit: str | None, kind: str, field: str | None, what: str) -> float:
    if isinstance(value, pint.Quantity):
        if unit is not None:
            raise UnitError(f"give the {what} either as a quantity or with a unit, not both")
        return _from_quantity(value, kind, field, what)
    if isinstance(value, str):
        return parse_quantity(value, kind=kind, default_unit=unit, what=what, field=field).value
    if unit is None and kind in ("length", "torque"):
        raise UnitError(f"the {what} {value!r} has no unit")
    return from_number(value, unit, kind=kind, field=field, what=what).value  # type: ignore[arg-type]


def parse_length(value: object, unit: str | None = None, *, field: str = "length") -> float:
    """Return a length in metres from ``"10 ft"``, ``"3 m"``, ``"120 in"``, a quantity,
    or a number with ``unit``.

    Raises ``UnitError`` when the text has no unit, the unit is not one of m, mm, cm, ft
    or in (or their spellings), or the length is outside ``LIMITS[field]`` (for a
    one-way length, 1 cm to 500 m).
    """
    return _read(value, unit, "length", field, "length")


def torque_unit(unit: str) -> str:
    """Return the pint expression for a torque unit as people write it
    (``"in-lb"`` -> ``"force_pound * inch"``; also ``"ft·lbf"``, ``"Nm"``, ``"kgf-cm"``).
    Raises ``UnitError`` for a unit not on the torque allow-list."""
    return str(registry_unit("torque", unit))


def parse_torque(value: object, unit: str | None = None) -> float:
    """Return a torque in newton-metres.

    ``value`` is text with its unit (``"25 lbf·in"``), a number with ``unit``
    (``parse_torque(25, "in-lb")``), or a pint quantity. Conversions are pint's exact
    definitions, which match NIST SP 811 Appendix B.9.
    """
    return _read(value, unit, "torque", None, "torque")


def parse_positive(value: object, unit: str, dimension: str, what: str) -> float:
    """Return ``value`` in ``unit``, the SI unit of ``dimension`` ("ampere" for
    "[current]", "volt" for "[electric_potential]"); text may carry any unit of the kind's
    allow-list, and a bare current or voltage is taken in A or V."""
    kind = _KIND_OF.get(dimension)
    if kind is None or _SI[kind][2] != unit:
        raise ValueError(f"parse_positive reads {', '.join(_KIND_OF)} in their SI unit only")
    return _read(value, None, kind, None, what)
