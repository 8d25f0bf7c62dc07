"""What the command line and the web page show for one circuit."""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .catalogue import ConductorSize
from .engine import Recommendation, SizingResult, evaluate, recommend
from .findings import Finding, sort_findings
from .inputs import CircuitInput

__all__ = ["CAUTION", "Report", "size_circuit"]

CAUTION = (
    "Caution: this tool supports, and never replaces, the applicable standards, "
    "local codes and the judgement of a qualified person."
)


@dataclass(frozen=True)
class Report:
    """The size evaluated (given, or else the recommendation), its result, the
    recommendation, and the findings to show."""

    input: CircuitInput
    size: ConductorSize | None
    result: SizingResult | None
    recommendation: Recommendation
    findings: tuple[Finding, ...]

    @property
    def recommended_size(self) -> ConductorSize | None:
        return self.recommendation.size

    @property
    def blocking(self) -> bool:
        return any(f.blocking for f in self.findings)

    def to_dict(self) -> dict[str, Any]:
        r = self.result
        inp = self.input
        return {
            "recommended_size": _label(self.recommendation.size),
            "size": _label(self.size),
            "size_text": inp.size_text,
            "ampacity_a": r.ampacity_a if r else None,
            "table_ampacity_a": r.table_ampacity_a if r else None,
            "required_ampacity_a": r.required_ampacity_a if r else None,
            "table_source": r.table_source if r else None,
            "factors": [f.to_dict() for f in r.factors] if r else [],
            "voltage_drop_v": r.voltage_drop_v if r else None,
            "voltage_drop_pct": r.voltage_drop_pct if r else None,
            "drop_limit_pct": inp.effective_drop_limit_pct,
            "resistance_ohm_per_m": r.resistance_ohm_per_m if r else None,
            "conductor_temp_c": inp.effective_conductor_temp_c,
            "max_protection_a": r.max_protection_a if r else None,
            "min_protection_a": r.min_protection_a if r else None,
            "standard_ratings": list(r.standard_ratings) if r else [],
            "parallel": inp.parallel,
            "blocking": self.blocking,
            "findings": [f.to_dict() for f in self.findings],
            "rejected": [
                {"size": s.label, "reasons": list(why)} for s, why in self.recommendation.rejected
            ],
            "caution": CAUTION,
        }


def _label(size: ConductorSize | None) -> str | None:
    return size.label if size is not None else None


def size_circuit(inp: CircuitInput) -> Report:
    """Evaluate the given size (and recommend one beside it), or, with no size given,
    recommend one and evaluate that."""
    rec = recommend(inp)
    if inp.size is not None:
        result = evaluate(inp)
        return Report(inp, inp.size, result, rec, result.findings)
    findings = rec.result.findings if rec.result is not None else sort_findings(list(rec.findings))
    return Report(inp, rec.size, rec.result, rec, findings)
