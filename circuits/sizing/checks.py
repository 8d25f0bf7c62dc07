"""Findings for one size on one circuit: protection, notation, temperature and
the other checks that speak to the person, built from a ``Measure``."""

from __future__ import annotations

from .ampacity import no_value_finding, rating_basis
from .catalogue import ConductorSize, awg, resistance_estimated
from .findings import BLOCKING, NOTE, SOURCES, WARNING, Finding
from .measure import EPS, Context, Measure, reasons
from .notation import is_bare_number
from .protection import has_rating_between, is_standard_rating

__all__ = ["protection_findings", "size_findings"]

# NEC 310.10(G): parallel AC conductors from 1/0 AWG; also where reactance starts to tell.
_SMALLEST_PARALLEL_AC = awg("1/0")


def protection_findings(ctx: Context, m: Measure) -> list[Finding]:
    inp = ctx.inp
    out: list[Finding] = []
    label = m.size.label
    marine = (
        " Some marine standards (ABYC E-11, ISO 13590) allow protection up to 150 % of the "
        "conductor's ampacity; this tool applies the stricter 100 % rule by default."
    )
    protection = inp.protection_a
    if protection is not None:
        if m.table_a is not None and protection > m.max_prot_a + EPS:
            if m.small_limit_a is not None and protection <= m.ampacity_a + EPS:
                out.append(
                    Finding(
                        "PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT",
                        BLOCKING,
                        f"Protection {protection:g} A is above the {m.small_limit_a:g} A limit for "
                        f"{rating_basis(m.size).label} conductors.",
                        SOURCES["nec_small"],
                    )
                )
            else:
                out.append(
                    Finding(
                        "PROTECTION_ABOVE_AMPACITY",
                        BLOCKING,
                        f"Protection {protection:g} A is above the {m.max_prot_a:.4g} A "
                        f"that {label} "
                        f"allows here, so a fault could overheat the conductor before it opens."
                        + ("" if inp.ac else marine),
                        SOURCES["protection"],
                    )
                )
        if protection + EPS < ctx.min_prot_a:
            need = "125 % of the continuous load" if inp.continuous else "the design current"
            out.append(
                Finding(
                    "PROTECTION_BELOW_LOAD",
                    BLOCKING,
                    f"Protection {protection:g} A is below {need} ({ctx.min_prot_a:.4g} A); "
                    "it will open in normal use.",
                    SOURCES["nec_continuous"] if inp.continuous else SOURCES["protection"],
                )
            )
        if not is_standard_rating(protection):
            out.append(
                Finding(
                    "PROTECTION_NOT_STANDARD",
                    NOTE,
                    f"{protection:g} A is not a standard protection rating.",
                    SOURCES["nec_ratings"],
                )
            )
        return out
    if m.table_a is None:
        return out
    if ctx.min_prot_a > m.max_prot_a + EPS:
        if m.small_limit_a is not None and m.ampacity_a + EPS >= ctx.required_a:
            out.append(
                Finding(
                    "PROTECTION_LIMIT_BELOW_LOAD",
                    BLOCKING,
                    f"{rating_basis(m.size).label} conductors may be protected at no more than "
                    f"{m.small_limit_a:g} A, below the {ctx.min_prot_a:.4g} A this load needs; "
                    "use a "
                    "larger conductor.",
                    SOURCES["nec_small"],
                )
            )
    elif not has_rating_between(ctx.min_prot_a, m.max_prot_a):
        out.append(
            Finding(
                "NO_STANDARD_RATING",
                BLOCKING,
                f"No standard protection rating lies between the {ctx.min_prot_a:.4g} A the load "
                f"needs and the {m.max_prot_a:.4g} A {label} allows; use a larger conductor."
                + ("" if inp.ac else marine),
                SOURCES["nec_ratings"],
            )
        )
    return out


def _notation_findings(ctx: Context, m: Measure, size_text: str | None) -> list[Finding]:
    """The 4 vs 4/0 guard. A bare 1-4 is read as AWG; if that size cannot serve the
    circuit while the aught size of the same digit can, the likely intent was the
    aught size, and fitting the thin one is the classic fire: blocking."""
    size = m.size
    bare = size.written_bare or is_bare_number(size_text)
    if not bare or size.gauge is None:
        return []
    written = size_text.strip() if size_text else str(size.gauge)
    if size.gauge > 4:
        return []
    aught = awg(f"{size.gauge}/0")
    failing = reasons(ctx, m)
    if failing and not reasons(ctx, Measure(ctx, aught)):
        return [
            Finding(
                "SIZE_NOTATION_AUGHT",
                BLOCKING,
                f"You wrote {written!r}, read as {size.label}, which cannot serve this circuit "
                f"({failing[0]}); {aught.label} ('{size.gauge} aught') would. If {aught.label} "
                f"was meant, write '{size.gauge}/0'; never fit {size.label} where {aught.label} "
                "was specified.",
                SOURCES["notation"],
            )
        ]
    return [
        Finding(
            "SIZE_NOTATION_BARE",
            NOTE,
            f"You wrote {written!r}, read as {size.label}. Write '{size.gauge}/0' for "
            f"{aught.label} ('{size.gauge} aught').",
            SOURCES["notation"],
        )
    ]


def _temperature_findings(ctx: Context) -> list[Finding]:
    inp = ctx.inp
    if inp.conductor_temp_c is None:
        return []
    if ctx.temp_c > inp.insulation_c + EPS:
        return [
            Finding(
                "TEMP_ABOVE_RATING",
                WARNING,
                f"Conductor temperature {ctx.temp_c:g} °C is above the {inp.insulation_c} °C "
                "insulation rating; the insulation is not rated for it.",
                SOURCES["cfr_table5"],
            )
        ]
    if ctx.temp_c < inp.insulation_c - EPS:
        return [
            Finding(
                "TEMP_BELOW_RATING",
                NOTE,
                f"Voltage drop computed at {ctx.temp_c:g} °C; a conductor loaded near its "
                f"ampacity can reach {inp.insulation_c} °C and then drops more.",
                SOURCES["resistance"],
            )
        ]
    return []


def size_findings(ctx: Context, m: Measure, size_text: str | None = None) -> list[Finding]:
    """Every finding for this size on this circuit, unsorted."""
    inp = ctx.inp
    size = m.size
    out: list[Finding] = []
    if m.below_min is not None:
        out.append(Finding("BELOW_MIN_SIZE", BLOCKING, f"{m.below_min}.", _min_source(size)))
    if m.table_a is None:
        out.append(no_value_finding(size, ctx.plan))
    else:
        if size.kind == "mm2":
            basis = rating_basis(size)
            out.append(
                Finding(
                    "METRIC_AMPACITY_CONVERTED",
                    NOTE,
                    f"No published ampacity table for metric sizes is used here; {size.label} is "
                    f"rated as {basis.label} ({basis.area_mm2:.3g} mm²), the next AWG size not "
                    "larger in cross-section.",
                    SOURCES["metric"],
                )
            )
        if m.capped:
            out.append(
                Finding(
                    "TERMINATION_LIMIT",
                    NOTE,
                    f"Ampacity held to the {ctx.plan.cap_column_c} °C column because "
                    "terminations are "
                    f"rated {inp.termination_c} °C.",
                    SOURCES["nec_termination"],
                )
            )
        if m.ampacity_a + EPS < ctx.required_a:
            need = (
                f"125 % of the {inp.current_a:g} A continuous load"
                if inp.continuous
                else f"the {inp.current_a:g} A load"
            )
            out.append(
                Finding(
                    "AMPACITY_BELOW_LOAD",
                    BLOCKING,
                    f"{size.label}{_times(inp.parallel)} carries {m.ampacity_a:.4g} A here "
                    "after every "
                    f"factor, below {need} ({ctx.required_a:.4g} A).",
                    ctx.plan.table_source,
                )
            )
    out.extend(ctx.plan.findings)
    if m.drop_pct > ctx.limit_pct + EPS:
        severity = BLOCKING if inp.critical else WARNING
        out.append(
            Finding(
                "DROP_OVER_LIMIT",
                severity,
                f"Voltage drop {m.drop_v:.3g} V ({m.drop_pct:.3g} %) over the "
                f"{2 * inp.length_m:.3g} m "
                f"round trip at {ctx.temp_c:g} °C is above the {ctx.limit_pct:g} % limit"
                + (" for a critical load." if inp.critical else "."),
                SOURCES["drop"],
            )
        )
    out.extend(protection_findings(ctx, m))
    out.extend(_notation_findings(ctx, m, size_text))
    out.extend(_temperature_findings(ctx))
    if inp.ac and inp.parallel > 1 and size < _SMALLEST_PARALLEL_AC:
        out.append(
            Finding(
                "PARALLEL_BELOW_1_0",
                WARNING,
                "AC conductors in parallel are normally 1/0 AWG and larger; "
                f"{size.label} is smaller.",
                SOURCES["nec_parallel"],
            )
        )
    if inp.ac and size >= _SMALLEST_PARALLEL_AC:
        out.append(
            Finding(
                "AC_DROP_RESISTIVE_ONLY",
                NOTE,
                f"The drop uses the DC resistance of {size.label}; at 50/60 Hz its reactance "
                "adds to the drop (more so the larger the conductor and the lower the power "
                "factor), so check it against the AC impedance if it is near the limit.",
                SOURCES["ac_impedance"],
            )
        )
    if resistance_estimated(size, inp.tinned):
        out.append(
            Finding(
                "RESISTANCE_ESTIMATED",
                NOTE,
                f"No published resistance for tinned {size.label}; the plain value was "
                "raised by the "
                "largest tinned/plain ratio of 1/0-4/0 AWG.",
                SOURCES["resistance"],
            )
        )
    return out


def _times(parallel: int) -> str:
    return f" ×{parallel} in parallel" if parallel > 1 else ""


def _min_source(size: ConductorSize) -> str:
    return SOURCES["iso_min_size"] if size.kind == "mm2" else SOURCES["cfr_min_size"]
