"""The sizing engine: conductor size, protection and voltage drop for one circuit.

Plain Python (no Django): pint quantities at the edges (``units``), plain SI floats
inside. Public API::

    parse_size("4/0") -> ConductorSize        format_size(size) -> "4/0 AWG"
    catalogue() -> all sizes, thinnest first
    CircuitInput(system_voltage_v=12, current_a=20, length_m=3.0, ...)
    evaluate(inp) -> SizingResult             recommend(inp) -> Recommendation
    size_circuit(inp) -> Report               CAUTION
    parse_quantity("10 ft", kind="length") -> Parsed (value in SI), LIMITS per field
"""

from __future__ import annotations

from .ampacity import Factor
from .catalogue import ConductorSize, catalogue, resistance_ohm_per_m, temperature_factor
from .engine import Recommendation, SizingResult, candidates, evaluate, recommend
from .errors import SizeNotationError, SizingError, UnitError
from .findings import CODES, SEVERITY_ORDER, Finding
from .inputs import CircuitInput
from .notation import ACCEPTED_FORMS, format_size, is_bare_number, parse_size
from .quantity import LIMITS, Parsed, parse_quantity
from .report import CAUTION, Report, size_circuit
from .units import Q_, parse_length, parse_torque, ureg

__all__ = [
    "ACCEPTED_FORMS",
    "CAUTION",
    "CODES",
    "SEVERITY_ORDER",
    "CircuitInput",
    "ConductorSize",
    "Factor",
    "Finding",
    "LIMITS",
    "Parsed",
    "Q_",
    "Recommendation",
    "Report",
    "SizeNotationError",
    "SizingError",
    "SizingResult",
    "UnitError",
    "candidates",
    "catalogue",
    "evaluate",
    "format_size",
    "is_bare_number",
    "parse_length",
    "parse_quantity",
    "parse_size",
    "parse_torque",
    "recommend",
    "resistance_ohm_per_m",
    "size_circuit",
    "temperature_factor",
    "ureg",
]
