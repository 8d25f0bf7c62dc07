"""Findings: what a sizing rule says about a circuit.

Each finding has a stable ``code`` (stored with waivers later, so never rename one),
a ``severity``, a plain-words ``message`` and the ``source`` of the rule.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

__all__ = [
    "BLOCKING",
    "CODES",
    "NOTE",
    "SEVERITY_ORDER",
    "SOURCES",
    "WARNING",
    "Finding",
    "sort_findings",
]

BLOCKING = "blocking"
WARNING = "warning"
NOTE = "note"

# Rank of each severity, most serious first: ``sorted(f, key=lambda f:
# SEVERITY_ORDER[f.severity])``; ``list(SEVERITY_ORDER)`` gives the order itself.
SEVERITY_ORDER: dict[str, int] = {BLOCKING: 0, WARNING: 1, NOTE: 2}

# Every code the engine emits, with what it protects against.
CODES: dict[str, str] = {
    "AMPACITY_BELOW_LOAD": "conductor ampacity, after every factor, is below the load",
    "PROTECTION_ABOVE_AMPACITY": "protection rating above the conductor's derated ampacity",
    "PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT": "AC protection above the small-conductor limit",
    "PROTECTION_BELOW_LOAD": "protection rating below the design current (x1.25 continuous)",
    "PROTECTION_LIMIT_BELOW_LOAD": "small-conductor protection limit is below the load",
    "PROTECTION_NOT_STANDARD": "protection rating is not a standard rating",
    "NO_STANDARD_RATING": "no standard protection rating lies between load and conductor",
    "DROP_OVER_LIMIT": "voltage drop over the round trip is above the limit",
    "SIZE_NOTATION_AUGHT": "a bare 4 (or 1, 2, 3) where only 4/0 (1/0, 2/0, 3/0) carries the load",
    "SIZE_NOTATION_BARE": "a bare number was read as an AWG size",
    "BELOW_MIN_SIZE": "conductor below the minimum size the standard allows",
    "NO_AMPACITY_VALUE": "the applicable table publishes no ampacity for this size",
    "METRIC_AMPACITY_CONVERTED": "metric size rated as the next AWG size not larger",
    "BUNDLING_BELOW_50V": "bundling factors applied below 50 V, stricter than 33 CFR 183.435(b)",
    "AMBIENT_CORRECTION": "DC ampacity corrected for an ambient above 30 C",
    "TEMP_ABOVE_RATING": "conductor temperature above its insulation rating",
    "TEMP_BELOW_RATING": "voltage drop computed below the insulation rating temperature",
    "TERMINATION_LIMIT": "AC ampacity limited by the termination temperature rating",
    "PARALLEL_BELOW_1_0": "AC conductors in parallel below 1/0 AWG",
    "AC_DROP_RESISTIVE_ONLY": "AC drop of a large conductor computed without its reactance",
    "RESISTANCE_ESTIMATED": "resistance is an estimate, not a published value",
    "NO_SIZE_FITS": "no size in the catalogue meets every constraint",
}

SOURCES: dict[str, str] = {
    "cfr_table5": "33 CFR 183.425 Table 5",
    "cfr_engine": "33 CFR 183.425 Table 5, engine-space factors (50 °C ambient)",
    "cfr_bundling": "33 CFR 183.425 Table 5, Note 2; 33 CFR 183.435(b)",
    "cfr_min_size": "33 CFR 183.425, minimum conductor size",
    "iso_min_size": "ISO 10133:2012 §7.7, minimum conductor size",
    "nec_310_16": "NEC 2023 Table 310.16",
    "nec_ambient": "NEC 2023 Table 310.15(B)(1)(1)",
    "nec_adjust": "NEC 2023 Table 310.15(C)(1)",
    "nec_termination": "NEC 2023 110.14(C)",
    "nec_small": "NEC 2023 240.4(D)",
    "nec_ratings": "NEC 2023 240.6(A); common DC fuse ratings (common practice)",
    "nec_continuous": "NEC 2023 210.19(A)(1), 210.20(A), 215.2(A)(1), 215.3",
    "nec_parallel": "NEC 2023 310.10(G)",
    "protection": "NEC 2023 240.4; ABYC E-11 / ISO 13590 overcurrent protection",
    "drop": "ABYC E-11 voltage-drop limits (3 % critical, 10 % other); NEC 210.19 Inf. Note",
    "resistance": "NEC 2023 Chapter 9 Table 8; IEC 60228 class 5; copper 234.5 °C law",
    "notation": "common practice: trade size notation (4/0 = 0000 = 4-0 = four aught)",
    "ac_impedance": "NEC 2023 Chapter 9 Table 9 (AC resistance and reactance)",
    "metric": "common practice: rate by the next AWG size not larger in cross-section",
}


@dataclass(frozen=True)
class Finding:
    """One result of a sizing rule."""

    code: str
    severity: str
    message: str
    source: str

    def __post_init__(self) -> None:
        if self.severity not in SEVERITY_ORDER:
            raise ValueError(f"unknown severity {self.severity!r}")

    @property
    def blocking(self) -> bool:
        return self.severity == BLOCKING

    def to_dict(self) -> dict[str, Any]:
        return {
            "code": self.code,
            "severity": self.severity,
            "message": self.message,
            "source": self.source,
        }


def sort_findings(findings: list[Finding]) -> tuple[Finding, ...]:
    """Most serious first; order of discovery within a severity."""
    return tuple(sorted(findings, key=lambda f: SEVERITY_ORDER[f.severity]))
