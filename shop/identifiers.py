"""Vehicle and hull identification checks (plain Python, no Django).

VIN: 17 characters, digits and capital letters except I, O and Q (ISO 3779;
49 CFR 565.13). The ninth character is a check digit computed with the
transliteration and position weights of 49 CFR 565.15. The check digit is
mandatory for vehicles built for North America; elsewhere position 9 may carry
anything, so we verify it only when the world manufacturer code's region
(first character 1-5) says the vehicle was built for that market.

HIN: the 12-character hull identification number of 33 CFR 181.25:
manufacturer code (3), serial (5), month of production letter A-L, year digit,
model year (2 digits).
"""

from __future__ import annotations

import re

VIN_LENGTH = 17
_VIN_ALLOWED = re.compile(r"^[A-HJ-NPR-Z0-9]+$")
# 49 CFR 565.15 Table IV: letter values (I, O, Q are not allowed).
_TRANSLITERATION = {
    **{str(d): d for d in range(10)},
    **dict(zip("ABCDEFGH", range(1, 9), strict=True)),
    **dict(zip("JKLMN", range(1, 6), strict=True)),
    "P": 7,
    "R": 9,
    **dict(zip("STUVWXYZ", range(2, 10), strict=True)),
}
# 49 CFR 565.15 Table V: weight of each position (position 9, the check digit, weighs 0).
_WEIGHTS = (8, 7, 6, 5, 4, 3, 2, 10, 0, 9, 8, 7, 6, 5, 4, 3, 2)
_NORTH_AMERICA = "12345"


class IdentificationError(ValueError):
    """An identification number that cannot be right, with a message for the person typing it."""


def normalise(value: str) -> str:
    return re.sub(r"[\s-]+", "", value or "").upper()


def vin_check_digit(vin: str) -> str:
    total = sum(_TRANSLITERATION[ch] * w for ch, w in zip(vin, _WEIGHTS, strict=True))
    remainder = total % 11
    return "X" if remainder == 10 else str(remainder)


def check_digit_applies(vin: str) -> bool:
    return vin[:1] in _NORTH_AMERICA


def validate_vin(value: str) -> str:
    vin = normalise(value)
    if len(vin) != VIN_LENGTH:
        raise IdentificationError(f"A VIN has 17 characters; this one has {len(vin)}.")
    bad = sorted({ch for ch in vin if not _VIN_ALLOWED.match(ch)})
    if bad:
        shown = ", ".join(bad)
        raise IdentificationError(
            f"A VIN uses digits and capital letters except I, O and Q; found {shown}."
        )
    if check_digit_applies(vin):
        expected = vin_check_digit(vin)
        if vin[8] != expected:
            raise IdentificationError(
                f"Check digit (9th character) is {vin[8]} but the other characters give "
                f"{expected}: a character was probably mistyped."
            )
    return vin


_HIN = re.compile(r"^[A-Z0-9]{3}[A-Z0-9]{5}[A-L][0-9][0-9]{2}$")


def validate_hin(value: str) -> str:
    hin = normalise(value)
    if hin.startswith("US") and len(hin) == 14:
        hin = hin[2:]  # the country prefix is not part of the 12 characters checked here
    if len(hin) != 12:
        raise IdentificationError(
            f"A hull identification number has 12 characters; got {len(hin)}."
        )
    if not _HIN.match(hin):
        raise IdentificationError(
            "A hull identification number is 3 letters or digits for the builder, 5 for the "
            "serial, a month letter A-L, a year digit and a 2-digit model year."
        )
    return hin
