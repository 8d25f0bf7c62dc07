"""Recommendation: the smallest size meeting every constraint, and the reasons for
each smaller size; the 4 vs 4/0 guard; the report the command and page show."""

from __future__ import annotations

import json
from typing import Any

from circuits.sizing import (
    CAUTION,
    SEVERITY_ORDER,
    CircuitInput,
    catalogue,
    parse_size,
    recommend,
    size_circuit,
)

FT = 0.3048  # m (NIST SP 811)


def codes(findings: Any) -> set[str]:
    return {f.code for f in findings}


def test_smallest_size_that_meets_every_constraint() -> None:
    # 12 V, 20 A, 10 ft one way, 105 °C insulation, 10 % limit. By hand with NEC
    # Chapter 9 Table 8 and the copper law (x 339.5/309.5 for 105 °C):
    # 14 AWG: 20 x 3.14/304.8 x 1.0969 x 6.096 m = 1.38 V = 11.5 % -> too much drop;
    # 12 AWG: 20 x 1.98/304.8 x 1.0969 x 6.096 m = 0.869 V = 7.2 %; 45 A (33 CFR
    # 183.425 Table 5) >= 20 A; protection 20-45 A.
    rec = recommend(CircuitInput(12.0, 20.0, 10 * FT))
    assert rec.size == parse_size("12 AWG")
    assert rec.result is not None and rec.result.voltage_drop_pct < 10
    rejected = dict(rec.rejected)
    assert [s.label for s in rejected] == ["18 AWG", "16 AWG", "14 AWG"]
    assert any(r.startswith("voltage drop") for r in rejected[parse_size("14")])
    assert any(r.startswith("minimum size") for r in rejected[parse_size("18")])


def test_thin_conductor_is_ruled_out_by_ampacity() -> None:
    # 40 A over 1 m: 12 AWG 105 °C carries 45 A, 14 AWG 35 A (33 CFR 183.425 Table 5).
    rec = recommend(CircuitInput(12.0, 40.0, 1.0))
    assert rec.size == parse_size("12")
    assert any(r.startswith("ampacity") for r in dict(rec.rejected)[parse_size("14")])


def test_continuous_load_needs_125_percent_ampacity() -> None:
    # NEC 210.19(A)(1): 40 A continuous needs 50 A; 12 AWG (45 A) no, 10 AWG (60 A)
    # yes (33 CFR 183.425 Table 5, 105 °C).
    assert recommend(CircuitInput(12.0, 40.0, 1.0, continuous=True)).size == parse_size("10")


def test_given_fuse_steers_the_size_up_to_what_it_protects() -> None:
    # A 100 A fuse on a 20 A load needs a conductor of at least 100 A: 8 AWG 80 A no,
    # 6 AWG 120 A yes (33 CFR 183.425 Table 5, 105 °C).
    rec = recommend(CircuitInput(12.0, 20.0, 1.0, protection_a=100))
    assert rec.size == parse_size("6")
    assert any(r.startswith("protection") for r in dict(rec.rejected)[parse_size("8")])


def test_ac_feeder_goes_to_kcmil_when_4_0_is_not_enough() -> None:
    # NEC Table 310.16 75 °C: 4/0 230 A < 240 A; 250 kcmil 255 A (from memory).
    rec = recommend(CircuitInput(120.0, 240.0, 10.0, ac=True, insulation_c=75))
    assert rec.size == parse_size("250 kcmil")


def test_metric_recommendation_stays_in_metric_sizes() -> None:
    # 12 V, 20 A, 10 ft: 2.5 mm² (IEC 60228 class 5, 7.98 ohm/km at 20 °C) drops
    # 20 x 7.98e-3 x 339.5/254.5 x 6.096 = 1.30 V = 10.8 %; 4 mm² (4.95) 6.7 %.
    rec = recommend(CircuitInput(12.0, 20.0, 10 * FT, metric=True))
    assert rec.size == parse_size("4 mm²")
    assert "METRIC_AMPACITY_CONVERTED" in codes(rec.result.findings)


def test_nothing_fits_is_blocking_and_suggests_parallel_conductors() -> None:
    # 600 A exceeds 4/0 AWG at 105 °C (445 A, 33 CFR 183.425 Table 5).
    rec = recommend(CircuitInput(12.0, 600.0, 1.0))
    assert rec.size is None and rec.result is None
    assert len(rec.rejected) == len(catalogue("awg"))
    (finding,) = rec.findings
    assert finding.code == "NO_SIZE_FITS" and finding.severity == "blocking"
    assert "parallel" in finding.message


def test_two_in_parallel_carry_what_one_cannot() -> None:
    # 2 x 2/0 AWG at 105 °C = 660 A >= 600 A; 2 x 1/0 = 570 A is short.
    rec = recommend(CircuitInput(12.0, 600.0, 1.0, parallel=2))
    assert rec.size == parse_size("2/0")


def bare(text: str, amps: float) -> Any:
    inp = CircuitInput(12.0, amps, 1.0, size=parse_size(text), size_text=text)
    return size_circuit(inp)


def test_bare_4_where_4_0_needed_is_blocking() -> None:
    # 400 A: 4 AWG carries 160 A, 4/0 AWG 445 A (33 CFR 183.425 Table 5, 105 °C).
    report = bare("4", 400.0)
    f = next(f for f in report.findings if f.code == "SIZE_NOTATION_AUGHT")
    assert f.severity == "blocking"
    assert "4/0" in f.message and "'4'" in f.message


def test_bare_2_where_2_0_needed_is_blocking() -> None:
    # 300 A: 2 AWG carries 210 A, 2/0 AWG 330 A (33 CFR 183.425 Table 5, 105 °C).
    f = next(f for f in bare("2", 300.0).findings if f.code == "SIZE_NOTATION_AUGHT")
    assert f.severity == "blocking" and "2/0" in f.message


def test_marked_4_awg_is_not_taken_for_4_0() -> None:
    report = bare("4 AWG", 400.0)
    assert "SIZE_NOTATION_AUGHT" not in codes(report.findings)
    assert "AMPACITY_BELOW_LOAD" in codes(report.findings)


def test_bare_4_that_serves_the_circuit_only_gets_a_note() -> None:
    report = bare("4", 100.0)
    f = next(f for f in report.findings if f.code == "SIZE_NOTATION_BARE")
    assert f.severity == "note" and not report.blocking


def test_bare_4_where_even_4_0_fails_does_not_guess() -> None:
    # 500 A is more than 4/0 AWG carries (445 A): the aught size is no better answer.
    assert "SIZE_NOTATION_AUGHT" not in codes(bare("4", 500.0).findings)


def test_report_for_a_given_size_carries_a_recommendation_beside_it() -> None:
    inp = CircuitInput(12.0, 20.0, 10 * FT, size=parse_size("10"), size_text="10")
    data = size_circuit(inp).to_dict()
    assert data["size"] == "10 AWG" and data["recommended_size"] == "12 AWG"
    for key in ("ampacity_a", "voltage_drop_v", "voltage_drop_pct", "resistance_ohm_per_m",
                "max_protection_a", "min_protection_a", "findings", "rejected"):  # fmt: skip
        assert key in data
    assert data["caution"] == CAUTION
    json.dumps(data)  # JSON-able


def test_report_without_a_size_evaluates_the_recommendation() -> None:
    report = size_circuit(CircuitInput(12.0, 20.0, 10 * FT))
    assert report.size == report.recommended_size == parse_size("12")
    assert report.to_dict()["ampacity_a"] == 45  # 33 CFR 183.425 Table 5, 105 °C


def test_findings_come_most_serious_first() -> None:
    report = bare("4", 400.0)
    ranks = [SEVERITY_ORDER[f.severity] for f in report.findings]
    assert ranks == sorted(ranks)
    assert all(f.source for f in report.findings)


def test_caution_names_standards_codes_and_a_qualified_person() -> None:
    for words in ("never replaces", "standards", "local codes", "qualified person"):
        assert words in CAUTION
