"""Overcurrent protection: the window between load and conductor."""

from __future__ import annotations

from typing import Any

import pytest

from circuits.sizing import CircuitInput, SizingResult, evaluate, parse_size
from circuits.sizing.protection import STANDARD_RATINGS_A, is_standard_rating, ratings_between


def check(size: str, amps: float, volts: float = 12.0, **kw: Any) -> SizingResult:
    return evaluate(CircuitInput(volts, amps, 1.0, size=parse_size(size), **kw))


def finding(result: SizingResult, code: str) -> Any:
    return next(f for f in result.findings if f.code == code)


# NEC 2023 240.6(A) standard ampere ratings, and its additional standard fuse ratings.
NEC_240_6_A = [15, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 110, 125, 150, 175, 200,
               225, 250, 300, 350, 400, 450, 500, 600, 700, 800, 1000, 1200, 1600, 2000, 2500,
               3000, 4000, 5000, 6000, 1, 3, 6, 10]  # fmt: skip


@pytest.mark.parametrize("rating", NEC_240_6_A)
def test_nec_240_6_a_ratings_are_standard(rating: float) -> None:
    assert is_standard_rating(rating)


@pytest.mark.parametrize("rating", [2, 5, 7.5])
def test_common_small_dc_fuse_ratings_are_standard(rating: float) -> None:
    # Common DC blade and bolt-down fuse ratings (common practice).
    assert is_standard_rating(rating)


def test_ratings_between_is_inclusive_and_ordered() -> None:
    # NEC 240.6(A): 20, 25, 30, 35, 40, 45, 50, 60 lie from 20 to 60 A.
    assert ratings_between(20, 60) == (20, 25, 30, 35, 40, 45, 50, 60)
    assert list(STANDARD_RATINGS_A) == sorted(STANDARD_RATINGS_A)


@pytest.mark.parametrize(
    ("gauge", "table_a", "limit_a"),
    # NEC Table 310.16 75 °C column, and NEC 2023 240.4(D) copper limits.
    [("14", 20, 15), ("12", 25, 20), ("10", 35, 30)],
)
def test_small_ac_conductors_keep_their_breaker_limits(
    gauge: str, table_a: float, limit_a: float
) -> None:
    result = check(gauge, 5.0, volts=120.0, ac=True, insulation_c=75)
    assert result.ampacity_a == table_a
    assert result.max_protection_a == limit_a


def test_small_conductor_limit_applies_to_metric_sizes_by_their_awg_rating() -> None:
    # 2.5 mm² is rated as 14 AWG (next AWG size not larger): NEC 240.4(D) 15 A.
    assert check("2.5 mm²", 5.0, volts=230.0, ac=True).max_protection_a == 15


def test_8_awg_ac_protection_may_reach_its_ampacity() -> None:
    # NEC Table 310.16 75 °C: 8 AWG 50 A; 240.4(D) does not cover 8 AWG.
    assert check("8", 5.0, volts=120.0, ac=True, insulation_c=75).max_protection_a == 50


def test_dc_protection_may_reach_the_derated_ampacity() -> None:
    # 33 CFR 183.425 Table 5: 14 AWG 105 °C 35 A; no 240.4(D) limit on DC.
    assert check("14", 5.0).max_protection_a == 35


def test_ac_breaker_above_the_small_conductor_limit_is_blocking() -> None:
    # NEC 240.4(D): 14 AWG at most 15 A even though its 75 °C ampacity is 20 A.
    result = check("14", 10.0, volts=120.0, ac=True, protection_a=20)
    f = finding(result, "PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT")
    assert f.severity == "blocking" and "240.4(D)" in f.source


def test_fuse_above_the_conductor_is_blocking_and_mentions_the_marine_allowance() -> None:
    # 33 CFR 183.425 Table 5: 10 AWG 105 °C 60 A; an 80 A fuse would let it overheat.
    result = check("10", 20.0, protection_a=80)
    f = finding(result, "PROTECTION_ABOVE_AMPACITY")
    assert f.severity == "blocking"
    assert "150 %" in f.message
    assert result.max_protection_a == 60


def test_fuse_below_the_load_is_blocking() -> None:
    result = check("10", 20.0, protection_a=15)
    assert finding(result, "PROTECTION_BELOW_LOAD").severity == "blocking"


def test_continuous_load_needs_125_percent_protection() -> None:
    # NEC 210.20(A): OCPD at least 125 % of the continuous load; 16 A x 1.25 = 20 A.
    assert check("10", 16.0, continuous=True).min_protection_a == pytest.approx(20.0)
    assert "PROTECTION_BELOW_LOAD" in {
        f.code for f in check("10", 16.0, continuous=True, protection_a=15).findings
    }
    assert "PROTECTION_BELOW_LOAD" not in {
        f.code for f in check("10", 16.0, continuous=True, protection_a=20).findings
    }


def test_odd_rating_is_noted() -> None:
    # 33 A is not in NEC 240.6(A) nor a common DC fuse rating.
    assert finding(check("10", 20.0, protection_a=33), "PROTECTION_NOT_STANDARD").severity == "note"


def test_no_standard_rating_between_load_and_conductor_is_blocking() -> None:
    # 18 AWG 105 °C in an engine space: 20 A x 0.85 = 17 A (33 CFR 183.425 Table 5 and
    # USCG guideline). A 16 A load needs 16-17 A protection; the standard ratings
    # nearby are 15 and 20 A (NEC 240.6(A)).
    result = check("18", 16.0, engine_space=True, sheathed=True)
    assert result.standard_ratings == ()
    assert finding(result, "NO_STANDARD_RATING").severity == "blocking"


def test_small_conductor_limit_below_the_load_is_blocking() -> None:
    # 14 AWG 75 °C carries 20 A (NEC Table 310.16) but may be protected at 15 A
    # (240.4(D)); an 18 A load cannot be protected on it.
    result = check("14", 18.0, volts=120.0, ac=True, insulation_c=75)
    f = finding(result, "PROTECTION_LIMIT_BELOW_LOAD")
    assert f.severity == "blocking" and "15 A" in f.message


def test_parallel_conductors_are_protected_as_a_set() -> None:
    # 33 CFR 183.425 Table 5: 2/0 AWG 105 °C 330 A; two in parallel allow 660 A.
    result = check("2/0", 600.0, parallel=2)
    assert result.max_protection_a == 660
    assert result.standard_ratings == (600,)  # NEC 240.6(A): 600 A, then 700 A
