"""The physical range of every field that takes a typed quantity, and the check that
refuses a value outside it (read by the strict parser in ``quantity.py``, the forms, the
CSV import and the ``size`` command)."""

from __future__ import annotations

import math
from dataclasses import dataclass

from .errors import UnitError

__all__ = ["LIMITS", "Limit", "check_limit"]


@dataclass(frozen=True)
class Limit:
    """The range a field accepts, in the SI unit of its kind (m, N·m, A, V, °C, %)."""

    kind: str
    low: float
    high: float
    what: str  # how a message names the value: "one-way length"
    range: str  # the range in words, after "must be": "between 1 cm and 500 m (1640 ft)"
    low_open: bool = False  # True: the value must be strictly above `low`
    whole: bool = False  # True: a whole number only

    def admits(self, value: float) -> bool:
        above = value > self.low if self.low_open else value >= self.low
        return above and value <= self.high


# The physical range of each field. One table, so the forms, the CSV import and the size
# command refuse the same values. Where a circuit record stores the value, the range is
# the record's own (circuits.models validators), so a value the parser takes is one the
# record can keep.
LIMITS: dict[str, Limit] = {
    # Circuit.length_m: a vehicle or boat run longer than 500 m is a typing mistake.
    "length": Limit("length", 0.01, 500.0, "length", "between 1 cm and 500 m (1640 ft)"),
    # Along the conductor from the source; 0 is a fuse on the source terminal.
    "distance": Limit("length", 0.0, 500.0, "protection distance", "between 0 and 500 m"),
    # Circuit.design_current_a is kept to 0.01 A; 10 kA is beyond any DC or AC circuit
    # this tool sizes (the largest catalogue conductor carries far less).
    "current": Limit("current", 0.01, 10_000.0, "current", "between 0.01 A and 10 kA"),
    "protection": Limit("current", 0.1, 10_000.0, "protection rating", "between 0.1 A and 10 kA"),
    "input_current": Limit("current", 0.1, 10_000.0, "input current", "between 0.1 A and 10 kA"),
    # Low voltage ends at 1000 V AC (IEC 60038, from memory); the DC systems here are
    # 12 to 48 V, and a 1000 V DC ceiling leaves room for solar strings. Circuit.
    # nominal_voltage is at least 1 V. "voltage" is the widest of the two.
    "voltage": Limit("voltage", 1.0, 1000.0, "voltage", "between 1 V and 1000 V"),
    "dc_voltage": Limit("voltage", 1.0, 1000.0, "DC voltage", "between 1 V and 1000 V"),
    "ac_voltage": Limit("voltage", 1.0, 1000.0, "AC voltage", "between 1 V and 1000 V"),
    # A terminal stud up to M12 / 1/2" takes well under 200 N·m; 2000 N·m is far beyond
    # any electrical termination (common practice).
    "torque": Limit(
        "torque", 0.0, 2000.0, "torque", "between 0 and 2000 N·m (1475 lbf·ft)", low_open=True
    ),
    # A torque typed as a bare number in the unit chosen beside it (the record keeps
    # 7 digits, 2 after the point); the form then checks it against "torque" in N·m.
    "torque_number": Limit(
        "number", 0.0, 99_999.99, "torque", "between 0 and 99999.99", low_open=True
    ),
    # TorqueDefault.tolerance_pct and Termination.torque_tolerance_pct: 1 to 30 %.
    "tolerance": Limit("percent", 1.0, 30.0, "tolerance", "between 1 % and 30 %"),
    # The range with published correction values (circuits.sizing.inputs).
    "temperature": Limit("temperature", -50.0, 250.0, "temperature", "between -50 °C and 250 °C"),
    # Insulation ratings run 60 to 200 °C (33 CFR 183.425 Table 5); the engine then
    # accepts only the listed ones.
    "insulation": Limit(
        "temperature", 60.0, 200.0, "insulation rating", "between 60 °C and 200 °C", whole=True
    ),
    "drop": Limit(
        "percent", 0.0, 100.0, "voltage-drop limit", "between 0 % and 100 %", low_open=True
    ),
    # Circuit.bundled: 1 to 100.
    "bundled": Limit(
        "number", 1, 100, "number of bundled conductors", "at least 1 and at most 100", whole=True
    ),
    # Circuit.parallel keeps at most 8 (the engine alone would take 20).
    "parallel": Limit(
        "number", 1, 8, "number of parallel conductors", "at least 1 and at most 8", whole=True
    ),
    # A plain percentage or finite number, for callers with no field of their own.
    "percent": Limit("percent", 0.0, 100.0, "percentage", "between 0 % and 100 %"),
    "number": Limit("number", -1e9, 1e9, "number", "between -1e9 and 1e9"),
}


def check_limit(
    value: float,
    *,
    field: str | None = None,
    limit: Limit | None = None,
    what: str | None = None,
    shown: str | None = None,
) -> None:
    """Refuse ``value`` (SI) outside the field's range, saying why."""
    limit = limit or LIMITS[field or "number"]
    what = what or limit.what
    shown = shown if shown is not None else f"{value:g}"
    if not math.isfinite(value):
        raise UnitError(f"the {what} {shown} is not a finite number")
    if limit.whole and not value.is_integer():
        raise UnitError(f"the {what} must be a whole number, not {shown}")
    if limit.admits(value):
        return
    positive = limit.low_open or limit.low > 0
    if value <= 0 and positive and not limit.whole:
        raise UnitError(f"the {what} must be greater than zero, not {shown}")
    if value < 0 and limit.low == 0 and not limit.low_open:
        raise UnitError(f"the {what} cannot be negative ({shown})")
    raise UnitError(f"the {what} must be {limit.range}, not {shown}")
