"""Conductor catalogue: cross-sections and resistances against published values."""

from __future__ import annotations

import math

import pytest

from circuits.sizing import catalogue, resistance_ohm_per_m, temperature_factor
from circuits.sizing.catalogue import awg, kcmil, mm2

FT_PER_KFT_IN_M = 304.8  # 1000 ft in metres (NIST SP 811: ft = 0.3048 m)


def diameter_in(area_mm2: float) -> float:
    return math.sqrt(4.0 * area_mm2 / math.pi) / 25.4


# ASTM B258 diameters, inches (tabulated to 4 significant figures), as reprinted in
# Kuphaldt, Lessons in Electric Circuits vol. V.
ASTM_B258_DIAMETER_IN = {
    "4/0": 0.4600, "3/0": 0.4096, "2/0": 0.3648, "1/0": 0.3249, "1": 0.2893,
    "2": 0.2576, "4": 0.2043, "6": 0.1620, "8": 0.1285, "10": 0.1019,
    "12": 0.08081, "14": 0.06408, "16": 0.05082, "18": 0.04030,
}  # fmt: skip


@pytest.mark.parametrize(("gauge", "published_in"), ASTM_B258_DIAMETER_IN.items())
def test_awg_cross_section_follows_the_astm_b258_diameter_law(
    gauge: str, published_in: float
) -> None:
    # Published to 4 significant figures: agree within half a unit in the 4th figure.
    assert diameter_in(awg(gauge).area_mm2) == pytest.approx(published_in, rel=6e-4)


def test_10_awg_is_2_588_mm_across_and_5_261_mm2() -> None:
    # Encyclopedia article "American wire gauge" worked example (ASTM B258 formula).
    size = awg("10")
    assert diameter_in(size.area_mm2) * 25.4 == pytest.approx(2.588, abs=5e-4)
    assert size.area_mm2 == pytest.approx(5.261, abs=5e-4)


# NEC Chapter 9 Table 8, area in circular mils. NEC squares the rounded diameter, so
# the exact formula differs from it by up to 0.1 % (1/0: 105,535 vs 105,600), and
# it prints 16 and 18 AWG to three figures (1,620 for 1,624): 0.3 % covers both.
NEC8_CMIL = {
    "4/0": 211_600, "3/0": 167_800, "2/0": 133_100, "1/0": 105_600, "1": 83_690,
    "2": 66_360, "4": 41_740, "6": 26_240, "8": 16_510, "10": 10_380, "12": 6_530,
    "14": 4_110, "16": 2_580, "18": 1_620,
}  # fmt: skip


@pytest.mark.parametrize(("gauge", "cmil"), NEC8_CMIL.items())
def test_awg_area_agrees_with_nec_table_8_circular_mils(gauge: str, cmil: int) -> None:
    assert awg(gauge).area_cmil == pytest.approx(cmil, rel=3e-3)


def test_kcmil_sizes_are_thousands_of_circular_mils() -> None:
    # Definition: 1 cmil = area of a circle 0.001 in across = 5.067075e-4 mm².
    assert kcmil(250).area_mm2 == pytest.approx(250_000 * 5.067075e-4, rel=1e-6)


# NEC 2023 Chapter 9 Table 8, stranded copper, ohm per 1000 ft at 75 °C:
# (uncoated, coated).
NEC8_STRANDED = {
    "18": (7.95, 8.45), "16": (4.99, 5.29), "14": (3.14, 3.26), "12": (1.98, 2.05),
    "10": (1.24, 1.29), "8": (0.778, 0.809), "6": (0.491, 0.510), "4": (0.308, 0.321),
    "3": (0.245, 0.254), "2": (0.194, 0.201), "1": (0.154, 0.160), "1/0": (0.122, 0.127),
    "2/0": (0.0967, 0.101), "3/0": (0.0766, 0.0797), "4/0": (0.0608, 0.0626),
}  # fmt: skip


@pytest.mark.parametrize(("gauge", "values"), NEC8_STRANDED.items())
def test_stranded_resistance_at_75c_is_nec_table_8(gauge: str, values: tuple[float, float]) -> None:
    plain, coated = values
    size = awg(gauge)
    assert resistance_ohm_per_m(size, 75.0) * FT_PER_KFT_IN_M == pytest.approx(plain, rel=1e-9)
    assert resistance_ohm_per_m(size, 75.0, tinned=True) * FT_PER_KFT_IN_M == pytest.approx(
        coated, rel=1e-9
    )


def test_stranded_not_solid_rows_are_used() -> None:
    # NEC Chapter 9 Table 8 solid uncoated 14 AWG is 3.07 ohm/kft, stranded 3.14: a
    # stranded conductor has the higher resistance, and vehicles use stranded.
    assert resistance_ohm_per_m(awg("14"), 75.0) * FT_PER_KFT_IN_M > 3.07


@pytest.mark.parametrize(
    ("size_kcmil", "ohm_per_kft"),
    # NEC Chapter 9 Table 8, uncoated copper, 75 °C (from memory).
    [(250, 0.0515), (300, 0.0429), (350, 0.0367), (400, 0.0321), (500, 0.0258)],
)
def test_kcmil_resistance_at_75c_is_nec_table_8(size_kcmil: int, ohm_per_kft: float) -> None:
    value = resistance_ohm_per_m(kcmil(size_kcmil), 75.0) * FT_PER_KFT_IN_M
    assert value == pytest.approx(ohm_per_kft, rel=1e-9)


def test_14_awg_stranded_is_2_582_ohm_per_kft_at_20c() -> None:
    # NEC Chapter 9 Table 8 (3.14 ohm/kft at 75 °C) with the Table 8 note's
    # alpha = 0.00323 referenced to 75 °C: 3.14 x (1 + 0.00323 x (20 - 75)) = 2.582.
    value = resistance_ohm_per_m(awg("14"), 20.0) * FT_PER_KFT_IN_M
    assert value == pytest.approx(3.14 * (1 + 0.00323 * (20 - 75)), rel=2e-4)
    assert value == pytest.approx(2.582, abs=5e-4)


@pytest.mark.parametrize("t2", [-20.0, 20.0, 50.0, 90.0, 105.0, 125.0])
def test_temperature_law_matches_the_nec_table_8_alpha(t2: float) -> None:
    # NEC Chapter 9 Table 8 note: R2 = R1 [1 + 0.00323 (T2 - 75)], copper.
    # 1/309.5 = 0.0032310, so the two agree to within 0.03 % over this range.
    assert temperature_factor(75.0, t2) == pytest.approx(1 + 0.00323 * (t2 - 75), rel=3e-4)


@pytest.mark.parametrize("t2", [0.0, 40.0, 75.0, 105.0])
def test_temperature_law_is_the_ac_43_13_form(t2: float) -> None:
    # FAA AC 43.13-1B §11-66: L2 = 254.5 L1 / (234.5 + T2) for lengths at equal drop,
    # so resistance scales by (234.5 + T2) / 254.5 from 20 °C.
    assert temperature_factor(20.0, t2) == pytest.approx((234.5 + t2) / 254.5, rel=1e-12)


@pytest.mark.parametrize(
    ("t", "k_t"),
    # IEC 60228 Annex B correction factors k_t to 20 °C.
    [(10, 1.042), (30, 0.962), (40, 0.926), (50, 0.893), (60, 0.862), (75, 0.820), (90, 0.781),
     (100, 0.758)],
)  # fmt: skip
def test_temperature_law_is_within_half_a_percent_of_iec_60228_k_t(t: float, k_t: float) -> None:
    # IEC 60228 uses about 250/(230 + t) (alpha20 = 0.004); the engine's 234.5 °C law
    # (alpha20 = 0.00393) differs by under 0.5 % over 10-100 °C.
    assert temperature_factor(t, 20.0) == pytest.approx(k_t, rel=5e-3)


# IEC 60228 class 5 (flexible) copper, maximum ohm per km at 20 °C: (plain, tinned).
# 0.75 and 1 mm² from memory; the rest confirmed in two reproductions of the table.
IEC60228_CLASS5 = {
    0.75: (26.0, 26.7), 1.0: (19.5, 20.0), 1.5: (13.3, 13.7), 2.5: (7.98, 8.21),
    4.0: (4.95, 5.09), 6.0: (3.30, 3.39), 10.0: (1.91, 1.95), 16.0: (1.21, 1.24),
    25.0: (0.780, 0.795), 35.0: (0.554, 0.565), 50.0: (0.386, 0.393),
    70.0: (0.272, 0.277), 95.0: (0.206, 0.210), 120.0: (0.161, 0.164),
}  # fmt: skip


@pytest.mark.parametrize(("area", "values"), IEC60228_CLASS5.items())
def test_metric_resistance_at_20c_is_iec_60228_class_5(
    area: float, values: tuple[float, float]
) -> None:
    plain, tinned = values
    assert resistance_ohm_per_m(mm2(area), 20.0) * 1000 == pytest.approx(plain, rel=1e-9)
    assert resistance_ohm_per_m(mm2(area), 20.0, tinned=True) * 1000 == pytest.approx(
        tinned, rel=1e-9
    )


def test_resistance_and_area_agree_with_the_resistivity_of_copper() -> None:
    # IEC 60028 annealed copper: 1/58 ohm mm²/m at 20 °C. Stranding lengthens each
    # strand by about 2 %, so NEC stranded values times their areas sit 1-3 % above
    # it; IEC 60228 class 5 maxima sit 10-17 % above. A wrong area or a solid row
    # would fall outside these bands.
    rho_20 = 1 / 58
    for size in catalogue():
        ratio = resistance_ohm_per_m(size, 20.0) * size.area_mm2 / rho_20
        band = (1.10, 1.17) if size.kind == "mm2" else (1.01, 1.03)
        assert band[0] < ratio < band[1], size.label


def test_tinned_conductor_has_the_higher_resistance() -> None:
    # NEC Chapter 9 Table 8 coated > uncoated, IEC 60228 tinned > plain, every row.
    for size in catalogue():
        assert resistance_ohm_per_m(size, 20.0, tinned=True) > resistance_ohm_per_m(size, 20.0)


def test_catalogue_runs_from_thinnest_to_thickest() -> None:
    sizes = catalogue()
    assert [s.area_mm2 for s in sizes] == sorted(s.area_mm2 for s in sizes)
    assert sizes[0].label == "0.75 mm²" and sizes[-1].label == "500 kcmil"
    assert awg("4") < awg("4/0") < kcmil(250)


def test_catalogue_holds_every_size_the_issue_names() -> None:
    labels = {s.label for s in catalogue()}
    awg_labels = {f"{n} AWG" for n in (18, 16, 14, 12, 10, 8, 6, 4, 3, 2, 1)}
    awg_labels |= {f"{m}/0 AWG" for m in (1, 2, 3, 4)}
    kcmil_labels = {f"{k} kcmil" for k in (250, 300, 350, 400, 500)}
    metric = (0.75, 1, 1.5, 2.5, 4, 6, 10, 16, 25, 35, 50, 70, 95, 120)
    assert labels == awg_labels | kcmil_labels | {f"{a:g} mm²" for a in metric}
