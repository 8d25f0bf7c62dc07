"""One strict parser for the quantities people type: lengths, torques, currents,
voltages, temperatures, percentages and counts.

Every form, the CSV import and the ``size`` command read typed numbers through
``parse_quantity`` so that a field refuses the same things everywhere, with a message fit
to show beside it. The text is never evaluated: pint sees a float multiplied by one of
the registry's own unit objects, picked by name from a short allow-list per kind, so
``10 m**(9**9**9)`` is an unknown unit, not an expression.

What is read, in one left-to-right pass (no regular expression, nothing that
backtracks), after the length limit has been checked and before anything else is done:

    spaces, an optional sign (+, -, U+2212), digits (ASCII or any Unicode decimal digit,
    category Nd, e.g. Arabic-Indic), one optional decimal point or comma, more digits,
    an optional exponent e±N with |N| <= 6, spaces, an optional unit, spaces.

Numerals that are not decimal digits (superscripts such as ², fractions such as ½,
Roman numerals) are refused, because ``str.isdigit`` accepts some of them but ``float``
and ``int`` do not. Every value must also be inside its field's range (``LIMITS``).
"""

from __future__ import annotations

import functools
import math
import unicodedata
from dataclasses import dataclass
from decimal import Decimal

from .errors import UnitError
from .limits import LIMITS, Limit, check_limit
from .registry import ureg

__all__ = [
    "KINDS",
    "LIMITS",
    "MAX_CHARS",
    "MAX_EXPONENT",
    "Limit",
    "Parsed",
    "check_limit",
    "from_number",
    "parse_quantity",
    "registry_unit",
    "unit_key",
    "units_of",
]

# Checked before any other work: nothing longer is a quantity a person typed.
MAX_CHARS = 40
# 1e6 mm is 1 km and 1e-6 is a micro-anything: a larger exponent is a typing mistake.
MAX_EXPONENT = 6

KINDS = ("length", "torque", "current", "voltage", "temperature", "percent", "number")

# Canonical unit (shown back, and named in messages) -> the spellings accepted for it,
# space-separated and written as _unit_key() leaves them: lower case, and any run of the
# separators · ⋅ ∙ * - . × or spaces as one "·" ("N-m", "N m", "N*m" are all "n·m").
_SPELLINGS: dict[str, dict[str, str]] = {
    "length": {
        "m": "m metre metres meter meters",
        "mm": "mm millimetre millimetres millimeter millimeters",
        "cm": "cm centimetre centimetres centimeter centimeters",
        "ft": "ft foot feet ' ′ ’",
        "in": "in inch inches \" ″ ” '' ′′ ’’",
    },
    "torque": {
        "N·m": "n·m nm newton·metre newton·metres newton·meter newton·meters",
        "lbf·in": "lbf·in lb·in lbs·in in·lb in·lbs in·lbf inch·pound inch·pounds pound·inch",
        "lbf·ft": "lbf·ft lb·ft lbs·ft ft·lb ft·lbs ft·lbf foot·pound foot·pounds pound·foot",
        "kgf·cm": "kgf·cm kg·cm kgfcm kgcm",
        "kgf·m": "kgf·m",
        "ozf·in": "ozf·in oz·in in·oz in·ozf",
    },
    "current": {
        "A": "a amp amps ampere amperes",
        "mA": "ma milliamp milliamps milliampere milliamperes",
        "kA": "ka kiloamp kiloamps kiloampere kiloamperes",
    },
    "voltage": {
        "V": "v volt volts vdc vac v·dc v·ac",
        "mV": "mv millivolt millivolts",
        "kV": "kv kilovolt kilovolts",
    },
    "temperature": {
        # A bare degree sign is Celsius: every temperature in this app is in °C.
        "°C": "°c ºc ℃ c degc deg·c degrees·c celsius ° º",
        "°F": "°f ºf ℉ f degf deg·f degrees·f fahrenheit",
    },
    "percent": {"%": "% pct percent per·cent"},
    "number": {},
}
# The unit of a bare number when the caller gives no default (None: a unit is needed),
# and an example for messages.
_BARE_UNIT = {"current": "A", "voltage": "V", "temperature": "°C", "percent": "%"}
_EXAMPLE = {
    "length": "3 m or 10 ft",
    "torque": "12 N·m or 25 lbf·in",
    "current": "20 A",
    "voltage": "12 V",
    "temperature": "90 °C",
    "percent": "10 %",
    "number": "4",
}
_SI_KEY = {"length": "m", "torque": "N·m", "current": "A", "voltage": "V", "temperature": "°C"}
_SEPARATORS = frozenset("·⋅∙*-.×")
_MINUS = "-\u2212"


@dataclass(frozen=True)
class _Unit:
    key: str  # canonical: "ft", "N·m"
    unit: object  # the registry's unit object (None for percent and plain numbers)
    si: bool  # the kind's own SI unit: the typed digits are the SI value


@dataclass(frozen=True)
class Parsed:
    """A quantity as read: ``value`` in SI (m, N·m, A, V, °C, %, or the plain number),
    ``magnitude`` and ``number`` as typed (ASCII digits), ``unit`` the canonical key of
    the unit typed or defaulted ("" for a plain number), ``typed`` whether a unit was
    written."""

    value: float
    magnitude: float
    number: str
    unit: str
    typed: bool
    si: bool  # value == magnitude: the number was in the SI unit

    @property
    def decimal(self) -> Decimal:
        """The SI value as a Decimal: the typed digits when they were in the SI unit (so
        "7.5" stays exactly 7.5), else the converted float to 12 significant figures."""
        value = Decimal(self.number) if self.si else Decimal(f"{self.value:.12g}")
        if value == value.to_integral_value():
            value = value.quantize(Decimal(1))  # "1e1" is 10, "12.0" is 12
        return value + 0  # normalise -0 to 0


def units_of(kind: str) -> str:
    """The canonical units of a kind in words: "m, mm, cm, ft or in"."""
    keys = list(_SPELLINGS[kind])
    return keys[0] if len(keys) == 1 else ", ".join(keys[:-1]) + " or " + keys[-1]


@functools.cache
def _tables() -> dict[str, dict[str, _Unit]]:
    # Built on first use: the unit objects of the project's one registry (pint refuses
    # to mix registries).
    objects = {
        "m": ureg.meter,
        "mm": ureg.millimeter,
        "cm": ureg.centimeter,
        "ft": ureg.foot,
        "in": ureg.inch,
        "N·m": ureg.newton * ureg.meter,
        "lbf·in": ureg.force_pound * ureg.inch,
        "lbf·ft": ureg.force_pound * ureg.foot,
        "kgf·cm": ureg.force_kilogram * ureg.centimeter,
        "kgf·m": ureg.force_kilogram * ureg.meter,
        "ozf·in": ureg.force_ounce * ureg.inch,
        "A": ureg.ampere,
        "mA": ureg.milliampere,
        "kA": ureg.kiloampere,
        "V": ureg.volt,
        "mV": ureg.millivolt,
        "kV": ureg.kilovolt,
        "°C": ureg.degC,
        "°F": ureg.degF,
        "%": None,
    }
    si_keys = {*_SI_KEY.values(), "%"}
    tables: dict[str, dict[str, _Unit]] = {}
    seen: dict[str, str] = {}
    for kind, units in _SPELLINGS.items():
        table = tables[kind] = {}
        for key, spellings in units.items():
            spec = _Unit(key, objects[key], key in si_keys)
            for spelling in (_unit_key(key), *spellings.split()):
                # One spelling, one kind: "is a length, not a torque" relies on it.
                if seen.setdefault(spelling, kind) != kind:
                    raise AssertionError(f"{spelling!r} is spelt for two kinds")
                table[spelling] = spec
    return tables


def _unit_key(text: str) -> str:
    """Lower case, each run of separators or spaces as one "·", none at either end."""
    out: list[str] = []
    for ch in text.lower():
        if ch in _SEPARATORS or ch.isspace():
            if out and out[-1] != "·":
                out.append("·")
        else:
            out.append(ch)
    return "".join(out).strip("·")


def _digit(ch: str) -> str | None:
    """The ASCII digit for a decimal digit of any script, else None."""
    if "0" <= ch <= "9":
        return ch
    if ch > "\x7f" and unicodedata.category(ch) == "Nd":
        return str(unicodedata.decimal(ch))
    return None


def _digits(text: str, i: int) -> tuple[list[str], int]:
    """The run of decimal digits from position i (as ASCII), and where it ends."""
    out: list[str] = []
    while i < len(text) and (d := _digit(text[i])) is not None:
        out.append(d)
        i += 1
    return out, i


def _limit(kind: str, field: str | None) -> Limit:
    if kind not in _SPELLINGS:
        raise ValueError(f"unknown kind of quantity {kind!r}; use one of {', '.join(KINDS)}")
    limit = LIMITS[field or kind]
    if limit.kind != kind:
        raise ValueError(f"the field {field!r} holds a {limit.kind}, not a {kind}")
    return limit


def _needs(kind: str) -> str:
    if kind == "number":
        return "a number"
    if _BARE_UNIT.get(kind) is None:
        return f"a number and a unit, e.g. {_EXAMPLE[kind]}"
    return f"a number, e.g. {_EXAMPLE[kind]}"


def unit_key(kind: str, text: str) -> str:
    """The canonical key ("lbf·in") of a unit written as people write it ("in-lbs")."""
    return _lookup(kind, text, kind, text).key


def registry_unit(kind: str, text: str) -> object:
    """The registry's unit object for a unit written as people write it."""
    return _lookup(kind, text, kind, text).unit


def _lookup(kind: str, text: str, what: str, shown: str) -> _Unit:
    tables = _tables()
    if kind == "number":
        raise UnitError(f"the {what} {shown} should be a plain number, without a unit")
    key = _unit_key(text)
    # "MA" and "MV" would be mega-: refused rather than read as milli-.
    spec = None if text.strip() in ("MA", "MV") else tables[kind].get(key)
    if spec is not None:
        return spec
    for other, table in tables.items():
        if other != kind and key in table and other not in ("percent", "number"):
            raise UnitError(
                f"the {what} {shown} is a {other}, not a {kind}; write {units_of(kind)}"
            )
    raise UnitError(f"the {what} {shown} has a unit we do not read; write {units_of(kind)}")


def _default(kind: str, default_unit: str | None, what: str, shown: str) -> _Unit | None:
    if kind == "number":
        return None
    unit = default_unit or _BARE_UNIT.get(kind)
    if unit is None:
        raise UnitError(
            f"the {what} {shown} has no unit; write it with one of {units_of(kind)}, "
            f"e.g. {_EXAMPLE[kind]}"
        )
    return _lookup(kind, unit, what, unit)


def _scan(text: str, what: str, kind: str) -> tuple[str, str]:
    """Split stripped text into (ASCII number, unit text) in one pass, or refuse it."""
    for ch in text:
        if ch > "\x7f" and unicodedata.category(ch) in ("No", "Nl"):
            raise UnitError(
                f"the {what} {text} contains {ch}, which is not a digit we read; write plain digits"
            )
    unreadable = UnitError(f"cannot read the {what} {text!r}; write {_needs(kind)}")
    i = 1 if text[0] in "+" + _MINUS else 0
    whole, i = _digits(text, i)
    fraction: list[str] = []
    if i < len(text) and text[i] in ".,":  # a decimal comma as typed on many tablets
        fraction, i = _digits(text, i + 1)
        fraction.insert(0, ".")
    if not whole and len(fraction) < 2:
        if text.lstrip("+" + _MINUS).lower() in ("nan", "inf", "infinity"):
            raise UnitError(f"the {what} {text} is not a finite number; write {_needs(kind)}")
        raise unreadable
    out = ["-" if text[0] in _MINUS else "", *whole, *fraction]
    if i < len(text) and text[i] in "eE":
        j = i + 1
        sign = "-" if j < len(text) and text[j] in _MINUS else ""
        j += 1 if j < len(text) and text[j] in "+" + _MINUS else 0
        exponent, j = _digits(text, j)
        if exponent:  # else the "e" starts the unit (and is refused there)
            if int("".join(exponent)) > MAX_EXPONENT:
                raise UnitError(
                    f"the {what} {text} has an exponent beyond e±{MAX_EXPONENT}; "
                    "write the number out"
                )
            out.append(f"e{sign}{''.join(exponent)}")
            i = j
    rest = text[i:].strip()
    if rest and (rest[0] in ".,+" + _MINUS or _digit(rest[0]) is not None):
        raise unreadable  # "1.2.3", "1,5,0", "3 4 m"
    return "".join(out), rest


def parse_quantity(
    text: str,
    *,
    kind: str,
    default_unit: str | None = None,
    what: str | None = None,
    field: str | None = None,
) -> Parsed:
    """Read a quantity a person typed: "10 ft", "3,5 m", "25 lbf·in", "20", "١٠ m".

    ``kind`` is one of ``KINDS``; ``field`` names the range in ``LIMITS`` (default: the
    one named after the kind); ``default_unit`` is the unit of a bare number (lengths and
    torques need one or a typed unit; currents default to A, voltages to V, temperatures
    to °C); ``what`` names the value in messages. Raises ``UnitError`` with a message fit
    to show beside the field.
    """
    limit = _limit(kind, field)
    what = what or limit.what
    if not isinstance(text, str):
        raise UnitError(f"the {what} must be written as text, not {type(text).__name__}")
    # First, before any other work: a long text costs nothing more than this check.
    if len(text) > MAX_CHARS:
        raise UnitError(
            f"the {what} is {len(text)} characters long; write at most {MAX_CHARS}, "
            f"e.g. {_EXAMPLE[kind]}"
        )
    shown = text.strip()
    if not shown:
        raise UnitError(f"the {what} is empty; write {_needs(kind)}")
    number, rest = _scan(shown, what, kind)
    spec = _lookup(kind, rest, what, shown) if rest else _default(kind, default_unit, what, shown)
    return _finish(float(number), number, spec, bool(rest), limit, what, shown)


def from_number(
    value: float | int | Decimal,
    unit: str | None,
    *,
    kind: str,
    what: str | None = None,
    field: str | None = None,
) -> Parsed:
    """The same checks for a number already read and a unit named as people write it
    (``from_number(25, "in-lb", kind="torque")``)."""
    limit = _limit(kind, field)
    what = what or limit.what
    if isinstance(value, bool) or not isinstance(value, (int, float, Decimal)):
        raise UnitError(f"the {what} must be a number, not {type(value).__name__}")
    try:
        magnitude = float(value)
    except OverflowError:  # an int beyond any float
        magnitude = math.inf
    if not math.isfinite(magnitude):
        raise UnitError(f"the {what} is not a finite number; write {_needs(kind)}")
    number = format(Decimal(repr(value)) if isinstance(value, float) else Decimal(value), "f")
    shown = number if len(number) <= MAX_CHARS else f"{magnitude:g}"
    spec = _default(kind, unit, what, shown)
    if spec is not None:
        shown = f"{shown} {spec.key}"
    return _finish(magnitude, number, spec, False, limit, what, shown)


def _finish(
    magnitude: float,
    number: str,
    spec: _Unit | None,
    typed: bool,
    limit: Limit,
    what: str,
    shown: str,
) -> Parsed:
    value = _to_si(magnitude, spec, limit.kind)
    check_limit(value, limit=limit, what=what, shown=shown)
    return Parsed(
        value=value,
        magnitude=magnitude,
        number=number,
        unit=spec.key if spec is not None else "",
        typed=typed,
        si=spec is None or spec.si,
    )


def _to_si(magnitude: float, spec: _Unit | None, kind: str) -> float:
    if spec is None or spec.unit is None:
        return magnitude
    target = _tables()[kind][_unit_key(_SI_KEY[kind])].unit
    if kind == "temperature":
        # Offset units cannot be multiplied (pint refuses 10 * degC); a Quantity built from
        # the number and the unit object still never reads the text.
        return float(ureg.Quantity(magnitude, spec.unit).to(target).magnitude)
    return float((magnitude * spec.unit).to(target).magnitude)
