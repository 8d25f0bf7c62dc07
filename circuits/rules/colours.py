"""Colours: what a person opening a panel sees, so it can be trusted later when tracing
a fault.

Each conductor role (positive / line, negative / neutral, earth: circuits.models.marking)
has an insulation colour and may be re-marked at one or both ends (tape, heat-shrink,
printed band). The colour judged is the one seen at each end: the marking's where the
conductor is marked at that end, else the insulation. When both ends look alike the
conductor is judged once; otherwise each end is judged and named ("the DC positive at the
to end is black"). For an earth-only circuit entered with its one colour in the first
field (older records), that colour is the earth's. A blank colour is not checked.

DC (ABYC E-11 Table XIV):
* COLOUR_DC_POSITIVE (warning): DC positive not red.
* COLOUR_DC_NEGATIVE (warning): DC negative not yellow or black.
* COLOUR_BONDING (warning): DC bonding/earth conductor not green, green-yellow or bare.

AC, against the vehicle's AC system:
* 120 V 60 Hz: line black or brown (ABYC E-11; NEC by custom, from memory); neutral white
  or grey (NEC 200.6, from memory), and light blue in a boat (ABYC E-11); earth green,
  green-yellow (NEC 250.119, from memory; ABYC E-11) or bare (NEC 250.119, from memory).
* 230 V 50 Hz (IEC 60445:2010 §6.3): line brown (black and grey are the other line
  colours); neutral blue; earth green-and-yellow (or bare, as a bare earth is never taken
  for a live conductor).
* No AC system recorded but an AC circuit exists: the colours of either system are
  accepted, and COLOUR_AC_SYSTEM_UNKNOWN (note) asks for the vehicle's AC system.
* COLOUR_AC_LINE, COLOUR_AC_NEUTRAL (warning).
* COLOUR_AC_EARTH (blocking): an AC earth seen in any colour other than green,
  green-yellow or bare. Decided blocking because earth confusion is the dangerous one: an
  earth in a line colour invites a line connection to it, putting every bonded metal part
  at line voltage. COLOUR_AC_EARTH_GREEN (warning): plain green earth in a 230 V system,
  where IEC 60445 asks for green-and-yellow.
* COLOUR_EARTH_ON_LIVE (blocking): a current-carrying conductor (DC positive or negative,
  AC line or neutral) seen in green or green-yellow, the colours everyone takes for earth.

Bare:
* Bare is a colour choice for earth and bonding conductors (a bare earth in building
  cable, a braided bonding strap): accepted as above.
* COLOUR_BARE_LIVE (blocking): a current-carrying conductor recorded bare. An uninsulated
  conductor carrying current is a shock and short-circuit hazard whatever marks its ends
  (every standard above requires insulated current-carrying conductors; common practice).

Re-marking (one finding per circuit and code, naming each re-marked conductor):
* COLOUR_TAPE_REMARKED (tape) and COLOUR_REMARKED (heat-shrink sleeve or printed band).
  NEC 200.6(B) lets a grounded conductor (neutral; a DC negative bonded to the chassis is
  the grounded conductor of a vehicle's DC system) of 4 AWG or larger be re-identified by
  a marking at each termination, and NEC 250.119(A) the same for an equipment earthing
  conductor of 4 AWG or larger (from memory: not in the project's standards reference).
  Large cable sold in one colour (welding cable) is commonly re-marked at both ends for
  the positive too (common practice). So:
  - note: 4 AWG (21 mm²) or larger, marked at both ends. The standard permits it (the
    text says which rule, or that it is common practice for a positive/line), so it
    needs no waiver, and the record still says the conductor is re-marked;
  - warning: smaller than 4 AWG (the rule does not reach it: use a conductor in its own
    colour), or marked at one end only (the other end shows the insulation colour). A
    departure a lead should accept in writing, not a hazard in itself;
  - blocking comes from the colour rules above, which judge what each end shows (a live
    conductor marked green at an end, an earth marked black).
  Tape adds that tape fades and slips off (common practice).

Across the system:
* COLOUR_BLACK_DC_AND_AC (warning): in one panel (devices sharing an enclosure, or one
  device) black is seen both on a DC negative and on an AC line at their ends there;
  remedy: run the DC negatives in yellow (ABYC E-11 lists yellow for DC negative,
  preferred where AC is present). Subject: the enclosure (or device) name.
* COLOUR_SPLICE_CHANGE (warning): a splice where the colour beyond it differs.
"""

from __future__ import annotations

from circuits.findings import SYSTEM_SUBJECT, SystemFinding
from circuits.models import Circuit, Colour, MarkingEnds, MarkingMethod, colour_name
from circuits.models.marking import colour_text, insulation_of, seen_colour
from circuits.sizing import SEVERITY_ORDER

from .common import BLOCKING, NOTE, WARNING, describe, device_key, finding, installed_size

SOURCE_DC = "ABYC E-11 Table XIV, DC conductor colours"
SOURCE_AC = {
    "120_60": "ABYC E-11 AC conductor colours; NEC 2023 200.6, 250.119 (from memory)",
    "230_50": "IEC 60445:2010 §6.3",
    "none": "ABYC E-11 AC conductor colours; IEC 60445:2010 §6.3",
}
SOURCE_PANEL = "ABYC E-11 Table XIV (yellow DC negative where AC is present); common practice"
SOURCE_SPLICE = "common practice: one colour end to end"
SOURCE_MARKING = (
    "NEC 2023 200.6(B), 250.119(A): re-identifying 4 AWG and larger at each end (from "
    "memory); common practice: one colour end to end"
)
SOURCE_BARE = "common practice: current-carrying conductors are insulated; ABYC E-11 (from memory)"

RED, BLACK, YELLOW, BARE = Colour.RED, Colour.BLACK, Colour.YELLOW, Colour.BARE
# Accepted colours, preferred first (the order messages name them in).
EARTH_COLOURS = (Colour.GREEN_YELLOW, Colour.GREEN)
EARTH_OR_BARE = (*EARTH_COLOURS, BARE)
DC_POSITIVE = (RED,)
DC_NEGATIVE = (YELLOW, BLACK)
# 4 AWG is 21.15 mm² (ASTM B258; standards reference §1); 25 mm² and up count as large.
LARGE_MM2 = 21.1

_LINE = {"120_60": (BLACK, Colour.BROWN), "230_50": (Colour.BROWN, BLACK, Colour.GREY)}
_NEUTRAL = {"120_60": (Colour.WHITE, Colour.GREY), "230_50": (Colour.BLUE,)}


def ac_colours(ac_system: str, *, boat: bool) -> tuple[tuple[str, ...], ...]:
    """(line, neutral, earth) colours accepted for the vehicle's AC system."""
    if ac_system not in _LINE:
        line = tuple(dict.fromkeys(_LINE["120_60"] + _LINE["230_50"]))
        neutral = tuple(dict.fromkeys(_NEUTRAL["120_60"] + _NEUTRAL["230_50"]))
    else:
        line, neutral = _LINE[ac_system], _NEUTRAL[ac_system]
    if boat and ac_system == "120_60":
        neutral = (*neutral, Colour.BLUE)  # ABYC E-11: white or light blue
    return line, neutral, EARTH_OR_BARE


def _names(colours: tuple[str, ...]) -> str:
    ordered = [colour_name(c) for c in colours]
    return ordered[0] if len(ordered) == 1 else ", ".join(ordered[:-1]) + " or " + ordered[-1]


def _earth_role(c: Circuit) -> str:
    """Where an earth conductor's colour is recorded: the earth fields, or (older
    earth-only records) the first colour field."""
    if c.colour_earth or c.marking_earth_method or not c.colour_a:
        return "earth"
    return "a"


def _views(c: Circuit, role: str, conductor: str) -> list[tuple[str, str]]:
    """(colour seen, words for the conductor) for each distinct look of the conductor:
    once when both ends look alike, else each end with its own words."""
    seen = {end: seen_colour(c, role, end) for end in ("from", "to")}
    if seen["from"] == seen["to"]:
        return [(seen["from"], conductor)] if seen["from"] else []
    return [(colour, f"{conductor} at the {end} end") for end, colour in seen.items() if colour]


def _finding(c, code, severity, text, source) -> SystemFinding:
    return finding(
        code, severity, f"{describe(c)}: {text}", source, subject=c.tag, circuits=[c.tag]
    )


def _merged(found: list[SystemFinding]) -> list[SystemFinding]:
    """One finding per (code, subject), the worst severity, the messages joined: a waiver
    names a finding by code and subject, so two alike would be one waiver's business."""
    out: dict[tuple[str, str], SystemFinding] = {}
    for f in found:
        key = (f.code, f.subject)
        if key not in out:
            out[key] = f
            continue
        first = out[key]
        severity = min(first.severity, f.severity, key=SEVERITY_ORDER.__getitem__)
        rest = f.message.split(": ", 1)[-1]
        out[key] = finding(
            f.code,
            severity,
            f"{first.message} Also {rest}",
            first.source,
            subject=f.subject,
            circuits=[*first.circuits, *f.circuits],
        )
    return list(out.values())


def _live(c, code, role, conductor, allowed, source) -> list[SystemFinding]:
    if insulation_of(c, role) == BARE:
        return [
            _finding(
                c,
                "COLOUR_BARE_LIVE",
                BLOCKING,
                f"the {conductor} is bare, but it carries current: an uninsulated live "
                "conductor can be touched and can short to anything it rests on. Replace it "
                "with an insulated conductor in the right colour.",
                SOURCE_BARE,
            )
        ]
    out = []
    for colour, words in _views(c, role, conductor):
        if colour in EARTH_COLOURS:
            out.append(
                _finding(
                    c,
                    "COLOUR_EARTH_ON_LIVE",
                    BLOCKING,
                    f"the {words} is {colour_name(colour)}, a colour reserved for earth; "
                    "someone will take it for a safe earth. Replace it with a conductor in "
                    "the right colour.",
                    source,
                )
            )
        elif colour not in allowed:
            text = f"the {words} is {colour_name(colour)}; use {_names(allowed)}."
            out.append(_finding(c, code, WARNING, text, source))
    return out


def _dc(c: Circuit) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    if c.conductors in (Circuit.Conductors.PAIR, Circuit.Conductors.POSITIVE):
        out += _live(c, "COLOUR_DC_POSITIVE", "a", "DC positive", DC_POSITIVE, SOURCE_DC)
    if c.conductors in (Circuit.Conductors.PAIR, Circuit.Conductors.NEGATIVE):
        out += _live(c, "COLOUR_DC_NEGATIVE", "b", "DC negative", DC_NEGATIVE, SOURCE_DC)
    return out


def _ac_earth(c: Circuit, role: str, ac_system: str, source: str) -> list[SystemFinding]:
    out = []
    for colour, words in _views(c, role, "AC earth"):
        if colour not in EARTH_OR_BARE:
            text = f"the {words} is {colour_name(colour)}; use {_names(EARTH_OR_BARE)}."
            out.append(_finding(c, "COLOUR_AC_EARTH", BLOCKING, text, source))
        elif ac_system == "230_50" and colour == Colour.GREEN:
            text = (
                f"the {words} is plain green; in a 230 V system the protective earth is "
                "green-and-yellow only. Use green-and-yellow conductor."
            )
            out.append(_finding(c, "COLOUR_AC_EARTH_GREEN", WARNING, text, source))
    return out


def _ac(c: Circuit, vehicle) -> list[SystemFinding]:
    ac_system = getattr(vehicle, "ac_system", "none")
    line, neutral, _ = ac_colours(ac_system, boat=getattr(vehicle, "kind", "") == "boat")
    source = SOURCE_AC.get(ac_system, SOURCE_AC["none"])
    out = _live(c, "COLOUR_AC_LINE", "a", "AC line", line, source)
    out += _live(c, "COLOUR_AC_NEUTRAL", "b", "AC neutral", neutral, source)
    return out + _ac_earth(c, "earth", ac_system, source)


def _earth_only(c: Circuit, vehicle) -> list[SystemFinding]:
    role = _earth_role(c)
    if c.is_ac:
        ac_system = getattr(vehicle, "ac_system", "none")
        return _ac_earth(c, role, ac_system, SOURCE_AC.get(ac_system, SOURCE_AC["none"]))
    out = []
    for colour, words in _views(c, role, "bonding conductor"):
        if colour not in EARTH_OR_BARE:
            text = f"the {words} is {colour_name(colour)}; use {_names(EARTH_OR_BARE)}."
            out.append(_finding(c, "COLOUR_BONDING", WARNING, text, SOURCE_DC))
    return out


def _splice(c: Circuit) -> list[SystemFinding]:
    before = c.colour_a or c.colour_earth
    if not (c.splice and c.colour_after_splice and before and c.colour_after_splice != before):
        return []
    return [
        finding(
            "COLOUR_SPLICE_CHANGE",
            WARNING,
            f"{describe(c)} changes colour at a splice, from {colour_name(before)} to "
            f"{colour_name(c.colour_after_splice)}; whoever traces it later loses it there. "
            "Run one colour end to end, or replace the run.",
            SOURCE_SPLICE,
            subject=c.tag,
            circuits=[c.tag],
        )
    ]


_PERMITS = {
    "b": "NEC 200.6(B) lets a grounded conductor (the neutral, or a DC negative bonded to "
    "the chassis) of 4 AWG or larger be re-identified at each end (from memory)",
    "earth": "NEC 250.119(A) lets an earthing conductor of 4 AWG or larger be re-identified "
    "at each end (from memory)",
}


def _marking_text(c: Circuit, role: str, conductor: str, large: bool) -> tuple[str, str]:
    """(severity, words) for one re-marked conductor."""
    marking = c.marking(role)
    looks = f"the {conductor} is {colour_text(c, role)}"
    tape = " Tape fades and slips off; heat-shrink lasts." if marking.method == "tape" else ""
    unrecorded = "" if marking.colour else " Record the marking's colour."
    if marking.ends != MarkingEnds.BOTH:
        other = "to" if marking.ends == MarkingEnds.FROM else "from"
        shows = colour_name(insulation_of(c, role)) or "its insulation colour"
        return WARNING, (
            f"{looks}, so its {other} end shows {shows}. Mark both ends, or use a conductor "
            f"in its own colour.{tape}{unrecorded}"
        )
    if not large:
        return WARNING, (
            f"{looks}; re-marking at the ends is accepted only for conductors of 4 AWG "
            "(21 mm²) and larger (NEC 200.6(B), 250.119(A), from memory). Use a conductor "
            f"in its own colour.{tape}{unrecorded}"
        )
    permit = _PERMITS.get(role) or (
        "large conductors sold in one colour are commonly re-marked at both ends (common practice)"
    )
    return NOTE, f"{looks}; {permit}. Keep the marking visible at every end.{tape}{unrecorded}"


def _marking(c: Circuit, sizings) -> list[SystemFinding]:
    size = installed_size(c, sizings)
    large = size is not None and size.area_mm2 >= LARGE_MM2
    kind = "AC" if c.is_ac or c.conductors == Circuit.Conductors.AC else "DC"
    roles = [
        (r, "earth" if r == "earth" else f"{kind} {c.role_words(r)}") for r in c.colour_roles()
    ]
    if c.conductors == Circuit.Conductors.EARTH or c.role == Circuit.Role.BONDING:
        roles = [(_earth_role(c), "earth")]
    found = []
    for role, conductor in roles:
        marking = c.marking(role)
        if marking is None:
            continue
        code = "COLOUR_TAPE_REMARKED" if marking.method == MarkingMethod.TAPE else "COLOUR_REMARKED"
        severity, text = _marking_text(c, role, conductor, large)
        found.append(_finding(c, code, severity, text, SOURCE_MARKING))
    return found


def _panel_key(device) -> tuple[str, str]:
    enclosure = (device.enclosure or "").strip()
    if enclosure:
        return ("enclosure:" + enclosure.casefold(), enclosure)
    return (f"device:{device_key(device)}", device.name)


def _black_in_one_panel(circuits: list[Circuit]) -> list[SystemFinding]:
    panels: dict[str, tuple[set[str], list[str], list[str]]] = {}
    for c in circuits:
        dc_negative = not c.is_ac and c.conductors in (
            Circuit.Conductors.PAIR,
            Circuit.Conductors.NEGATIVE,
        )
        ac_line = c.conductors == Circuit.Conductors.AC
        if not (dc_negative or ac_line):
            continue
        role = "b" if dc_negative else "a"
        for end, device in (("from", c.from_device), ("to", c.to_device)):
            if seen_colour(c, role, end) != BLACK:
                continue  # what shows in this panel is the colour at this end
            key, label = _panel_key(device)
            entry = panels.setdefault(key, (set(), [], []))
            entry[0].add(label)
            (entry[1] if dc_negative else entry[2]).append(c.tag)
    out: list[SystemFinding] = []
    for labels, dc_tags, ac_tags in panels.values():
        if not (dc_tags and ac_tags):
            continue
        label = min(labels)  # one spelling, whatever order the circuits come in
        dc_list, ac_list = sorted(set(dc_tags)), sorted(set(ac_tags))
        out.append(
            finding(
                "COLOUR_BLACK_DC_AND_AC",
                WARNING,
                f"In {label}, black is both a DC negative ({', '.join(dc_list)}) and an AC line "
                f"({', '.join(ac_list)}); someone will mistake one for the other. Run the DC "
                "negatives in yellow.",
                SOURCE_PANEL,
                subject=label,
                circuits=dc_list + ac_list,
            )
        )
    return out


def colours(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    ac_seen = False
    for c in circuits:
        found: list[SystemFinding] = []
        # A bonding circuit is an earth conductor whatever its conductor choice says.
        if c.conductors == Circuit.Conductors.EARTH or c.role == Circuit.Role.BONDING:
            found += _earth_only(c, vehicle)
        elif c.conductors == Circuit.Conductors.AC:
            ac_seen = True
            found += _ac(c, vehicle)
        elif not c.is_ac:
            found += _dc(c)
        found += _splice(c) + _marking(c, sizings)
        out += _merged(found)
    out += _black_in_one_panel(circuits)
    if ac_seen and getattr(vehicle, "ac_system", "none") not in _LINE:
        out.append(
            finding(
                "COLOUR_AC_SYSTEM_UNKNOWN",
                NOTE,
                "This job has AC circuits but the vehicle's AC system is not recorded; set it "
                "(120 V 60 Hz or 230 V 50 Hz) so AC colours are checked against the right "
                "standard.",
                SOURCE_AC["none"],
                subject=SYSTEM_SUBJECT,
            )
        )
    return out
