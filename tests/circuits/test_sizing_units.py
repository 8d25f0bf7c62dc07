"""The project's pint registry and the length/torque parsers.

Check values: NIST SP 811 (2008) Appendix B.9, factors for units listed by kind
of quantity (from memory; they match the exact definitions lb = 0.45359237 kg,
g0 = 9.80665 m/s², in = 0.0254 m, ft = 0.3048 m).
"""

from __future__ import annotations

import pytest

from circuits.sizing import Q_, UnitError, parse_length, parse_torque, ureg
from circuits.sizing.units import torque_unit

# NIST SP 811 App. B.9 (from memory): newton-metres per unit, and half a unit in the
# last printed digit as the tolerance.
NIST_TORQUE_N_M = [
    ("lbf*in", 0.112984829, 5e-10),
    ("lbf*ft", 1.35581795, 5e-9),
    ("kgf*cm", 0.0980665, 1e-15),  # exact
    ("kgf*m", 9.80665, 1e-15),  # exact
    ("ozf*in", 0.007061552, 5e-10),
]


@pytest.mark.parametrize(("unit", "newton_metres", "tolerance"), NIST_TORQUE_N_M)
def test_torque_units_convert_as_nist_sp_811_lists(
    unit: str, newton_metres: float, tolerance: float
) -> None:
    assert Q_(1, unit).to("N*m").magnitude == pytest.approx(newton_metres, abs=tolerance)


def test_newton_metre_is_8_850746_pound_force_inches() -> None:
    # NIST SP 811 App. B.9 (from memory): 1 N·m = 8.850746 lbf·in.
    assert Q_(1, "N*m").to("lbf*in").magnitude == pytest.approx(8.850746, rel=1e-7)


def test_pound_force_is_exactly_4_4482216152605_newtons() -> None:
    # NIST SP 811 App. B.9 (from memory): 1 lbf = 4.448 221 615 260 5 N (exact).
    assert Q_(1, "lbf").to("N").magnitude == pytest.approx(4.4482216152605, rel=1e-13)


def test_foot_and_inch_are_exact_fractions_of_a_metre() -> None:
    # NIST SP 811 App. B.9 (from memory): ft = 0.3048 m, in = 0.0254 m, both exact.
    assert parse_length("1 ft") == pytest.approx(0.3048, rel=1e-15)
    assert parse_length("1 in") == pytest.approx(0.0254, rel=1e-15)


@pytest.mark.parametrize(
    ("text", "metres"),
    [
        ("3 m", 3.0),
        ("10ft", 10 * 0.3048),  # NIST SP 811: ft = 0.3048 m
        ("10 ft", 10 * 0.3048),
        ("120 in", 120 * 0.0254),  # NIST SP 811: in = 0.0254 m
        ("250 cm", 2.5),
        ("2500 mm", 2.5),
        ("4,5 m", 4.5),  # a decimal comma
    ],
)
def test_lengths_are_read_in_the_allowed_units(text: str, metres: float) -> None:
    assert parse_length(text) == pytest.approx(metres, rel=1e-12)


def test_a_quantity_or_a_number_with_unit_is_accepted() -> None:
    assert parse_length(Q_(10, "ft")) == pytest.approx(3.048)
    assert parse_length(12, "in") == pytest.approx(0.3048)


def test_a_quantity_or_number_is_held_to_the_same_range_as_text() -> None:
    with pytest.raises(UnitError, match="between 1 cm and 500 m"):
        parse_length(Q_(1, "km"))
    with pytest.raises(UnitError, match="no unit"):
        parse_length(12)
    with pytest.raises(UnitError, match="not a length"):
        parse_length(Q_(3, "kg"))
    with pytest.raises(UnitError, match="unit we do not read"):
        parse_length(3, "parsec")


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("10 kg", "unit we do not read"),
        ("10", "no unit"),
        ("-3 m", "greater than zero"),
        ("0 ft", "greater than zero"),
        ("3 parsecs-ish", "unit we do not read"),
        ("1.5 yd", "unit we do not read"),  # not on the allow-list: m, mm, cm, ft, in
        ("", "empty"),
    ],
)
def test_bad_lengths_say_what_is_wrong(text: str, fragment: str) -> None:
    with pytest.raises(UnitError, match=fragment):
        parse_length(text)


def test_unit_error_is_a_value_error() -> None:
    assert issubclass(UnitError, ValueError)


@pytest.mark.parametrize(
    ("text", "unit", "newton_metres"),
    [
        ("25 lbf·in", None, 25 * 0.112984829),  # NIST SP 811 App. B.9
        ("25", "in-lb", 25 * 0.112984829),
        (25, "lbf-in", 25 * 0.112984829),
        ("10 ft-lbs", None, 10 * 1.35581795),  # NIST SP 811 App. B.9
        ("10", "lb-ft", 10 * 1.35581795),
        ("12 Nm", None, 12.0),  # "Nm" is the torque unit here, not nanometres
        ("12 N·m", None, 12.0),
        ("50 kgf-cm", None, 50 * 0.0980665),  # exact
        ("40 oz-in", None, 40 * 0.007061552),  # NIST SP 811 App. B.9 (7 figures)
    ],
)
def test_torque_is_read_as_trade_spellings_write_it(
    text: str | int, unit: str | None, newton_metres: float
) -> None:
    assert parse_torque(text, unit) == pytest.approx(newton_metres, rel=1e-7)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [("10 ft", "not a torque"), ("-5 N*m", "zero"), ("10 N*m**(9**9**9)", "do not read")],
)
def test_bad_torques_are_refused(text: str, fragment: str) -> None:
    with pytest.raises(UnitError, match=fragment):
        parse_torque(text)


def test_torque_unit_names_the_pint_expression_of_an_allowed_spelling() -> None:
    assert torque_unit("in-lbs") == "force_pound * inch"
    assert torque_unit("N·m") == str(ureg.newton * ureg.meter)
    with pytest.raises(UnitError, match="do not read"):
        torque_unit("newton * meter ** 9")


def test_quantities_made_elsewhere_share_the_one_registry() -> None:
    from circuits.sizing.units import ureg as again

    assert again is ureg
    assert (Q_(1, "ft") + ureg.Quantity(1, "in")).to("m").magnitude == pytest.approx(0.3302)
