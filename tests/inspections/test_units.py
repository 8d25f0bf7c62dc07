"""Torque units: conversions through the project's one pint registry match NIST SP 811
Appendix B.9, and a unit the shop does not record in is refused in plain words."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError

from circuits.sizing.units import parse_torque
from inspections.units import format_torque, from_nm, nm_per_unit, to_nm, torque_unit_code
from tests.inspections.factories import read

# NIST SP 811 (2008), Appendix B.9, factors to N·m: lbf·in 1.129 848 E-01,
# lbf·ft 1.355 818 E+00, kgf·cm 9.806 65 E-02 (exact). The first two are printed to seven
# digits, so they hold to half a unit in their last digit; the exact one to rounding.
NIST = [
    ("lbf·in", 0.1129848, 0.5e-7),
    ("lbf·ft", 1.355818, 0.5e-6),
    ("kgf·cm", 0.0980665, 1e-15),
    ("N·m", 1.0, 1e-15),
]


@pytest.mark.parametrize("unit, factor, tolerance", NIST)
def test_the_pint_registry_converts_torque_by_the_nist_factors(unit, factor, tolerance):
    assert parse_torque(1.0, unit) == pytest.approx(factor, abs=tolerance)


@pytest.mark.parametrize("unit, factor, tolerance", NIST)
def test_each_recorded_unit_converts_by_the_nist_factor(unit, factor, tolerance):
    code = torque_unit_code(unit)
    assert nm_per_unit(code) == pytest.approx(factor, abs=tolerance)
    assert to_nm(Decimal("25"), code) == pytest.approx(25 * factor, abs=25 * tolerance)
    assert from_nm(to_nm(Decimal("25"), code), code) == pytest.approx(25)


@pytest.mark.parametrize(
    "given, code",
    [
        ("N*m", "N*m"),
        ("N·m", "N*m"),
        ("lbf*in", "lbf*in"),
        ("lbf·ft", "lbf*ft"),
        ("kgf·cm", "kgf*cm"),
    ],
)
def test_a_unit_is_known_by_its_code_or_its_label(given, code):
    assert torque_unit_code(given) == code


@pytest.mark.parametrize(
    "unit, words",
    [("m", "not a torque unit"), ("bogons", "not a torque unit"), ("kgf·m", "is a torque unit")],
)
def test_a_unit_that_is_not_one_of_the_shops_is_refused(unit, words):
    with pytest.raises(ValidationError) as exc_info:
        torque_unit_code(unit)
    assert words in exc_info.value.messages[0]


def test_torque_is_shown_without_trailing_zeros():
    assert format_torque(Decimal("12.500"), "lbf*in") == "12.5 lbf·in"
    assert format_torque(Decimal("10"), "N*m") == "10 N·m"


@pytest.mark.django_db
def test_a_reading_stores_its_value_in_newton_metres(install, termination, wrench, technician):
    # 100 lbf·in × 0.112 984 8 = 11.298 48 N·m (NIST SP 811 B.9).
    record = read(termination, install, "100", unit="lbf·in", technician=technician, wrench=wrench)
    assert record.value_nm == pytest.approx(11.29848, abs=100 * 0.5e-7)
    # 7 lbf·ft × 1.355 818 = 9.490 726 N·m.
    record = read(termination, install, "7", unit="lbf·ft", technician=technician, wrench=wrench)
    assert record.value_nm == pytest.approx(9.490726, abs=7 * 0.5e-6)
    # 100 kgf·cm × 0.098 066 5 = 9.806 65 N·m (exact).
    record = read(termination, install, "100", unit="kgf·cm", technician=technician, wrench=wrench)
    assert record.value_nm == pytest.approx(9.80665, rel=1e-12)
