"""The one strict parser of quantities typed by people (circuits.sizing.quantity).

Check values: NIST SP 811 (2008) Appendix B.9 (from memory): 1 ft = 0.3048 m and
1 in = 0.0254 m (exact), 1 lbf·in = 0.112 984 8 N·m, 1 lbf·ft = 1.355 818 N·m,
1 kgf·cm = 0.098 066 5 N·m (exact).
"""

from __future__ import annotations

import contextlib
import time

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from circuits.sizing import UnitError
from circuits.sizing.quantity import (
    KINDS,
    LIMITS,
    MAX_CHARS,
    from_number,
    parse_quantity,
    unit_key,
)
from circuits.sizing.units import ureg


@pytest.mark.parametrize(
    ("text", "kind", "si", "unit"),
    [
        # length: m, mm, cm, ft, in and their spellings
        ("3 m", "length", 3.0, "m"),
        ("3 metres", "length", 3.0, "m"),
        ("3 Meter", "length", 3.0, "m"),
        ("250 cm", "length", 2.5, "cm"),
        ("2500 mm", "length", 2.5, "mm"),
        ("10 ft", "length", 3.048, "ft"),
        ("10 feet", "length", 3.048, "ft"),
        ("10'", "length", 3.048, "ft"),
        ("10′", "length", 3.048, "ft"),
        ("1 foot", "length", 0.3048, "ft"),
        ("120 in", "length", 3.048, "in"),
        ('120"', "length", 3.048, "in"),
        ("120″", "length", 3.048, "in"),
        ("1 inch", "length", 0.0254, "in"),
        ("12 inches", "length", 0.3048, "in"),
        # torque: N·m, lbf·in, lbf·ft, kgf·cm and the ways a wrench scale writes them
        ("12 N·m", "torque", 12.0, "N·m"),
        ("12 N⋅m", "torque", 12.0, "N·m"),
        ("12 N*m", "torque", 12.0, "N·m"),
        ("12 N-m", "torque", 12.0, "N·m"),
        ("12 N.m", "torque", 12.0, "N·m"),
        ("12 N m", "torque", 12.0, "N·m"),
        ("12 Nm", "torque", 12.0, "N·m"),  # the torque unit here, not nanometres
        ("25 lbf·in", "torque", 25 * 0.1129848, "lbf·in"),
        ("25 lb-in", "torque", 25 * 0.1129848, "lbf·in"),
        ("25 in-lbs", "torque", 25 * 0.1129848, "lbf·in"),
        ("25 in·lb", "torque", 25 * 0.1129848, "lbf·in"),
        ("10 lbf·ft", "torque", 10 * 1.355818, "lbf·ft"),
        ("10 ft-lbs", "torque", 10 * 1.355818, "lbf·ft"),
        ("10 ft·lb", "torque", 10 * 1.355818, "lbf·ft"),
        ("10 lb-ft", "torque", 10 * 1.355818, "lbf·ft"),
        ("50 kgf·cm", "torque", 50 * 0.0980665, "kgf·cm"),
        ("50 kg-cm", "torque", 50 * 0.0980665, "kgf·cm"),
        # current, voltage, temperature, percent
        ("20 A", "current", 20.0, "A"),
        ("20 amps", "current", 20.0, "A"),
        ("500 mA", "current", 0.5, "mA"),
        ("1.5 kA", "current", 1500.0, "kA"),
        ("20", "current", 20.0, "A"),  # a bare current is in amps
        ("12 V", "voltage", 12.0, "V"),
        ("24 volts", "voltage", 24.0, "V"),
        ("0.4 kV", "voltage", 400.0, "kV"),
        ("12000 mV", "voltage", 12.0, "mV"),
        ("90 °C", "temperature", 90.0, "°C"),
        ("90 C", "temperature", 90.0, "°C"),
        ("90 degC", "temperature", 90.0, "°C"),
        ("194 °F", "temperature", 90.0, "°F"),  # (194 - 32) × 5/9
        ("10 %", "percent", 10.0, "%"),
    ],
)
def test_each_kind_reads_the_units_on_its_allow_list(text, kind, si, unit):
    parsed = parse_quantity(text, kind=kind)
    assert parsed.value == pytest.approx(si, rel=5e-7)  # factors given to 7 figures
    assert parsed.unit == unit


@pytest.mark.parametrize(
    ("text", "kind", "si"),
    [
        ("1 ft", "length", 0.3048),  # NIST SP 811: exact
        ("1 in", "length", 0.0254),  # NIST SP 811: exact
        ("1 lbf·in", "torque", 0.1129848),  # NIST SP 811 App. B.9, 7 figures
        ("1 lbf·ft", "torque", 1.355818),  # NIST SP 811 App. B.9, 7 figures
        ("1 kgf·cm", "torque", 0.0980665),  # NIST SP 811: exact
    ],
)
def test_conversions_match_nist_sp_811(text, kind, si):
    assert parse_quantity(text, kind=kind).value == pytest.approx(si, rel=5e-7)


def test_foot_and_inch_are_exact():
    # NIST SP 811: 1 ft = 0.3048 m and 1 in = 0.0254 m by definition.
    assert parse_quantity("1 ft", kind="length").value == pytest.approx(0.3048, rel=1e-15)
    assert parse_quantity("1 in", kind="length").value == pytest.approx(0.0254, rel=1e-15)


@pytest.mark.parametrize(
    ("text", "kind", "fragment"),
    [
        ("10 parsecs", "length", "the length 10 parsecs has a unit we do not read; write m, mm, "
                                 "cm, ft or in"),
        ("10 yd", "length", "unit we do not read"),
        ("10 km", "length", "unit we do not read"),
        ("10 (", "length", "unit we do not read"),
        ("10 m/0", "length", "unit we do not read"),
        ("10 'ft'", "length", "unit we do not read"),
        ("10 m**(9**9**9)", "length", "unit we do not read"),
        ("10 m²", "length", "not a digit we read"),
        ("²", "length", "not a digit we read"),
        ("½ m", "length", "not a digit we read"),
        ("10 kg", "length", "unit we do not read"),
        ("10 ft", "torque", "is a length, not a torque"),
        ("20 V", "current", "is a voltage, not a current"),
        ("12 N·m", "length", "is a torque, not a length"),
        ("10", "length", "has no unit"),
        ("10", "torque", "has no unit"),
        ("", "length", "is empty"),
        ("   ", "current", "is empty"),
        ("ten feet", "length", "cannot read the length"),
        ("1.2.3 m", "length", "cannot read"),
        ("3 4 m", "length", "cannot read"),
        ("- 5 A", "current", "cannot read"),
        ("1e7 mm", "length", "exponent beyond e±6"),
        ("1e308 V", "voltage", "exponent beyond e±6"),
        ("1e-300 m", "length", "exponent beyond e±6"),
        ("nan", "current", "not a finite number"),
        ("-inf", "current", "not a finite number"),
        ("Infinity", "voltage", "not a finite number"),
        ("-5 A", "current", "greater than zero"),
        ("\u22125 A", "current", "greater than zero"),  # a typographic minus sign
        ("0 ft", "length", "greater than zero"),
        ("600 m", "length", "between 1 cm and 500 m"),
        ("20 kA", "current", "between 0.01 A and 10 kA"),
        ("1001 V", "voltage", "between 1 V and 1000 V"),
        ("3000 N·m", "torque", "between 0 and 2000 N·m"),
        ("300 °C", "temperature", "between -50 °C and 250 °C"),
        ("10 MA", "current", "unit we do not read"),  # mega, not milli
        ("1" * (MAX_CHARS + 1), "length", "at most 40"),
    ],
)  # fmt: skip
def test_bad_entries_are_refused_with_words_for_the_field(text, kind, fragment):
    with pytest.raises(UnitError, match=fragment):
        parse_quantity(text, kind=kind)


@pytest.mark.parametrize(
    ("text", "si"),
    [
        ("١٠ m", 10.0),  # Arabic-Indic digits
        ("۱۲ m", 12.0),  # Extended Arabic-Indic digits
        ("३.५ m", 3.5),  # Devanagari digits
        ("１０ m", 10.0),  # full-width digits
    ],
)
def test_unicode_decimal_digits_are_read_as_digits(text, si):
    parsed = parse_quantity(text, kind="length")
    assert parsed.value == pytest.approx(si)
    assert parsed.number.isascii()


@pytest.mark.parametrize("text", ["4,5 m", "4.5 m", "4,5m", "+4.5 m", " 4.5\u00a0m "])
def test_a_decimal_comma_or_point_and_spacing_read_the_same(text):
    assert parse_quantity(text, kind="length").value == 4.5


def test_an_exponent_within_six_is_read():
    assert parse_quantity("1.5e2 m", kind="length").value == pytest.approx(150.0)
    assert parse_quantity("2E-2 m", kind="length").value == pytest.approx(0.02)


def test_a_bare_number_takes_the_default_unit():
    parsed = parse_quantity("12", kind="length", default_unit="ft")
    assert parsed.value == pytest.approx(12 * 0.3048)  # NIST SP 811: ft = 0.3048 m
    assert (parsed.unit, parsed.typed) == ("ft", False)
    assert parse_quantity("25", kind="torque", default_unit="in-lb").unit == "lbf·in"


def test_each_field_has_its_own_range_and_name():
    with pytest.raises(UnitError, match="protection distance cannot be negative"):
        parse_quantity("-1 m", kind="length", field="distance")
    assert parse_quantity("0 m", kind="length", field="distance").value == 0.0
    with pytest.raises(UnitError, match="whole number"):
        parse_quantity("2.5", kind="number", field="bundled")
    with pytest.raises(UnitError, match="at least 1 and at most 100"):
        parse_quantity("1e3", kind="number", field="bundled")
    with pytest.raises(UnitError, match="without a unit"):
        parse_quantity("4 m", kind="number", field="parallel")
    with pytest.raises(UnitError, match="the one-way length"):
        parse_quantity("0 m", kind="length", what="one-way length")


def test_limits_are_a_consistent_table():
    for name, limit in LIMITS.items():
        assert limit.kind in KINDS, name
        assert limit.low <= limit.high, name
        assert limit.range and limit.what, name
    # The kinds with a default range have one named after them.
    for kind in ("length", "torque", "current", "voltage", "temperature", "percent", "number"):
        assert LIMITS[kind].kind == kind


def test_the_decimal_keeps_the_digits_typed_in_the_si_unit():
    assert str(parse_quantity("7.5", kind="current", field="protection").decimal) == "7.5"
    assert str(parse_quantity("1e1", kind="current").decimal) == "10"
    assert str(parse_quantity("500 mA", kind="current").decimal) == "0.5"


def test_a_number_already_read_is_held_to_the_same_rules():
    assert from_number(25, "in-lb", kind="torque").value == pytest.approx(25 * 0.1129848)
    with pytest.raises(UnitError, match="not a finite number"):
        from_number(float("nan"), "N*m", kind="torque")
    with pytest.raises(UnitError, match="not a finite number"):
        from_number(10**400, "A", kind="current")
    with pytest.raises(UnitError, match="between 0 and 2000 N·m"):
        from_number(5000, "lbf*ft", kind="torque")
    with pytest.raises(UnitError, match="unit we do not read"):
        from_number(5, "newton * meter ** 9", kind="torque")
    assert unit_key("torque", "kgf*cm") == "kgf·cm"


def test_typed_text_never_reaches_pints_expression_parser(monkeypatch):
    def refuse(*args, **kwargs):
        raise AssertionError("typed text was handed to pint to evaluate")

    # The unit objects are built once, from the module's own names (on the first call);
    # after that no text of any kind reaches the registry's parsers.
    parse_quantity("1 m", kind="length")

    for name in ("parse_expression", "parse_units", "parse_unit_name"):
        monkeypatch.setattr(ureg, name, refuse, raising=False)
    assert parse_quantity("10 ft", kind="length").value == pytest.approx(3.048)
    assert parse_quantity("25 in-lb", kind="torque").unit == "lbf·in"
    assert parse_quantity("98.6 F", kind="temperature").value == pytest.approx(37.0)
    assert parse_quantity("500 mA", kind="current").value == pytest.approx(0.5)
    with pytest.raises(UnitError, match="unit we do not read"):
        parse_quantity("10 m**(9**9**9)", kind="length")


def test_length_exponent_is_refused_quickly():
    # pint once evaluated the exponent of this 15-character length, for good.
    started = time.perf_counter()
    with pytest.raises(UnitError, match="unit we do not read"):
        parse_quantity("10 m**(9**9**9)", kind="length")
    with pytest.raises(UnitError, match="exponent beyond"):
        parse_quantity("1e999999999 m", kind="length")
    assert time.perf_counter() - started < 0.5


def test_parser_is_linear_on_a_megabyte():
    # A megabyte is refused by the length limit before any other work is done.
    megabyte = "1" * 1_000_000 + " m"
    started = time.perf_counter()
    with pytest.raises(UnitError, match="at most 40"):
        parse_quantity(megabyte, kind="length")
    with pytest.raises(UnitError, match="at most 40"):
        parse_quantity(" " * 1_000_000 + "1" + "." * 1_000_000, kind="length")
    assert time.perf_counter() - started < 0.5
    # The worst cases within the limit: 40 characters of digits, of digits then an
    # unknown unit, of foreign digits, of separators; each parses or is refused at once.
    worst = [
        "9" * 39 + "m",
        "1" + " " * 37 + "ft",
        "١" * 38 + " m",
        "1 " + "·-" * 19,
        "1e" + "9" * 38,
        "1." + "0" * 35 + " in",
    ]
    started = time.perf_counter()
    for _ in range(200):
        for text in worst:
            assert len(text) <= MAX_CHARS
            with contextlib.suppress(UnitError):
                parse_quantity(text, kind="length")
    assert time.perf_counter() - started < 1.0


@settings(max_examples=300, deadline=None)
@given(
    text=st.text(max_size=60)
    | st.from_regex(r"[-+]?[0-9٠-٩]{0,8}[.,]?[0-9]{0,4}(e[-+]?[0-9]{1,3})?\s?[a-zA-Z°'\"·*-]{0,8}",
                    fullmatch=True),
    kind=st.sampled_from(KINDS),
)  # fmt: skip
def test_any_text_is_read_within_range_or_refused_with_a_unit_error(text, kind):
    try:
        parsed = parse_quantity(text, kind=kind)
    except UnitError as exc:
        assert str(exc)
        return
    limit = LIMITS[kind]
    assert limit.admits(parsed.value)
    assert parsed.number.isascii()
