"""Reading and writing conductor sizes the way people write them.

Accepted (case and spacing do not matter):
    AWG        4 AWG, 4AWG, #4, No. 4, 4 ga, 4 gauge, and a bare 4
    aught      4/0, 4/0 AWG, #4/0, 4-0, 0000, 00, 0, four aught, 4 ought, double aught
    kcmil      250 kcmil, 250 MCM
    metric     35 mm², 35mm2, 35 mm^2, 35 sq mm, 35 sqmm, 1,5 mm²

Sizes print back in trade notation: ``4 AWG``, ``4/0 AWG``, ``250 kcmil``, ``35 mm²``.

A bare number is read as AWG, and the parsed size remembers that it was bare
(``written_bare``) so the engine can ask "you wrote 4; did you mean 4/0?" when
only the aught size carries the current.
"""

from __future__ import annotations

import dataclasses
import re
import unicodedata

from .catalogue import ConductorSize, catalogue_by_label
from .errors import SizeNotationError

__all__ = ["ACCEPTED_FORMS", "SizeNotationError", "format_size", "is_bare_number", "parse_size"]

ACCEPTED_FORMS = (
    "AWG: '4 AWG', '#4', '4 ga' or a bare '4'; "
    "aught sizes: '4/0', '4/0 AWG', '4-0', '0000', 'four aught', '4 ought'; "
    "kcmil: '250 kcmil', '250 MCM'; "
    "metric: '35 mm²', '35mm2', '35 sq mm'"
)

_AWG_SUFFIX = r"(?:\s*(?:awg|ga\.?|gauge|g))?"
_NUMBER_WORDS = {
    "one": 1, "single": 1, "two": 2, "double": 2, "three": 3, "triple": 3,
    "four": 4, "quad": 4, "quadruple": 4, "1": 1, "2": 2, "3": 3, "4": 4,
}  # fmt: skip

MAX_SIZE_TEXT = 40
_METRIC = re.compile(
    r"^(\d+(?:[.,]\d+)?)\s*(?:mm2|mm\^2|mm\*\*2|sq\.?\s*mm|sqmm|square\s*mm"
    r"|square\s*millimet(?:re|er)s?)$",
    re.ASCII,
)
_KCMIL = re.compile(r"^(\d+)\s*(?:kcmil|mcm)$", re.ASCII)
_SLASH_AUGHT = re.compile(r"^(?:#|no\.?)?\s*(\d)\s*[/-]\s*0" + _AWG_SUFFIX + "$", re.ASCII)
_ZEROS = re.compile(r"^(?:#|no\.?)?\s*(0{1,4})" + _AWG_SUFFIX + "$", re.ASCII)
_MARKED_AWG = re.compile(r"^(?:#|no\.?)\s*(\d+)" + _AWG_SUFFIX + "$", re.ASCII)
_SUFFIXED_AWG = re.compile(r"^(\d+)\s*(?:awg|ga\.?|gauge|g)$", re.ASCII)
_BARE = re.compile(r"^(\d+)$", re.ASCII)
_WORDS = re.compile(r"^(?:([a-z0-9]+)[\s-]*)?(?:aught|ought)" + _AWG_SUFFIX + "$", re.ASCII)


def _ascii_digits(text: str) -> str:
    """Decimal digits of any script (Arabic-Indic, Devanagari...) as ASCII digits, the way
    the quantity parser reads them; other characters are left as they are."""
    return "".join(
        str(unicodedata.decimal(ch))
        if not ch.isascii() and unicodedata.category(ch) == "Nd"
        else ch
        for ch in text
    )


def _clean(text: str) -> str:
    # "²" is only the square of "mm²"; alone it is no digit ("²" is not a size 2).
    cleaned = text.strip().lower().replace("mm²", "mm2").replace("\u00a0", " ")
    cleaned = _ascii_digits(cleaned)
    return re.sub(r"\s+", " ", cleaned)


def _error(text: str, hint: str = "") -> SizeNotationError:
    lead = f"cannot read the conductor size {text!r}"
    return SizeNotationError(
        f"{lead}{'; ' + hint if hint else ''}. Accepted forms: {ACCEPTED_FORMS}"
    )


def _lookup(label: str, text: str) -> ConductorSize:
    size = catalogue_by_label().get(label)
    if size is None:
        raise _error(text, f"{label} is not in the catalogue ({_catalogue_summary()})")
    return size


def _catalogue_summary() -> str:
    by_kind: dict[str, list[str]] = {"awg": [], "kcmil": [], "mm2": []}
    for label, size in catalogue_by_label().items():
        by_kind[size.kind].append(label.split(" ")[0])
    return "; ".join(
        f"{name}: {', '.join(by_kind[kind])}"
        for kind, name in (("awg", "AWG"), ("kcmil", "kcmil"), ("mm2", "mm²"))
    )


def _aught(m: int, text: str) -> ConductorSize:
    if not 1 <= m <= 4:
        raise _error(text, f"{m}/0 is not an AWG size; aught sizes run 1/0 to 4/0")
    return _lookup(f"{m}/0 AWG", text)


def is_bare_number(text: str | None) -> bool:
    """True for a size written as digits alone, e.g. ``"4"`` or ``" 2 "`` (not ``"0"``,
    which is unambiguously 1/0)."""
    if text is None:
        return False
    cleaned = _clean(text)
    return bool(_BARE.match(cleaned)) and not set(cleaned) <= {"0"}


def parse_size(text: str) -> ConductorSize:
    """Parse a conductor size as people write it; raise ``SizeNotationError`` otherwise."""
    if not isinstance(text, str) or not text.strip():
        raise _error(str(text) if text is not None else "", "the size is empty")
    if len(text) > MAX_SIZE_TEXT:
        # Checked first: no size is written in more characters, and a long run of digits
        # must not reach int() (which refuses more than 4300 digits with a ValueError).
        raise _error(text[:MAX_SIZE_TEXT] + "…", f"a size is at most {MAX_SIZE_TEXT} characters")
    cleaned = _clean(text)
    if match := _METRIC.match(cleaned):
        nominal = float(match.group(1).replace(",", "."))
        return _lookup(f"{nominal:g} mm²", text)
    if match := _KCMIL.match(cleaned):
        return _lookup(f"{int(match.group(1))} kcmil", text)
    if match := _SLASH_AUGHT.match(cleaned):
        return _aught(int(match.group(1)), text)
    if match := _ZEROS.match(cleaned):
        return _aught(len(match.group(1)), text)
    if match := _MARKED_AWG.match(cleaned) or _SUFFIXED_AWG.match(cleaned):
        return _lookup(f"{int(match.group(1))} AWG", text)
    if match := _BARE.match(cleaned):
        number = int(match.group(1))
        size = catalogue_by_label().get(f"{number} AWG")
        if size is None:
            raise _error(
                text,
                f"{number} is not an AWG size in the catalogue; for metric write "
                f"'{number} mm²', for kcmil '{number} kcmil'",
            )
        return dataclasses.replace(size, written_bare=True)
    if match := _WORDS.match(cleaned):
        word = match.group(1) or "one"
        if word not in _NUMBER_WORDS:
            raise _error(text, f"{word!r} is not a count of aughts (one to four)")
        return _aught(_NUMBER_WORDS[word], text)
    raise _error(text)


def format_size(size: ConductorSize) -> str:
    """Trade notation: ``4 AWG``, ``4/0 AWG``, ``250 kcmil``, ``35 mm²``."""
    return size.label
