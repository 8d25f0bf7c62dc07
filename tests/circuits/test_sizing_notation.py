"""Reading sizes as people write them, and printing them in trade notation."""

from __future__ import annotations

import pytest

from circuits.sizing import (
    ACCEPTED_FORMS,
    SizeNotationError,
    catalogue,
    format_size,
    is_bare_number,
    parse_size,
)

# Trade notation (common practice): the aught sizes are written m/0, m-0, a run of
# m zeros, or "m aught"/"m ought"; "#", "ga" and "AWG" mark a gauge number.
SAME_SIZE = {
    "4/0 AWG": ["4/0", "0000", "4-0", "4/0 AWG", "4/0 awg", "#4/0", "four aught", "4 aught",
                "4 ought", "Four Ought", "quad aught"],
    "2/0 AWG": ["00", "2/0", "2-0", "2 ought", "two aught", "double aught"],
    "1/0 AWG": ["0", "1/0", "one aught", "aught", "#0"],
    "3/0 AWG": ["000", "3/0", "three aught", "triple aught"],
    "4 AWG": ["#4", "4 AWG", "4AWG", "4 ga", "4 gauge", "No. 4", "4"],
    "35 mm²": ["35 mm²", "35mm2", "35 sq mm", "35 mm^2", "35 sqmm", "35 MM2"],
    "1.5 mm²": ["1.5 mm²", "1,5 mm2"],
    "250 kcmil": ["250 kcmil", "250 MCM", "250kcmil"],
}  # fmt: skip


@pytest.mark.parametrize(
    ("written", "label"), [(w, label) for label, ws in SAME_SIZE.items() for w in ws]
)
def test_every_way_of_writing_a_size_reads_as_that_size(written: str, label: str) -> None:
    assert parse_size(written).label == label


@pytest.mark.parametrize("size", catalogue(), ids=lambda s: s.label)
def test_trade_notation_round_trips(size: object) -> None:
    assert parse_size(format_size(size)) == size


def test_sizes_print_in_trade_notation() -> None:
    assert format_size(parse_size("0000")) == "4/0 AWG"
    assert format_size(parse_size("#4")) == "4 AWG"
    assert format_size(parse_size("35mm2")) == "35 mm²"


def test_a_bare_number_is_remembered_as_bare() -> None:
    assert parse_size("4").written_bare
    assert parse_size(" 2 ").written_bare
    assert not parse_size("4 AWG").written_bare
    assert not parse_size("#4").written_bare
    assert not parse_size("4/0").written_bare


def test_bare_and_marked_4_are_the_same_size() -> None:
    assert parse_size("4") == parse_size("4 AWG")


def test_a_lone_zero_is_not_ambiguous() -> None:
    # "0" can only be 1/0 AWG: no 4 vs 4/0 style question arises.
    assert not is_bare_number("0")
    assert not is_bare_number("00")
    assert is_bare_number("4")


@pytest.mark.parametrize(
    ("written", "hint"),
    [
        ("5", "not an AWG size"),
        ("35", "35 mm²"),
        ("5/0", "1/0 to 4/0"),
        ("7 mm²", "not in the catalogue"),
        ("five aught", "one to four"),
        ("thick", ""),
        ("", "empty"),
        ("4/0/0", ""),
    ],
)
def test_anything_else_is_an_error_listing_the_accepted_forms(written: str, hint: str) -> None:
    with pytest.raises(SizeNotationError) as caught:
        parse_size(written)
    message = str(caught.value)
    assert ACCEPTED_FORMS in message
    assert hint in message
    for form in ("4/0", "0000", "4-0", "four aught", "35 mm²", "#4", "4 ga"):
        assert form in message


def test_size_notation_error_is_a_value_error() -> None:
    assert issubclass(SizeNotationError, ValueError)


def test_a_size_longer_than_forty_characters_is_refused_before_parsing():
    # 5,000 digits would otherwise reach int(), which refuses more than 4,300 digits.
    with pytest.raises(SizeNotationError, match="at most 40 characters"):
        parse_size("1" * 5000)


def test_digits_of_other_scripts_read_as_their_ascii_digits():
    assert parse_size("١٠ AWG").label == "10 AWG"  # Arabic-Indic digits
    assert parse_size("४/0").label == "4/0 AWG"  # Devanagari four


@pytest.mark.parametrize("text", ["²", "2²", "⁴/0"])
def test_superscripts_are_not_digits(text):
    with pytest.raises(SizeNotationError):
        parse_size(text)
