"""A job's electrical system: devices and their terminals, circuits, terminations, the
shop's default torque specs, and leads' waivers of findings. One module a feature:
`choices` (shared choices and helpers), `devices`, `circuit`, `marking` (what a conductor
looks like at its ends), `terminations`; the Waiver model lives in circuits.waiver_models.
Every name is importable from here (`from circuits.models import Circuit`).

Findings themselves are never stored: they are recomputed from these records by the
sizing engine and the whole-system rules on every view (circuits.system).
"""

from __future__ import annotations

from circuits.models.choices import (
    FOOT_M,
    INSULATION_RATINGS,
    MARKING_COLOURS,
    Colour,
    MarkingEnds,
    MarkingMethod,
    Mounting,
    Polarity,
    ProtectionType,
    StudSize,
    TerminationKind,
    TorqueUnit,
    format_length,
)
from circuits.models.circuit import Circuit, CircuitQuerySet, Protection
from circuits.models.devices import Device, Terminal
from circuits.models.marking import Marking, colour_name, colour_text
from circuits.models.terminations import Termination, TorqueDefault
from circuits.waiver_models import Waiver

__all__ = [
    "FOOT_M",
    "INSULATION_RATINGS",
    "MARKING_COLOURS",
    "Circuit",
    "CircuitQuerySet",
    "Colour",
    "Device",
    "Marking",
    "MarkingEnds",
    "MarkingMethod",
    "Mounting",
    "Polarity",
    "Protection",
    "ProtectionType",
    "StudSize",
    "Termination",
    "TerminationKind",
    "TorqueDefault",
    "TorqueUnit",
    "Terminal",
    "Waiver",
    "colour_name",
    "colour_text",
    "format_length",
]
