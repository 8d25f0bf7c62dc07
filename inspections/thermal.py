"""Thermal classification of connections after the heat-cycle run. Plain Python, no
Django: temperatures in, classes out.

Criteria: the temperature-rise table of the thermographic survey section of the ANSI/NETA
Maintenance Testing Specifications (the "suggested actions based on temperature rise"
table). Edition not confirmed here: the values are `from memory`, as given in issue 8:

    over similar components under similar load   over ambient air   class
    1–3 °C                                        1–10 °C            possible deficiency
    4–15 °C                                       11–20 °C           probable deficiency
    —                                             21–40 °C           monitor until corrected
    above 15 °C                                   above 40 °C        major discrepancy

The table gives whole degrees; readings come in tenths, so each band here runs up to and
including its upper bound and the next band starts just above it (10.5 °C over ambient is
probable, not possible): a reading between two bands takes the worse one. A rise under
1 °C is no deficiency. Of the two comparisons the worse class wins.
"""

from __future__ import annotations

import enum
import statistics
from collections.abc import Hashable, Iterable, Sequence
from dataclasses import dataclass


class ThermalClass(enum.IntEnum):
    """Ordered by severity, so max() is the worse class."""

    NONE = 0
    POSSIBLE = 1
    PROBABLE = 2
    MONITOR = 3
    MAJOR = 4

    @property
    def label(self) -> str:
        return _LABELS[self]

    @property
    def blocks_retorque(self) -> bool:
        """Probable deficiency or worse keeps the retorque stage from signing until the
        connection is re-made and read again, or a lead waives it."""
        return self >= ThermalClass.PROBABLE


_LABELS = {
    ThermalClass.NONE: "No deficiency",
    ThermalClass.POSSIBLE: "Possible deficiency: investigate",
    ThermalClass.PROBABLE: "Probable deficiency: repair",
    ThermalClass.MONITOR: "Monitor until corrected",
    ThermalClass.MAJOR: "Major discrepancy: repair at once",
}

# (upper bound of the band in °C, class), ascending; above the last bound: MAJOR.
# ANSI/NETA MTS thermographic survey table, `from memory` (see the module docstring).
OVER_AMBIENT_BANDS: tuple[tuple[float, ThermalClass], ...] = (
    (10.0, ThermalClass.POSSIBLE),
    (20.0, ThermalClass.PROBABLE),
    (40.0, ThermalClass.MONITOR),
)
OVER_SIMILAR_BANDS: tuple[tuple[float, ThermalClass], ...] = (
    (3.0, ThermalClass.POSSIBLE),
    (15.0, ThermalClass.PROBABLE),
)
# The table starts at 1 °C: a smaller rise is within what an IR thermometer resolves.
NO_DEFICIENCY_BELOW_C = 1.0

# Which connections count as "similar under similar load": other connections on the same
# device (or bus) whose circuits' design currents are within this ratio of each other.
# Our choice, not a standard's: the table asks for similar loading and gives no figure.
SIMILAR_LOAD_RATIO = 2.0


def _classify_rise(rise_c: float, bands: Sequence[tuple[float, ThermalClass]]) -> ThermalClass:
    if rise_c < NO_DEFICIENCY_BELOW_C:
        return ThermalClass.NONE
    for upper, cls in bands:
        if rise_c <= upper:
            return cls
    return ThermalClass.MAJOR


def class_over_ambient(rise_c: float) -> ThermalClass:
    return _classify_rise(rise_c, OVER_AMBIENT_BANDS)


def class_over_similar(rise_c: float) -> ThermalClass:
    return _classify_rise(rise_c, OVER_SIMILAR_BANDS)


@dataclass(frozen=True)
class Assessment:
    temperature_c: float
    rise_over_ambient_c: float
    rise_over_similar_c: float | None  # None: no similar connection was read
    by_ambient: ThermalClass
    by_similar: ThermalClass

    @property
    def thermal_class(self) -> ThermalClass:
        return max(self.by_ambient, self.by_similar)

    @property
    def blocks_retorque(self) -> bool:
        return self.thermal_class.blocks_retorque


def assess(temperature_c: float, ambient_c: float, similar_c: Iterable[float] = ()) -> Assessment:
    """One connection against the ambient air and against its similar connections. The
    reference among similar connections is their median, so one unusually cool
    connection (an idle circuit) does not make every other one look hot."""
    similar = list(similar_c)
    reference = statistics.median(similar) if similar else None
    rise_ambient = temperature_c - ambient_c
    rise_similar = None if reference is None else temperature_c - reference
    return Assessment(
        temperature_c=temperature_c,
        rise_over_ambient_c=rise_ambient,
        rise_over_similar_c=rise_similar,
        by_ambient=class_over_ambient(rise_ambient),
        by_similar=ThermalClass.NONE if rise_similar is None else class_over_similar(rise_similar),
    )


@dataclass(frozen=True)
class Connection:
    """One connection's reading on one run: `group` names the device or bus it sits on;
    `load_a` is its circuit's design current."""

    key: Hashable
    group: Hashable
    load_a: float
    temperature_c: float


def similar_load(a: float, b: float) -> bool:
    if a <= 0 or b <= 0:
        return a == b
    return max(a, b) / min(a, b) <= SIMILAR_LOAD_RATIO


def assess_run(ambient_c: float, connections: Sequence[Connection]) -> dict[Hashable, Assessment]:
    """Every connection read on one run, each against the others on the same device under
    similar load."""
    results: dict[Hashable, Assessment] = {}
    for conn in connections:
        similar = [
            other.temperature_c
            for other in connections
            if other.key != conn.key
            and other.group == conn.group
            and similar_load(other.load_a, conn.load_a)
        ]
        results[conn.key] = assess(conn.temperature_c, ambient_c, similar)
    return results
