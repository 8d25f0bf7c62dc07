"""What a person opening a panel sees of a conductor: its insulation colour, and any
re-marking laid over it at one or both ends (tape, a heat-shrink sleeve, a printed band).

Plain Python over a circuit's fields, so the rules, the schedule, the record and the
diagram all say the same thing: "black, marked red with heat-shrink at both ends".

A circuit has up to three conductor roles, each with its own insulation colour and
re-marking fields:
  "a"      positive (DC) or line (AC)        colour_a,     marking_a_*
  "b"      negative (DC) or neutral (AC)     colour_b,     marking_b_*
  "earth"  earth / bonding                   colour_earth, marking_earth_*
"""

from __future__ import annotations

from dataclasses import dataclass

from circuits.models.choices import Colour, MarkingEnds, MarkingMethod

ROLES = ("a", "b", "earth")
ENDS = ("from", "to")

# How the method reads in a sentence: "marked red with heat-shrink at both ends".
_METHOD_WORDS = {
    MarkingMethod.TAPE: "tape",
    MarkingMethod.HEAT_SHRINK: "heat-shrink",
    MarkingMethod.PRINTED_BAND: "a printed band",
}
_ENDS_WORDS = {
    MarkingEnds.FROM: "at the from end",
    MarkingEnds.TO: "at the to end",
    MarkingEnds.BOTH: "at both ends",
}


def colour_name(colour: str) -> str:
    """'green-yellow', 'bare', 'red'; an unknown stored value as it is."""
    if colour == Colour.BARE:
        return "bare"
    return _COLOUR_NAMES.get(colour, colour)


# Built once: Colour.values builds its list anew on every use, and a long record asks
# for a name hundreds of times.
_COLOUR_NAMES = {c.value: c.label.lower() for c in Colour}


@dataclass(frozen=True)
class Marking:
    method: str
    colour: str
    ends: str

    @property
    def at(self) -> tuple[str, ...]:
        """The conductor ends the marking is at: ("from",), ("to",) or both."""
        return ENDS if self.ends == MarkingEnds.BOTH else (self.ends,) if self.ends else ()

    @property
    def words(self) -> str:
        """'marked red with heat-shrink at both ends'."""
        colour = f" {colour_name(self.colour)}" if self.colour else ""
        method = _METHOD_WORDS.get(self.method, self.method)
        ends = f" {_ENDS_WORDS[self.ends]}" if self.ends in _ENDS_WORDS else ""
        return f"marked{colour} with {method}{ends}"


def marking_of(circuit, role: str) -> Marking | None:
    method = getattr(circuit, f"marking_{role}_method", "")
    if not method:
        return None
    return Marking(
        method=method,
        colour=getattr(circuit, f"marking_{role}_colour", ""),
        ends=getattr(circuit, f"marking_{role}_ends", ""),
    )


def insulation_of(circuit, role: str) -> str:
    return getattr(circuit, "colour_earth" if role == "earth" else f"colour_{role}", "")


def seen_colour(circuit, role: str, end: str) -> str:
    """The colour a person sees at one end: the marking's where it is marked, else the
    insulation ('' when neither is recorded)."""
    marking = marking_of(circuit, role)
    if marking is not None and marking.colour and end in marking.at:
        return marking.colour
    return insulation_of(circuit, role)


def seen_colours(circuit, role: str) -> dict[str, str]:
    """{"from": colour, "to": colour} as seen at each end."""
    return {end: seen_colour(circuit, role, end) for end in ENDS}


def colour_text(circuit, role: str) -> str:
    """'black, marked red with heat-shrink at both ends'; 'red'; '' when nothing is
    recorded for the role."""
    insulation = insulation_of(circuit, role)
    marking = marking_of(circuit, role)
    base = colour_name(insulation) if insulation else ""
    if marking is None:
        return base
    return f"{base or 'colour not recorded'}, {marking.words}"
