"""Evaluate one conductor size for a circuit, and recommend the smallest that works.

A size is acceptable when, together:
  * it is not below the minimum size and the applicable table rates it;
  * its ampacity after every factor, times the number in parallel, is at least the
    design current (times 1.25 for a continuous load, NEC 210.19(A)(1));
  * the round-trip voltage drop is within the limit;
  * protection fits: a given rating is not above what the conductor allows, or,
    with none given, a standard rating lies between what the load needs and what
    the conductor allows.
A given protection rating below the load is a finding, but no conductor can cure
it, so it does not steer the recommendation.

The inner loop lives in ``measure``; the words for people in ``checks``.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .ampacity import Factor
from .catalogue import ConductorSize, catalogue
from .checks import size_findings
from .errors import SizingError
from .findings import BLOCKING, SOURCES, Finding, sort_findings
from .inputs import CircuitInput
from .measure import Context, Measure, reasons
from .protection import ratings_between

__all__ = ["Recommendation", "SizingResult", "evaluate", "recommend"]

_DC_FAMILY = catalogue("awg")
_AC_FAMILY = catalogue("awg") + catalogue("kcmil")
_MM2_FAMILY = catalogue("mm2")


@dataclass(frozen=True)
class SizingResult:
    """Everything the engine worked out for one size on one circuit."""

    size: ConductorSize
    ampacity_a: float  # after every factor, times the number in parallel
    table_ampacity_a: float | None  # one conductor, as the table gives it
    required_ampacity_a: float
    factors: tuple[Factor, ...]
    table_source: str
    resistance_ohm_per_m: float  # one conductor, at conductor_temp_c
    conductor_temp_c: float
    voltage_drop_v: float
    voltage_drop_pct: float
    drop_limit_pct: float
    max_protection_a: float
    min_protection_a: float
    standard_ratings: tuple[float, ...]
    parallel: int
    findings: tuple[Finding, ...]

    @property
    def blocking(self) -> bool:
        return any(f.blocking for f in self.findings)

    def to_dict(self) -> dict[str, Any]:
        return {
            "size": self.size.label,
            "ampacity_a": self.ampacity_a,
            "table_ampacity_a": self.table_ampacity_a,
            "required_ampacity_a": self.required_ampacity_a,
            "factors": [f.to_dict() for f in self.factors],
            "table_source": self.table_source,
            "resistance_ohm_per_m": self.resistance_ohm_per_m,
            "conductor_temp_c": self.conductor_temp_c,
            "voltage_drop_v": self.voltage_drop_v,
            "voltage_drop_pct": self.voltage_drop_pct,
            "drop_limit_pct": self.drop_limit_pct,
            "max_protection_a": self.max_protection_a,
            "min_protection_a": self.min_protection_a,
            "standard_ratings": list(self.standard_ratings),
            "parallel": self.parallel,
            "findings": [f.to_dict() for f in self.findings],
        }


@dataclass(frozen=True)
class Recommendation:
    """The smallest acceptable size (None if none in the catalogue works), its
    evaluation, and for each smaller size the constraints that ruled it out."""

    size: ConductorSize | None
    result: SizingResult | None
    rejected: tuple[tuple[ConductorSize, tuple[str, ...]], ...]
    findings: tuple[Finding, ...]

    def to_dict(self) -> dict[str, Any]:
        return {
            "size": self.size.label if self.size is not None else None,
            "result": self.result.to_dict() if self.result is not None else None,
            "rejected": [{"size": s.label, "reasons": list(r)} for s, r in self.rejected],
            "findings": [f.to_dict() for f in self.findings],
        }


def _result(ctx: Context, m: Measure, size_text: str | None) -> SizingResult:
    inp = ctx.inp
    findings = size_findings(ctx, m, size_text)
    if m.table_a is None:
        ratings: tuple[float, ...] = ()
    else:
        ratings = ratings_between(ctx.min_prot_a, m.max_prot_a)
    return SizingResult(
        size=m.size,
        ampacity_a=m.ampacity_a,
        table_ampacity_a=m.table_a,
        required_ampacity_a=ctx.required_a,
        factors=ctx.plan.factors,
        table_source=ctx.plan.table_source,
        resistance_ohm_per_m=m.ohm_per_m,
        conductor_temp_c=ctx.temp_c,
        voltage_drop_v=m.drop_v,
        voltage_drop_pct=m.drop_pct,
        drop_limit_pct=ctx.limit_pct,
        max_protection_a=m.max_prot_a,
        min_protection_a=ctx.min_prot_a,
        standard_ratings=ratings,
        parallel=inp.parallel,
        findings=sort_findings(findings),
    )


def evaluate(inp: CircuitInput) -> SizingResult:
    """Evaluate ``inp.size`` on the circuit; ``inp.size`` must be given."""
    if inp.size is None:
        raise SizingError("evaluate needs a conductor size; use recommend() to choose one")
    ctx = Context(inp)
    return _result(ctx, Measure(ctx, inp.size), inp.size_text)


def candidates(inp: CircuitInput) -> tuple[ConductorSize, ...]:
    """The sizes a recommendation chooses from, thinnest first: metric sizes when the
    circuit asks for metric or names a metric size; else AWG, plus kcmil for AC
    (the vehicle and boat table stops at 4/0 AWG)."""
    if inp.metric or (inp.size is not None and inp.size.kind == "mm2"):
        return _MM2_FAMILY
    return _AC_FAMILY if inp.ac else _DC_FAMILY


def recommend(inp: CircuitInput) -> Recommendation:
    """The smallest size meeting ampacity, voltage drop, protection and minimum size
    together, and why each smaller size was ruled out."""
    ctx = Context(inp)
    rejected: list[tuple[ConductorSize, tuple[str, ...]]] = []
    family = candidates(inp)
    for size in family:
        m = Measure(ctx, size)
        failing = reasons(ctx, m)
        if not failing:
            return Recommendation(size, _result(ctx, m, None), tuple(rejected), ())
        rejected.append((size, tuple(failing)))
    hint = "Use conductors in parallel, a shorter run or a higher system voltage."
    finding = Finding(
        "NO_SIZE_FITS",
        BLOCKING,
        f"No size from {family[0].label} to {family[-1].label} meets every constraint. {hint}",
        f"{ctx.plan.table_source}; {SOURCES['drop']}",
    )
    return Recommendation(None, None, tuple(rejected), (finding,))
