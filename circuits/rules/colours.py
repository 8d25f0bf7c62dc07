"""Colours: insulation colours people will trust later, when tracing a fault.

Colour fields: colour_a is the DC positive or AC line, colour_b the DC negative or AC
neutral, colour_earth the earth (for an earth-only circuit colour_a is read when
colour_earth is blank). A blank colour is not checked.

DC (ABYC E-11 Table XIV):
* COLOUR_DC_POSITIVE (warning): DC positive not red.
* COLOUR_DC_NEGATIVE (warning): DC negative not yellow or black.
* COLOUR_BONDING (warning): DC bonding/earth conductor not green or green-yellow.

AC, against the vehicle's AC system:
* 120 V 60 Hz: line black or brown (ABYC E-11; NEC by custom, from memory); neutral white
  or grey (NEC 200.6, from memory), and light blue in a boat (ABYC E-11); earth green or
  green-yellow (NEC 250.119, from memory; ABYC E-11).
* 230 V 50 Hz (IEC 60445:2010 §6.3): line brown (black and grey are the other line
  colours); neutral blue; earth green-and-yellow only.
* No AC system recorded but an AC circuit exists: the colours of either system are
  accepted, and COLOUR_AC_SYSTEM_UNKNOWN (note) asks for the vehicle's AC system.
* COLOUR_AC_LINE, COLOUR_AC_NEUTRAL (warning).
* COLOUR_AC_EARTH (blocking): an AC earth in any colour other than green or green-yellow.
  Decided blocking because earth confusion is the dangerous one: an earth in a line colour
  invites a line connection to it, putting every bonded metal part at line voltage.
  COLOUR_AC_EARTH_GREEN (warning): plain green earth in a 230 V system, where IEC 60445
  asks for green-and-yellow.
* COLOUR_EARTH_ON_LIVE (blocking): a current-carrying conductor (DC positive or negative,
  AC line or neutral) in green or green-yellow, the colours everyone takes for earth.

Across the system:
* COLOUR_BLACK_DC_AND_AC (warning): in one panel (devices sharing an enclosure, or one
  device) black is both a DC negative and an AC line; remedy: run the DC negatives in
  yellow (ABYC E-11 lists yellow for DC negative, preferred where AC is present).
  Subject: the enclosure (or device) name.
* COLOUR_SPLICE_CHANGE (warning): a splice where the colour beyond it differs.
* COLOUR_TAPE_REMARKED (warning): a conductor re-marked with tape; tape fades and slips.
  (NEC 200.6(B) and 250.119(A) allow tape on conductors of 4 AWG and larger, from memory;
  the warning stands so the record says so.)
"""

from __future__ import annotations

from circuits.findings import SYSTEM_SUBJECT, SystemFinding
from circuits.models import Circuit, Colour

from .common import BLOCKING, NOTE, WARNING, describe, device_key, finding

SOURCE_DC = "ABYC E-11 Table XIV, DC conductor colours"
SOURCE_AC = {
    "120_60": "ABYC E-11 AC conductor colours; NEC 2023 200.6, 250.119 (from memory)",
    "230_50": "IEC 60445:2010 §6.3",
    "none": "ABYC E-11 AC conductor colours; IEC 60445:2010 §6.3",
}
SOURCE_PANEL = "ABYC E-11 Table XIV (yellow DC negative where AC is present); common practice"
SOURCE_MARKING = "common practice: one colour end to end; NEC 200.6(B), 250.119(A) (from memory)"

RED, BLACK, YELLOW = Colour.RED, Colour.BLACK, Colour.YELLOW
# Accepted colours, preferred first (the order messages name them in).
EARTH_COLOURS = (Colour.GREEN_YELLOW, Colour.GREEN)
DC_POSITIVE = (RED,)
DC_NEGATIVE = (YELLOW, BLACK)

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
    return line, neutral, EARTH_COLOURS


def _name(colour: str) -> str:
    return Colour(colour).label.lower() if colour in Colour.values else colour


def _names(colours: tuple[str, ...]) -> str:
    ordered = [_name(c) for c in colours]
    return ordered[0] if len(ordered) == 1 else ", ".join(ordered[:-1]) + " or " + ordered[-1]


def _wrong(c, code, severity, conductor, colour, allowed, source) -> SystemFinding:
    return finding(
        code,
        severity,
        f"{describe(c)}: the {conductor} is {_name(colour)}; use {_names(allowed)}.",
        source,
        subject=c.tag,
        circuits=[c.tag],
    )


def _earth_on_live(c, conductor, colour, source) -> SystemFinding:
    return finding(
        "COLOUR_EARTH_ON_LIVE",
        BLOCKING,
        f"{describe(c)}: the {conductor} is {_name(colour)}, a colour reserved for earth; "
        "someone will take it for a safe earth. Replace it with a conductor in the right colour.",
        source,
        subject=c.tag,
        circuits=[c.tag],
    )


def _live(c, code, conductor, colour, allowed, source) -> list[SystemFinding]:
    if not colour:
        return []
    if colour in EARTH_COLOURS:
        return [_earth_on_live(c, conductor, colour, source)]
    if colour not in allowed:
        return [_wrong(c, code, WARNING, conductor, colour, allowed, source)]
    return []


def _dc(c: Circuit) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    if c.conductors in (Circuit.Conductors.PAIR, Circuit.Conductors.POSITIVE):
        out += _live(c, "COLOUR_DC_POSITIVE", "DC positive", c.colour_a, DC_POSITIVE, SOURCE_DC)
    if c.conductors in (Circuit.Conductors.PAIR, Circuit.Conductors.NEGATIVE):
        out += _live(c, "COLOUR_DC_NEGATIVE", "DC negative", c.colour_b, DC_NEGATIVE, SOURCE_DC)
    return out


def _ac_earth(c: Circuit, colour: str, ac_system: str, source: str) -> list[SystemFinding]:
    if not colour:
        return []
    if colour not in EARTH_COLOURS:
        return [_wrong(c, "COLOUR_AC_EARTH", BLOCKING, "AC earth", colour, EARTH_COLOURS, source)]
    if ac_system == "230_50" and colour == Colour.GREEN:
        return [
            finding(
                "COLOUR_AC_EARTH_GREEN",
                WARNING,
                f"{describe(c)}: the AC earth is plain green; in a 230 V system the protective "
                "earth is green-and-yellow only. Use green-and-yellow conductor.",
                source,
                subject=c.tag,
                circuits=[c.tag],
            )
        ]
    return []


def _ac(c: Circuit, vehicle) -> list[SystemFinding]:
    ac_system = getattr(vehicle, "ac_system", "none")
    line, neutral, _ = ac_colours(ac_system, boat=getattr(vehicle, "kind", "") == "boat")
    source = SOURCE_AC.get(ac_system, SOURCE_AC["none"])
    out = _live(c, "COLOUR_AC_LINE", "AC line", c.colour_a, line, source)
    out += _live(c, "COLOUR_AC_NEUTRAL", "AC neutral", c.colour_b, neutral, source)
    return out + _ac_earth(c, c.colour_earth, ac_system, source)


def _earth_only(c: Circuit, vehicle) -> list[SystemFinding]:
    colour = c.colour_earth or c.colour_a
    if c.is_ac:
        ac_system = getattr(vehicle, "ac_system", "none")
        return _ac_earth(c, colour, ac_system, SOURCE_AC.get(ac_system, SOURCE_AC["none"]))
    if colour and colour not in EARTH_COLOURS:
        return [
            _wrong(
                c, "COLOUR_BONDING", WARNING, "bonding conductor", colour, EARTH_COLOURS, SOURCE_DC
            )
        ]
    return []


def _marking(c: Circuit) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    before = c.colour_a or c.colour_earth
    if c.splice and c.colour_after_splice and before and c.colour_after_splice != before:
        out.append(
            finding(
                "COLOUR_SPLICE_CHANGE",
                WARNING,
                f"{describe(c)} changes colour at a splice, from {_name(before)} to "
                f"{_name(c.colour_after_splice)}; whoever traces it later loses it there. Run "
                "one colour end to end, or replace the run.",
                SOURCE_MARKING,
                subject=c.tag,
                circuits=[c.tag],
            )
        )
    if c.tape_remarked:
        out.append(
            finding(
                "COLOUR_TAPE_REMARKED",
                WARNING,
                f"{describe(c)} is re-marked with tape; tape fades and slips off. Prefer a "
                "conductor in its own colour, and keep the tape visible at every end.",
                SOURCE_MARKING,
                subject=c.tag,
                circuits=[c.tag],
            )
        )
    return out


def _panel_key(device) -> tuple[str, str]:
    enclosure = (device.enclosure or "").strip()
    if enclosure:
        return ("enclosure:" + enclosure.casefold(), enclosure)
    return (f"device:{device_key(device)}", device.name)


def _black_in_one_panel(circuits: list[Circuit]) -> list[SystemFinding]:
    panels: dict[str, tuple[set[str], list[str], list[str]]] = {}
    for c in circuits:
        dc_black = (
            not c.is_ac
            and c.conductors in (Circuit.Conductors.PAIR, Circuit.Conductors.NEGATIVE)
            and c.colour_b == BLACK
        )
        ac_black = c.conductors == Circuit.Conductors.AC and c.colour_a == BLACK
        if not (dc_black or ac_black):
            continue
        for device in (c.from_device, c.to_device):
            key, label = _panel_key(device)
            entry = panels.setdefault(key, (set(), [], []))
            entry[0].add(label)
            (entry[1] if dc_black else entry[2]).append(c.tag)
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
        # A bonding circuit is an earth conductor whatever its conductor choice says.
        if c.conductors == Circuit.Conductors.EARTH or c.role == Circuit.Role.BONDING:
            out += _earth_only(c, vehicle)
        elif c.conductors == Circuit.Conductors.AC:
            ac_seen = True
            out += _ac(c, vehicle)
        elif not c.is_ac:
            out += _dc(c)
        out += _marking(c)
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
