"""How a demo system is written down: small tables, one device or circuit a line (see
`device_spec` and `circuit_spec` for the columns), the terminal sets several devices share,
and the shop's default torques for crimped lugs."""

from __future__ import annotations

from dataclasses import dataclass, field
from decimal import Decimal

from circuits.models import FOOT_M

# Shop default torques for crimped lugs on studs (lbf·in). The values are the telecom
# power-plant minimums for wire connectors on 1/4, 5/16 and 3/8 in hardware (standards
# reference, section 9); using them for the nearest metric thread is this shop's choice,
# and the source says so. No standard covers battery studs: the device manual governs.
_TELECOM = "Telecom power-plant table, minimum torque for wire connectors"
TORQUE_DEFAULTS = [
    ("1/4in", "50", f"{_TELECOM}, 1/4 in hardware"),
    ("5/16in", "100", f"{_TELECOM}, 5/16 in hardware"),
    ("3/8in", "180", f"{_TELECOM}, 3/8 in hardware"),
    ("M6", "50", f"{_TELECOM}, 1/4 in value applied by the shop to M6"),
    ("M8", "100", f"{_TELECOM}, 5/16 in value applied by the shop to M8"),
    ("M10", "180", f"{_TELECOM}, 3/8 in value applied by the shop to M10"),
]

# Terminal sets used by several devices ("name: polarity stud [manual N·m]"; "Way 1..6"
# expands to Way 1 to Way 6; stud "-" for none).
AC_IN_OUT = (
    "AC in L: line screw; AC in N: neutral screw; AC in PE: earth screw; "
    "AC out L: line screw; AC out N: neutral screw; AC out PE: earth screw"
)
L_N_PE = "L: line screw; N: neutral screw; PE: earth screw"
CONTROLLER = "PV+: pos screw; PV-: neg screw; BAT+: pos screw; BAT-: neg screw"
DC_DC = "IN+: pos M6; OUT+: pos M6; GND: neg M6"


@dataclass
class DeviceSpec:
    name: str
    kind: str
    mounting: str
    source: bool
    input_a: Decimal | None
    enclosure: str
    location: str
    terminals: list[tuple[str, str, str, Decimal | None]]
    protection: tuple[str, Decimal] | None = None  # ("fuse" or "breaker", rating A)
    supply_v: Decimal | None = None  # an external supply's voltage


@dataclass
class CircuitSpec:
    tag: str
    name: str
    role: str
    frm: str
    to: str
    size: str
    amps: Decimal
    length_m: float
    unit: str
    options: dict[str, str] = field(default_factory=dict)
    flags: set[str] = field(default_factory=set)


def terminal_list(text: str) -> list[tuple[str, str, str, Decimal | None]]:
    out = []
    for item in filter(None, (part.strip() for part in text.split(";"))):
        name, rest = (p.strip() for p in item.split(":", 1))
        polarity, stud, *manual = rest.split()
        stud = "" if stud == "-" else stud
        torque = Decimal(manual[0]) if manual else None
        if ".." in name:  # "Way 1..6"
            stem, span = name.rsplit(" ", 1)
            first, last = (int(n) for n in span.split(".."))
            out += [(f"{stem} {n}", polarity, stud, torque) for n in range(first, last + 1)]
        else:
            out.append((name, polarity, stud, torque))
    return out


def device_spec(line: str) -> DeviceSpec:
    """name | kind | mounting | flags | enclosure | location | terminals

    Flags: source; input=A (an inverter/charger's input current setting); fuse=A or
    breaker=A (what a fuse or breaker holder holds, or an external supply's breaker);
    V=volts (an external supply's voltage)."""
    name, kind, mounting, flags, enclosure, location, terminals = (
        p.strip() for p in line.split("|")
    )
    words = dict(w.split("=") if "=" in w else (w, "") for w in flags.split())
    input_a = Decimal(words["input"]) if "input" in words else None
    protection = next(((k, Decimal(words[k])) for k in ("fuse", "breaker") if k in words), None)
    supply_v = Decimal(words["V"]) if "V" in words else None
    return DeviceSpec(name, kind, mounting, "source" in words, input_a, enclosure, location,
                      terminal_list(terminals), protection, supply_v)  # fmt: skip


def circuit_spec(line: str) -> CircuitSpec:
    """tag | name | role | from > to | size | amps | length unit | options

    Options, separated by ';': conductors (pair, pos, neg, ac, earth); x=2 (in parallel);
    cord, solid, standard (construction); untinned; engine (engine space); continuous;
    critical; loop (service loop confirmed); fuse=A or breaker=A; at=m (protection
    distance from the source); prot=device (the protection device at one end whose fuse
    or breaker protects the run, instead of fuse=/breaker=); V=volts; from=/to= terminal
    names; from.neg=/to.neutral=… for a polarity's terminal where the device has several;
    ac_in / ac_out (the inverter/charger's AC in or AC out terminals); splice=colour
    beyond a splice; colour.a=/colour.b=/colour.earth= an insulation colour other than the
    system's (e.g. colour.earth=bare); mark.a=method:colour:ends (a re-marking, e.g.
    mark.a=heat_shrink:red:both); note=text (last).
    """
    tag, name, role, ends, size, amps, length, options = (p.strip() for p in line.split("|"))
    frm, to = (p.strip() for p in ends.split(">"))
    value, unit = length.split()
    metres = float(value) * FOOT_M if unit == "ft" else float(value)
    spec = CircuitSpec(tag, name, role, frm, to, size, Decimal(amps), metres, unit)
    if "note=" in options:  # the note is last and may hold any punctuation
        options, note = options.split("note=", 1)
        spec.options["note"] = note.strip()
    for option in filter(None, (o.strip() for o in options.split(";"))):
        if "=" in option:
            key, val = option.split("=", 1)
            spec.options[key.strip()] = val.strip()
        else:
            spec.flags.add(option)
    return spec


def read_table(text: str, parse) -> list:
    return [parse(line) for line in text.strip().splitlines() if line.strip()]


@dataclass(frozen=True)
class System:
    vehicle: str  # identification
    title: str
    dc: tuple[str, str]  # DC positive, negative colours
    ac: tuple[str, str, str]  # AC line, neutral, earth colours
    ac_volts: int
    devices: str
    circuits: str
    waivers: tuple[tuple[str, str, str], ...] = ()  # (code, subject, reason)
