"""Ampacity after every factor, against the published tables."""

from __future__ import annotations

from typing import Any

import pytest

from circuits.sizing import CircuitInput, SizingResult, evaluate, parse_size


def rate(size: str, volts: float = 12.0, amps: float = 1.0, **options: Any) -> SizingResult:
    """Evaluate a light load (so only ampacity matters) on a short run."""
    inp = CircuitInput(volts, amps, 1.0, size=parse_size(size), **options)
    return evaluate(inp)


def codes(result: SizingResult) -> set[str]:
    return {f.code for f in result.findings}


INSULATION = (60, 75, 80, 90, 105, 125, 200)
# 33 CFR 183.425 Table 5, amperes, conductors outside engine spaces, by insulation
# temperature rating (columns as INSULATION).
CFR_TABLE_5 = {
    "18": (10, 10, 15, 20, 20, 25, 25),
    "16": (15, 15, 20, 25, 25, 30, 35),
    "14": (20, 20, 25, 30, 35, 40, 45),
    "12": (25, 25, 35, 40, 45, 50, 55),
    "10": (40, 40, 50, 55, 60, 70, 70),
    "8": (55, 65, 70, 70, 80, 90, 100),
    "6": (80, 95, 100, 100, 120, 125, 135),
    "4": (105, 125, 130, 135, 160, 170, 180),
    "3": (120, 145, 150, 155, 180, 195, 210),
    "2": (140, 170, 175, 180, 210, 225, 240),
    "1": (165, 195, 210, 210, 245, 265, 280),
    "1/0": (195, 230, 245, 245, 285, 305, 325),
    "2/0": (225, 265, 285, 285, 330, 355, 370),
    "3/0": (260, 310, 330, 330, 385, 410, 430),
    "4/0": (300, 360, 385, 385, 445, 475, 510),
}


@pytest.mark.parametrize(
    ("gauge", "insulation", "amps"),
    [(g, t, row[i]) for g, row in CFR_TABLE_5.items() for i, t in enumerate(INSULATION)],
)
def test_outside_engine_spaces_ampacity_is_33_cfr_table_5(
    gauge: str, insulation: int, amps: int
) -> None:
    result = rate(gauge, insulation_c=insulation, sheathed=True)
    assert result.table_ampacity_a == amps
    assert result.ampacity_a == amps


# USCG Electrical System Compliance Guideline, inside-engine-space column for 105 °C
# insulation (0.85 x the outside values, rounded to whole amperes).
USCG_ENGINE_SPACE_105C = {
    "18": 17, "16": 21, "14": 30, "12": 38, "10": 51, "8": 68, "6": 102, "4": 136,
    "3": 153, "2": 178, "1": 208, "1/0": 242, "2/0": 280, "3/0": 327, "4/0": 378,
}  # fmt: skip


@pytest.mark.parametrize(("gauge", "amps"), USCG_ENGINE_SPACE_105C.items())
def test_engine_space_105c_ampacity_is_the_uscg_inside_column(gauge: str, amps: int) -> None:
    result = rate(gauge, engine_space=True, sheathed=True)
    assert result.ampacity_a == pytest.approx(amps, abs=0.5)  # published rounded to 1 A


@pytest.mark.parametrize(
    ("insulation", "factor"),
    # 33 CFR 183.425 Table 5 engine-space factors (from memory); they equal the NEC
    # 46-50 °C ambient factors for 60/75/90 °C. 200 °C: CSA C22.1 Table 5A at 50 °C,
    # 0.94, stricter than the 1.00 recalled for the CFR.
    [(60, 0.58), (75, 0.75), (80, 0.78), (90, 0.82), (125, 0.89), (200, 0.94)],
)
def test_engine_space_factor_by_insulation_rating(insulation: int, factor: float) -> None:
    outside = CFR_TABLE_5["6"][INSULATION.index(insulation)]  # 33 CFR 183.425 Table 5
    assert rate("6", insulation_c=insulation, engine_space=True).ampacity_a == pytest.approx(
        outside * factor
    )


@pytest.mark.parametrize(
    ("bundled", "factor"),
    # 33 CFR 183.425 Table 5 Note 2 (USCG compliance guideline reprint).
    [(1, 1.0), (2, 1.0), (3, 0.70), (4, 0.60), (6, 0.60), (7, 0.50), (24, 0.50), (25, 0.40),
     (40, 0.40)],
)  # fmt: skip
def test_bundling_factor_by_number_of_current_carrying_conductors(
    bundled: int, factor: float
) -> None:
    # 4 AWG, 105 °C: 160 A (33 CFR 183.425 Table 5).
    assert rate("4", volts=50.0, bundled=bundled).ampacity_a == pytest.approx(160 * factor)


def test_engine_space_and_bundling_factors_multiply() -> None:
    # 33 CFR 183.425 Table 5: 4 AWG 105 °C 160 A; engine space 0.85; 3 bundled 0.70.
    result = rate("4", volts=50.0, engine_space=True, bundled=3)
    assert result.ampacity_a == pytest.approx(160 * 0.85 * 0.70)
    assert len(result.factors) == 2


def test_bundling_applies_below_50v_with_a_note_on_its_scope() -> None:
    # 33 CFR 183.435(b) limits the Table 5 bundling factors to 50 V and above; the
    # engine applies them at every voltage (stricter) and says so.
    low = rate("4", volts=12.0, bundled=3)
    high = rate("4", volts=50.0, bundled=3)
    assert low.ampacity_a == high.ampacity_a == pytest.approx(160 * 0.70)
    assert "BUNDLING_BELOW_50V" in codes(low)
    assert "BUNDLING_BELOW_50V" not in codes(high)
    note = next(f for f in low.findings if f.code == "BUNDLING_BELOW_50V")
    assert note.severity == "note" and "183.435(b)" in note.source


def test_hot_ambient_outside_engine_space_takes_the_50c_factor() -> None:
    # Table 5 has no ambient factors; the engine-space (50 °C) factor bounds any
    # ambient up to 50 °C. 8 AWG 105 °C: 80 A x 0.85 (USCG guideline).
    result = rate("8", ambient_c=40.0)
    assert result.ampacity_a == pytest.approx(80 * 0.85)
    assert "AMBIENT_CORRECTION" in codes(result)


def test_parallel_conductors_carry_n_times_the_current() -> None:
    # 33 CFR 183.425 Table 5: 4/0 AWG 105 °C 445 A; two in parallel 890 A.
    result = rate("4/0", parallel=2)
    assert result.table_ampacity_a == 445
    assert result.ampacity_a == 2 * 445


def test_kcmil_has_no_vehicle_table_value() -> None:
    # 33 CFR 183.425 Table 5 stops at 4/0 AWG.
    result = rate("250 kcmil")
    assert result.ampacity_a == 0
    assert "NO_AMPACITY_VALUE" in codes(result)
    assert result.blocking


def test_metric_size_is_rated_as_the_next_awg_size_not_larger() -> None:
    # 35 mm² lies between 2 AWG (33.6 mm²) and 1 AWG (42.4 mm², ASTM B258), so it is
    # rated as 2 AWG: 210 A at 105 °C (33 CFR 183.425 Table 5).
    result = rate("35 mm²")
    assert result.ampacity_a == 210
    note = next(f for f in result.findings if f.code == "METRIC_AMPACITY_CONVERTED")
    assert note.severity == "note" and "2 AWG" in note.message


def test_metric_size_thinner_than_18_awg_has_no_rating() -> None:
    # 0.75 mm² is below 18 AWG (0.823 mm², ASTM B258): no table rates it.
    result = rate("0.75 mm²", sheathed=True)
    assert "NO_AMPACITY_VALUE" in codes(result)


# NEC 2023 Table 310.16, copper, 30 °C ambient, not more than three current-carrying
# conductors: (60 °C, 75 °C, 90 °C).
NEC_310_16 = {
    "14": (15, 20, 25), "12": (20, 25, 30), "10": (30, 35, 40), "8": (40, 50, 55),
    "6": (55, 65, 75), "4": (70, 85, 95), "3": (85, 100, 115), "2": (95, 115, 130),
    "1": (110, 130, 145), "1/0": (125, 150, 170), "2/0": (145, 175, 195),
    "3/0": (165, 200, 225), "4/0": (195, 230, 260),
    # kcmil rows from memory (NEC 2017-2023 Table 310.16).
    "250 kcmil": (215, 255, 290), "300 kcmil": (240, 285, 320), "350 kcmil": (260, 310, 350),
    "400 kcmil": (280, 335, 380), "500 kcmil": (320, 380, 430),
}  # fmt: skip


@pytest.mark.parametrize(
    ("size", "column", "amps"),
    [(s, c, row[i]) for s, row in NEC_310_16.items() for i, c in enumerate((60, 75, 90))],
)
def test_ac_ampacity_is_nec_table_310_16(size: str, column: int, amps: int) -> None:
    # Insulation of the column's rating, terminations rated as high (NEC 110.14(C)).
    result = rate(size, volts=120.0, ac=True, insulation_c=column, termination_c=max(column, 60))
    assert result.table_ampacity_a == amps
    assert result.ampacity_a == amps


def test_ac_105c_wire_is_held_to_the_75c_column_at_the_terminations() -> None:
    # NEC 110.14(C): 105 °C wire derates from the 90 °C column but, on 75 °C
    # terminations, may not exceed the 75 °C column. 6 AWG: 75 / 65 A (Table 310.16).
    plain = rate("6", volts=120.0, ac=True)
    assert plain.table_ampacity_a == 75 and plain.ampacity_a == 65
    assert "TERMINATION_LIMIT" in {f.code for f in plain.findings}
    # With 6 conductors (0.80, NEC Table 310.15(C)(1)): 75 x 0.80 = 60 A < 65 A.
    derated = rate("6", volts=120.0, ac=True, bundled=6)
    assert derated.ampacity_a == pytest.approx(75 * 0.80)


@pytest.mark.parametrize(
    ("ambient", "column", "factor"),
    # NEC 2023 Table 310.15(B)(1)(1), based on 30 °C.
    [(33, 60, 0.91), (35, 75, 0.94), (38, 75, 0.88), (45, 60, 0.71), (45, 90, 0.87),
     (50, 75, 0.75), (55, 90, 0.76), (35.5, 75, 0.88)],
)  # fmt: skip
def test_ac_ambient_correction(ambient: float, column: int, factor: float) -> None:
    # 4 AWG, NEC Table 310.16: 70 / 85 / 95 A.
    table = dict(zip((60, 75, 90), NEC_310_16["4"], strict=True))[column]
    result = rate("4", volts=120.0, ac=True, insulation_c=column, termination_c=column,
                  ambient_c=ambient)  # fmt: skip
    assert result.ampacity_a == pytest.approx(table * factor)


def test_cool_ambient_does_not_raise_ac_ampacity() -> None:
    # NEC Table 310.15(B)(1)(1) would allow more below 26 °C; the engine keeps 1.00.
    assert rate("4", volts=120.0, ac=True, insulation_c=75, ambient_c=15.0).ampacity_a == 85


@pytest.mark.parametrize(
    ("conductors", "factor"),
    # NEC 2023 Table 310.15(C)(1), more than three current-carrying conductors.
    [(3, 1.0), (4, 0.80), (6, 0.80), (7, 0.70), (9, 0.70), (10, 0.50), (20, 0.50),
     (21, 0.45), (30, 0.45), (31, 0.40), (40, 0.40), (41, 0.35)],
)  # fmt: skip
def test_ac_more_than_three_conductors_adjustment(conductors: int, factor: float) -> None:
    # 2/0 AWG 75 °C column: 175 A (NEC Table 310.16).
    result = rate("2/0", volts=120.0, ac=True, insulation_c=75, bundled=conductors)
    assert result.ampacity_a == pytest.approx(175 * factor)


def test_ac_in_an_engine_space_counts_as_50c_ambient() -> None:
    # 33 CFR 183.425: engine spaces at 50 °C; NEC Table 310.15(B)(1)(1) 46-50 °C,
    # 75 °C column 0.75. 10 AWG 75 °C: 35 A (Table 310.16).
    result = rate("10", volts=120.0, ac=True, insulation_c=75, engine_space=True)
    assert result.ampacity_a == pytest.approx(35 * 0.75)


@pytest.mark.parametrize("gauge", ["18", "16"])
def test_ac_has_no_value_below_14_awg(gauge: str) -> None:
    # NEC Table 310.16 starts at 14 AWG.
    result = rate(gauge, volts=120.0, ac=True)
    assert "NO_AMPACITY_VALUE" in codes(result)


def test_18_awg_alone_is_below_the_minimum_size() -> None:
    # 33 CFR 183.425: at least 16 AWG installed separately, 18 AWG inside a sheath.
    alone = rate("18")
    assert "BELOW_MIN_SIZE" in codes(alone) and alone.blocking
    assert "BELOW_MIN_SIZE" not in codes(rate("18", sheathed=True))
    assert "BELOW_MIN_SIZE" not in codes(rate("16"))


def test_metric_minimum_size_follows_iso_10133() -> None:
    # ISO 10133:2012 §7.7: 1 mm² installed separately, 0.75 mm² inside a sheath.
    assert "BELOW_MIN_SIZE" in codes(rate("0.75 mm²"))
    assert "BELOW_MIN_SIZE" not in codes(rate("0.75 mm²", sheathed=True))
    assert "BELOW_MIN_SIZE" not in codes(rate("1 mm²"))
