"""VIN and hull number checks against published rules and worked examples."""

from __future__ import annotations

import pytest

from shop.identifiers import IdentificationError, validate_hin, validate_vin, vin_check_digit


def test_published_worked_example_check_digit_is_x():
    # Wikibooks "Vehicle Identification Numbers (VIN codes)/Check digit", worked example:
    # 1M8GDM9A_KP042788, products sum to 351, 351 mod 11 = 10, so the check digit is X.
    assert vin_check_digit("1M8GDM9A0KP042788") == "X"
    assert validate_vin("1M8GDM9AXKP042788") == "1M8GDM9AXKP042788"


def test_all_ones_vin_is_valid():
    # 49 CFR 565.15 weights sum to 89 for seventeen 1s (position 9 weighs 0); 89 mod 11 = 1
    # (hand arithmetic from the weights 8,7,6,5,4,3,2,10,0,9,8,7,6,5,4,3,2).
    assert sum((8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2)) == 89
    assert validate_vin("11111111111111111") == "11111111111111111"


def test_one_mistyped_character_is_caught_by_the_check_digit():
    with pytest.raises(IdentificationError, match="Check digit"):
        validate_vin("1M8GDM9AXKP042789")


@pytest.mark.parametrize("letter", ["I", "O", "Q"])
def test_letters_i_o_q_are_not_allowed(letter):
    # ISO 3779 / 49 CFR 565.13: I, O and Q are never used in a VIN.
    with pytest.raises(IdentificationError, match=letter):
        validate_vin(f"1M8GDM9AXKP04278{letter}")


@pytest.mark.parametrize("value", ["1M8GDM9AXKP04278", "1M8GDM9AXKP0427888", ""])
def test_vin_must_have_17_characters(value):
    with pytest.raises(IdentificationError, match="17 characters"):
        validate_vin(value)


def test_check_digit_is_not_enforced_outside_north_america():
    # 49 CFR 565 makes the check digit mandatory for North America (region codes 1-5);
    # a European VIN may carry another character at position 9.
    assert validate_vin("WBX12345678901234") == "WBX12345678901234"


def test_vin_is_normalised_to_capitals_without_spaces():
    assert validate_vin(" 1m8gdm9a xkp042788 ") == "1M8GDM9AXKP042788"


def test_hull_number_has_twelve_characters_and_a_month_letter():
    # 33 CFR 181.25 (from memory): builder code, serial, month letter A-L, year digit, model year.
    assert validate_hin("QKW12345D616") == "QKW12345D616"
    assert validate_hin("US-QKW12345D616") == "QKW12345D616"
    with pytest.raises(IdentificationError, match="12 characters"):
        validate_hin("QKW12345D61")
    with pytest.raises(IdentificationError, match="month letter"):
        validate_hin("QKW12345Z616")
