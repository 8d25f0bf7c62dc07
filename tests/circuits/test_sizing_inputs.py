"""Validation of the circuit input: each mistake gets its own plain message."""

from __future__ import annotations

from typing import Any

import pytest

from circuits.sizing import CircuitInput, SizingError, evaluate


def make(**overrides: Any) -> CircuitInput:
    values: dict[str, Any] = {"system_voltage_v": 12.0, "current_a": 20.0, "length_m": 3.0}
    values.update(overrides)
    return CircuitInput(**values)


@pytest.mark.parametrize(
    ("overrides", "fragment"),
    [
        ({"current_a": 0.0}, "current must be greater than zero"),
        ({"current_a": -5.0}, "current must be greater than zero"),
        ({"length_m": 0.0}, "length must be greater than zero"),
        ({"length_m": -1.0}, "length must be greater than zero"),
        ({"system_voltage_v": 0.0}, "voltage must be greater than zero"),
        ({"current_a": float("nan")}, "current must be greater than zero"),
        ({"insulation_c": 70}, "unsupported insulation rating 70"),
        ({"bundled": 0}, "bundled conductors must be at least 1"),
        ({"parallel": 0}, "parallel conductors must be at least 1"),
        ({"parallel": 1.5}, "whole number"),
        ({"drop_limit_pct": 0.0}, "voltage-drop limit must be greater than zero"),
        ({"drop_limit_pct": 150.0}, "at most 100"),
        ({"protection_a": -10.0}, "protection rating must be greater than zero"),
        ({"ambient_c": 60.0}, "ambient temperature 60"),
        ({"ac": True, "ambient_c": 60.0}, "ambient temperature 60"),
        ({"conductor_temp_c": 400.0}, "conductor temperature 400"),
        ({"termination_c": 105}, "termination rating"),
    ],
)
def test_bad_input_is_refused_with_a_specific_message(
    overrides: dict[str, Any], fragment: str
) -> None:
    with pytest.raises(SizingError, match=fragment):
        make(**overrides)


def test_every_published_insulation_rating_is_accepted() -> None:
    # 33 CFR 183.425 Table 5 columns.
    for rating in (60, 75, 80, 90, 105, 125, 200):
        assert make(insulation_c=rating).insulation_c == rating


def test_defaults_are_105c_insulation_and_the_10_percent_limit() -> None:
    inp = make()
    assert inp.insulation_c == 105
    assert inp.effective_drop_limit_pct == 10  # ABYC E-11, non-critical loads
    assert make(critical=True).effective_drop_limit_pct == 3  # ABYC E-11, critical
    assert inp.effective_conductor_temp_c == 105


def test_evaluate_needs_a_size() -> None:
    with pytest.raises(SizingError, match="recommend"):
        evaluate(make())


def test_sizing_error_is_a_value_error() -> None:
    assert issubclass(SizingError, ValueError)
