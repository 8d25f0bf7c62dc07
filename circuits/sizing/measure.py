"""Per-circuit context and per-size measurements: the engine's inner loop.

Everything size-independent is worked out once per circuit (``Context``); trying a
size (``Measure``) is then a few look-ups and float operations with no pint and no
string work, so the whole catalogue can be scanned on every edit. ``reasons`` turns
a measurement into the constraints it fails, in words.
"""

from __future__ import annotations

from .ampacity import SMALL_CONDUCTOR_LIMIT_A, AmpacityPlan, plan_ampacity, rating_basis
from .catalogue import ConductorSize, awg, reference_resistance, temperature_factor
from .findings import SOURCES
from .inputs import CircuitInput
from .protection import has_rating_between, min_protection_a

__all__ = ["EPS", "Context", "Measure", "below_min", "reasons"]

EPS = 1e-9
_MIN_SEPARATE_AWG = awg("16")
_MIN_SHEATHED_AWG = awg("18")


class Context:
    """Size-independent quantities for one circuit, computed once."""

    __slots__ = (
        "inp", "plan", "temp_c", "temp_factor_75", "temp_factor_20", "required_a",
        "min_prot_a", "limit_pct", "limit_v", "current_per_path", "two_l",
    )  # fmt: skip

    def __init__(self, inp: CircuitInput) -> None:
        self.inp = inp
        self.plan: AmpacityPlan = plan_ampacity(
            ac=inp.ac,
            insulation_c=inp.insulation_c,
            engine_space=inp.engine_space,
            bundled=inp.bundled,
            voltage_v=inp.system_voltage_v,
            ambient_c=inp.ambient_c,
            termination_c=inp.termination_c,
        )
        self.temp_c = inp.effective_conductor_temp_c
        self.temp_factor_75 = temperature_factor(75.0, self.temp_c)
        self.temp_factor_20 = temperature_factor(20.0, self.temp_c)
        self.min_prot_a = min_protection_a(inp.current_a, inp.continuous)
        # NEC 210.19(A)(1): the conductor too must carry 125 % of a continuous load.
        self.required_a = self.min_prot_a
        self.limit_pct = inp.effective_drop_limit_pct
        self.limit_v = inp.system_voltage_v * self.limit_pct / 100.0
        self.current_per_path = inp.current_a / inp.parallel
        self.two_l = 2.0 * inp.length_m


class Measure:
    """The numbers for one size on one circuit (no strings, no findings)."""

    __slots__ = (
        "size", "table_a", "ampacity_a", "capped", "ohm_per_m", "drop_v", "drop_pct",
        "max_prot_a", "small_limit_a", "below_min",
    )  # fmt: skip

    def __init__(self, ctx: Context, size: ConductorSize) -> None:
        inp = ctx.inp
        self.size = size
        rated = ctx.plan.single(size)
        if rated is None:
            self.table_a: float | None = None
            self.ampacity_a = 0.0
            self.capped = False
        else:
            self.table_a, single, self.capped = rated
            self.ampacity_a = single * inp.parallel
        r_ref, ref_c = reference_resistance(size, inp.tinned)
        if ref_c == 75.0:  # NEC Chapter 9 Table 8 sizes
            factor = ctx.temp_factor_75
        elif ref_c == 20.0:  # IEC 60228 sizes
            factor = ctx.temp_factor_20
        else:
            factor = temperature_factor(ref_c, ctx.temp_c)
        self.ohm_per_m = r_ref * factor
        self.drop_v = ctx.current_per_path * self.ohm_per_m * ctx.two_l
        self.drop_pct = 100.0 * self.drop_v / inp.system_voltage_v
        self.small_limit_a: float | None = None
        self.max_prot_a = self.ampacity_a
        if inp.ac:
            basis = rating_basis(size)
            limit = SMALL_CONDUCTOR_LIMIT_A.get(basis.label) if basis is not None else None
            if limit is not None and limit < self.max_prot_a:
                self.small_limit_a = limit
                self.max_prot_a = limit
        self.below_min = below_min(inp, size)


def below_min(inp: CircuitInput, size: ConductorSize) -> str | None:
    """Why the size is below the standard's minimum, or None. 33 CFR 183.425 for
    AWG: 16 AWG installed separately, 18 AWG inside a sheath. ISO 10133 §7.7 for
    metric: 1 mm2 separately, 0.75 mm2 inside a sheath."""
    if size.kind == "mm2":
        least, source = (0.75 if inp.sheathed else 1.0), SOURCES["iso_min_size"]
        if size.area_mm2 < least - EPS:
            where = "inside a sheath" if inp.sheathed else "installed separately"
            return f"{size.label} is below the {least:g} mm² minimum {where} ({source})"
        return None
    least_size = _MIN_SHEATHED_AWG if inp.sheathed else _MIN_SEPARATE_AWG
    if size.area_mm2 < least_size.area_mm2 - EPS:
        where = "inside a sheath" if inp.sheathed else "installed separately"
        source = SOURCES["cfr_min_size"]
        return f"{size.label} is below the {least_size.label} minimum {where} ({source})"
    return None


def reasons(ctx: Context, m: Measure) -> list[str]:
    """The constraints this size fails, in words (empty: acceptable)."""
    out: list[str] = []
    if m.below_min is not None:
        out.append(f"minimum size: {m.below_min}")
    if m.table_a is None:
        out.append("ampacity: the applicable table publishes no value for this size")
    elif m.ampacity_a + EPS < ctx.required_a:
        out.append(
            f"ampacity: {m.ampacity_a:.4g} A after factors is below "
            f"the {ctx.required_a:.4g} A needed"
        )
    if m.drop_pct > ctx.limit_pct + EPS:
        out.append(
            f"voltage drop: {m.drop_pct:.3g} % ({m.drop_v:.3g} V) is above "
            f"the {ctx.limit_pct:g} % limit"
        )
    protection = ctx.inp.protection_a
    if m.table_a is not None:
        if protection is not None:
            if protection > m.max_prot_a + EPS:
                out.append(
                    f"protection: {protection:g} A is above "
                    f"the {m.max_prot_a:.4g} A the conductor allows"
                )
        elif not has_rating_between(ctx.min_prot_a, m.max_prot_a):
            out.append(
                f"protection: no standard rating between the {ctx.min_prot_a:.4g} A the load needs "
                f"and the {m.max_prot_a:.4g} A the conductor allows"
            )
    return out
