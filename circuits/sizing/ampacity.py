"""Ampacity: how much current one conductor may carry, after every factor.

Two tables, chosen by the circuit:

DC and AC wiring in vehicles and boats (``ac=False``)
    33 CFR 183.425 Table 5, by insulation temperature rating (60, 75, 80, 90, 105,
    125, 200 C), conductors outside engine spaces at 30 C. Engine spaces are taken
    as 50 C and use the engine-space factors. Bundling (Note 2): 3 conductors x0.70,
    4-6 x0.60, 7-24 x0.50, 25+ x0.40, multiplied with the engine-space factor.

    Bundling scope: 33 CFR 183.435(b) limits the bundling factors to conductors of
    50 V or more. ABYC E-11's newer table applies them to AC and DC alike, and a
    bundle of 12 V conductors heats up just the same, so the engine applies them at
    every voltage (the stricter rule) and adds a note below 50 V saying so.

    Ambient above 30 C outside an engine space: the table publishes no factor, so
    the engine applies the engine-space (50 C) factor, which bounds any ambient up
    to 50 C, and says so. Above 50 C there is no published value: input error.

AC branch circuits and shore supply (``ac=True``)
    NEC Table 310.16 (copper, not more than three current-carrying conductors,
    30 C ambient), 60/75/90 C columns. Column rule (NEC 110.14(C)): derating
    starts from the column of the insulation rating (60 -> 60; 75 or 80 -> 75;
    90 and above -> 90), and the result may not exceed the column of the
    termination rating (default 75 C, the usual rating of breakers and
    receptacles) without derating. So 105 C wire with no derating gets the 75 C
    column; derated, it benefits from its 90 C column. Ambient correction per NEC
    Table 310.15(B)(1)(1) for 31-55 C; below 30 C the engine keeps 1.00 (the table
    allows more, the engine does not take it). More than three current-carrying
    conductors per Table 310.15(C)(1). An engine space counts as 50 C ambient.

Metric sizes: no published mm2 table we can cite (ISO 10133 / 13297 tables were not
available), so a metric size is rated as the next AWG size that is not larger in
cross-section, and a note says so. A metric size smaller than 18 AWG has no rating.

Parallel conductors: n identical conductors carry n times the current of one.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Any

from .catalogue import ConductorSize, catalogue
from .findings import BLOCKING, NOTE, SOURCES, Finding

__all__ = [
    "CFR_INSULATION_C",
    "ENGINE_SPACE_FACTOR",
    "NEC_COLUMNS_C",
    "SMALL_CONDUCTOR_LIMIT_A",
    "AmpacityPlan",
    "Factor",
    "cfr_bundling_factor",
    "cfr_table5_a",
    "nec_adjustment_factor",
    "nec_ambient_factor",
    "nec_column_for",
    "nec_table_a",
    "plan_ampacity",
    "rating_basis",
]

CFR_INSULATION_C: tuple[int, ...] = (60, 75, 80, 90, 105, 125, 200)

# 33 CFR 183.425 Table 5, amperes, outside engine spaces; columns as CFR_INSULATION_C.
_CFR_TABLE5: dict[str, tuple[int, ...]] = {
    "18 AWG": (10, 10, 15, 20, 20, 25, 25),
    "16 AWG": (15, 15, 20, 25, 25, 30, 35),
    "14 AWG": (20, 20, 25, 30, 35, 40, 45),
    "12 AWG": (25, 25, 35, 40, 45, 50, 55),
    "10 AWG": (40, 40, 50, 55, 60, 70, 70),
    "8 AWG": (55, 65, 70, 70, 80, 90, 100),
    "6 AWG": (80, 95, 100, 100, 120, 125, 135),
    "4 AWG": (105, 125, 130, 135, 160, 170, 180),
    "3 AWG": (120, 145, 150, 155, 180, 195, 210),
    "2 AWG": (140, 170, 175, 180, 210, 225, 240),
    "1 AWG": (165, 195, 210, 210, 245, 265, 280),
    "1/0 AWG": (195, 230, 245, 245, 285, 305, 325),
    "2/0 AWG": (225, 265, 285, 285, 330, 355, 370),
    "3/0 AWG": (260, 310, 330, 330, 385, 410, 430),
    "4/0 AWG": (300, 360, 385, 385, 445, 475, 510),
}

# Engine spaces (50 C). 105 C: 0.85 from the USCG compliance guideline, whose
# inside-engine column is 0.85 x the outside values. 200 C: the CFR value recalled
# as 1.00 is not confirmed, and CSA C22.1 Table 5A gives 0.94 at 50 C; the engine
# takes the stricter 0.94. The others match the NEC/CSA 50 C factors.
ENGINE_SPACE_FACTOR: dict[int, float] = {
    60: 0.58, 75: 0.75, 80: 0.78, 90: 0.82, 105: 0.85, 125: 0.89, 200: 0.94,
}  # fmt: skip

NEC_COLUMNS_C: tuple[int, ...] = (60, 75, 90)
# NEC Table 310.16, copper, amperes; columns 60/75/90 C.
_NEC_310_16: dict[str, tuple[int, int, int]] = {
    "14 AWG": (15, 20, 25),
    "12 AWG": (20, 25, 30),
    "10 AWG": (30, 35, 40),
    "8 AWG": (40, 50, 55),
    "6 AWG": (55, 65, 75),
    "4 AWG": (70, 85, 95),
    "3 AWG": (85, 100, 115),
    "2 AWG": (95, 115, 130),
    "1 AWG": (110, 130, 145),
    "1/0 AWG": (125, 150, 170),
    "2/0 AWG": (145, 175, 195),
    "3/0 AWG": (165, 200, 225),
    "4/0 AWG": (195, 230, 260),
    "250 kcmil": (215, 255, 290),
    "300 kcmil": (240, 285, 320),
    "350 kcmil": (260, 310, 350),
    "400 kcmil": (280, 335, 380),
    "500 kcmil": (320, 380, 430),
}
# NEC Table 310.15(B)(1)(1): (highest ambient C of the band, factors 60/75/90 C).
_NEC_AMBIENT: tuple[tuple[float, tuple[float, float, float]], ...] = (
    (30.0, (1.00, 1.00, 1.00)),
    (35.0, (0.91, 0.94, 0.96)),
    (40.0, (0.82, 0.88, 0.91)),
    (45.0, (0.71, 0.82, 0.87)),
    (50.0, (0.58, 0.75, 0.82)),
    (55.0, (0.41, 0.67, 0.76)),
)
NEC_MAX_AMBIENT_C = 55.0
DC_MAX_AMBIENT_C = 50.0

# NEC 240.4(D), copper: the largest protection for small conductors, amperes.
SMALL_CONDUCTOR_LIMIT_A: dict[str, float] = {
    "18 AWG": 7.0, "16 AWG": 10.0, "14 AWG": 15.0, "12 AWG": 20.0, "10 AWG": 30.0,
}  # fmt: skip


@dataclass(frozen=True)
class Factor:
    """One multiplier (or limit) applied to the table ampacity, with its reason."""

    name: str
    value: float
    source: str

    def to_dict(self) -> dict[str, Any]:
        return {"name": self.name, "value": self.value, "source": self.source}


def cfr_bundling_factor(conductors: int) -> float:
    """33 CFR 183.425 Table 5 Note 2, by number of current-carrying conductors."""
    if conductors < 3:
        return 1.0
    if conductors == 3:
        return 0.70
    if conductors <= 6:
        return 0.60
    if conductors <= 24:
        return 0.50
    return 0.40


def nec_adjustment_factor(conductors: int) -> float:
    """NEC Table 310.15(C)(1), more than three current-carrying conductors."""
    if conductors <= 3:
        return 1.0
    for upper, factor in ((6, 0.80), (9, 0.70), (20, 0.50), (30, 0.45), (40, 0.40)):
        if conductors <= upper:
            return factor
    return 0.35


def nec_ambient_factor(ambient_c: float, column_c: int) -> float:
    """NEC ambient correction for the band containing ``ambient_c`` (bands are
    31-35, 36-40 ... so 35.2 C falls in 36-40). No increase below 30 C."""
    column = NEC_COLUMNS_C.index(column_c)
    for upper, factors in _NEC_AMBIENT:
        if ambient_c <= upper:
            return factors[column]
    raise ValueError(f"no NEC ambient factor above {NEC_MAX_AMBIENT_C:g} °C")


def nec_column_for(insulation_c: int) -> int:
    """NEC column in which derating starts for a given insulation rating."""
    if insulation_c < 75:
        return 60
    if insulation_c < 90:
        return 75
    return 90


def _build_basis() -> dict[str, ConductorSize | None]:
    """For each size, the AWG size whose table row rates it (itself, or for a metric
    size the largest AWG size not larger in cross-section)."""
    awg_sizes = catalogue("awg")
    basis: dict[str, ConductorSize | None] = {}
    for size in catalogue():
        if size.kind != "mm2":
            basis[size.label] = size
            continue
        fitting = [a for a in awg_sizes if a.area_mm2 <= size.area_mm2]
        basis[size.label] = fitting[-1] if fitting else None
    return basis


_BASIS = _build_basis()


def rating_basis(size: ConductorSize) -> ConductorSize | None:
    """The size whose table row gives this size's ampacity (None: no rating)."""
    return _BASIS[size.label]


def cfr_table5_a(size: ConductorSize, insulation_c: int) -> float | None:
    """33 CFR 183.425 Table 5 value for the size's rating basis, or None."""
    basis = _BASIS[size.label]
    row = _CFR_TABLE5.get(basis.label) if basis is not None else None
    return None if row is None else float(row[CFR_INSULATION_C.index(insulation_c)])


def nec_table_a(size: ConductorSize, column_c: int) -> float | None:
    """NEC Table 310.16 value for the size's rating basis, or None."""
    basis = _BASIS[size.label]
    row = _NEC_310_16.get(basis.label) if basis is not None else None
    return None if row is None else float(row[NEC_COLUMNS_C.index(column_c)])


@dataclass(frozen=True)
class AmpacityPlan:
    """The size-independent part of the ampacity rule for one circuit: which table
    and column, the product of the factors, and any cap from terminations.

    Computed once per circuit so that trying each size is two dictionary look-ups
    and a multiplication.
    """

    ac: bool
    column_c: int
    multiplier: float
    cap_column_c: int | None
    factors: tuple[Factor, ...]
    findings: tuple[Finding, ...]
    table_source: str

    def single(self, size: ConductorSize) -> tuple[float, float, bool] | None:
        """(table ampacity, derated ampacity, capped by termination) of one conductor,
        or None where the table has no value for this size."""
        if self.ac:
            table = nec_table_a(size, self.column_c)
            if table is None:
                return None
            derated = table * self.multiplier
            if self.cap_column_c is not None:
                cap = nec_table_a(size, self.cap_column_c)
                if cap is not None and cap < derated:
                    return table, cap, True
            return table, derated, False
        table = cfr_table5_a(size, self.column_c)
        if table is None:
            return None
        return table, table * self.multiplier, False


def _plan_dc(
    insulation_c: int, engine_space: bool, bundled: int, voltage_v: float, ambient_c: float | None
) -> AmpacityPlan:
    factors: list[Factor] = []
    findings: list[Finding] = []
    multiplier = 1.0
    hot_ambient = ambient_c is not None and ambient_c > 30.0
    if engine_space or hot_ambient:
        value = ENGINE_SPACE_FACTOR[insulation_c]
        multiplier *= value
        name = "engine space (50 °C)" if engine_space else f"ambient {ambient_c:g} °C"
        factors.append(Factor(name, value, SOURCES["cfr_engine"]))
        if hot_ambient and not engine_space:
            findings.append(
                Finding(
                    "AMBIENT_CORRECTION",
                    NOTE,
                    f"Table 5 is for 30 °C outside engine spaces and publishes no factor "
                    f"for {ambient_c:g} °C; the engine-space (50 °C) factor {value:g} for "
                    f"{insulation_c} °C insulation was applied instead, which covers any "
                    f"ambient up to 50 °C.",
                    SOURCES["cfr_engine"],
                )
            )
    bundling = cfr_bundling_factor(bundled)
    if bundling < 1.0:
        multiplier *= bundling
        factors.append(
            Factor(
                f"{bundled} current-carrying conductors bundled", bundling, SOURCES["cfr_bundling"]
            )
        )
        if voltage_v < 50.0:
            findings.append(
                Finding(
                    "BUNDLING_BELOW_50V",
                    NOTE,
                    f"Bundling factor {bundling:g} applied to a {voltage_v:g} V circuit. "
                    "33 CFR 183.435(b) applies the Table 5 bundling factors only to "
                    "conductors of 50 V or more; the newer ABYC E-11 table applies them to "
                    "AC and DC alike, and this tool takes that stricter reading.",
                    SOURCES["cfr_bundling"],
                )
            )
    return AmpacityPlan(
        ac=False,
        column_c=insulation_c,
        multiplier=multiplier,
        cap_column_c=None,
        factors=tuple(factors),
        findings=tuple(findings),
        table_source=f"{SOURCES['cfr_table5']}, {insulation_c} °C column",
    )


def _plan_ac(
    insulation_c: int,
    engine_space: bool,
    bundled: int,
    ambient_c: float | None,
    termination_c: int,
) -> AmpacityPlan:
    column = nec_column_for(insulation_c)
    cap_column = min(column, termination_c)
    factors: list[Factor] = []
    multiplier = 1.0
    ambient = 30.0 if ambient_c is None else ambient_c
    if engine_space:
        # The building-wiring table knows no engine space; take it as the 50 C
        # ambient that 33 CFR 183.425 assumes there.
        ambient = max(ambient, 50.0)
    correction = nec_ambient_factor(ambient, column)
    if correction < 1.0:
        multiplier *= correction
        factors.append(Factor(f"ambient {ambient:g} °C", correction, SOURCES["nec_ambient"]))
    adjustment = nec_adjustment_factor(bundled)
    if adjustment < 1.0:
        multiplier *= adjustment
        factors.append(
            Factor(f"{bundled} current-carrying conductors", adjustment, SOURCES["nec_adjust"])
        )
    if cap_column < column:
        factors.append(
            Factor(
                f"not above the {cap_column} °C column (termination rating)",
                1.0,
                SOURCES["nec_termination"],
            )
        )
    return AmpacityPlan(
        ac=True,
        column_c=column,
        multiplier=multiplier,
        cap_column_c=cap_column if cap_column < column else None,
        factors=tuple(factors),
        findings=(),
        table_source=f"{SOURCES['nec_310_16']}, {column} °C column",
    )


def plan_ampacity(
    *,
    ac: bool,
    insulation_c: int,
    engine_space: bool,
    bundled: int,
    voltage_v: float,
    ambient_c: float | None,
    termination_c: int,
) -> AmpacityPlan:
    """Choose table, column and factors for one circuit (see the module docstring)."""
    if ac:
        return _plan_ac(insulation_c, engine_space, bundled, ambient_c, termination_c)
    return _plan_dc(insulation_c, engine_space, bundled, voltage_v, ambient_c)


def no_value_finding(size: ConductorSize, plan: AmpacityPlan) -> Finding:
    """Blocking: the applicable table has no ampacity for this size."""
    if size.kind == "mm2" and _BASIS[size.label] is None:
        why = f"{size.label} is smaller than 18 AWG, the smallest size the tables rate"
    elif plan.ac:
        why = f"{plan.table_source} has no row for {size.label} (it starts at 14 AWG)"
    else:
        why = f"{plan.table_source} stops at 4/0 AWG; for more current use conductors in parallel"
    return Finding(
        "NO_AMPACITY_VALUE", BLOCKING, f"No published ampacity: {why}.", plan.table_source
    )
