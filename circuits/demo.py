"""Demo electrical systems for the demo jobs (shop.demo): devices, terminals, circuits with
their terminations, the shop's default torque specs, and one lead's waiver.

Everything is invented for showing the app: no real products. Each system has a few
realistic problems planted for the rules to find:
  van        a 2 AWG positive battery interconnect beside a 4/0 main feed (bottleneck);
             a 16 AWG cord from the shore inlet to a 30 A inverter/charger input; black
             used for DC negatives and the AC line in one cabinet; a solar string whose
             breaker sits at the controller (protection distance, waived by the lead)
  truck      the alternator-to-charger run from the engine to the chassis without a
             confirmed service loop
  motorhome  a kitchen-socket run spliced onto a black offcut (colour change at a splice)
  boat       a bare "4" written where the 4/0 main feed was meant; one untinned run

The systems are written as small tables, one device or circuit a line (see `_device` and
`_circuit_spec` for the columns), which keeps them readable as a schedule.

Loading is idempotent: devices are keyed by job + name, terminals by device + name,
circuits by job + tag (terminations come with their circuit), torque defaults by stud size
+ kind, the waiver by job + code + subject. Anything already there is left as it is.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from decimal import Decimal

from django.core.exceptions import ValidationError

from circuits.models import FOOT_M, Circuit, Device, Terminal, TorqueDefault, Waiver
from circuits.services import circuit_create, termination_spec_fill, waiver_create

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


def _terminals(text: str) -> list[tuple[str, str, str, Decimal | None]]:
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


def _device(line: str) -> DeviceSpec:
    """name | kind | mounting | flags (source, input=30) | enclosure | location | terminals"""
    name, kind, mounting, flags, enclosure, location, terminals = (
        p.strip() for p in line.split("|")
    )
    words = dict(w.split("=") if "=" in w else (w, "") for w in flags.split())
    input_a = Decimal(words["input"]) if "input" in words else None
    return DeviceSpec(name, kind, mounting, "source" in words, input_a, enclosure, location,
                      _terminals(terminals))  # fmt: skip


def _circuit_spec(line: str) -> CircuitSpec:
    """tag | name | role | from > to | size | amps | length unit | options

    Options, separated by ';': conductors (pair, pos, neg, ac, earth); x=2 (in parallel);
    cord, solid, standard (construction); untinned; engine (engine space); continuous;
    critical; loop (service loop confirmed); fuse=A or breaker=A; at=m (protection
    distance from the source); V=volts; from=/to= terminal names; from.neg=/to.neutral=…
    for a polarity's terminal where the device has several; ac_in / ac_out (the
    inverter/charger's AC in or AC out terminals); splice=colour beyond a splice;
    note=text (last).
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


def _table(text: str, parse) -> list:
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


VAN = System(
    vehicle="1BFVC12E3R0004217",
    title="Full electrical build: lithium bank, solar, inverter/charger",
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices=f"""
House battery 1 | battery | battery_box | source | | Under the rear bed, left | +: pos M8 10; -: neg M8 10
House battery 2 | battery | battery_box | source | | Under the rear bed, right | +: pos M8 10; -: neg M8 10
Main fuse | protection | battery_box | | | Battery box lid | In: pos M10; Out: pos M10
DC busbar | busbar | body | | Electrical cabinet | | +: pos 5/16in; -: neg 5/16in
DC fuse panel | dc_panel | body | | Electrical cabinet | | + in: pos 1/4in; - bus: neg 1/4in; Way 1..6: pos screw
Inverter/charger | inverter_charger | body | input=30 | Electrical cabinet | | DC+: pos 5/16in; DC-: neg 5/16in; {AC_IN_OUT}; Case earth: earth M6
AC panel | ac_panel | body | | Electrical cabinet | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1..3: line screw
Shore inlet | shore_inlet | body | source | | Rear left side panel | {L_N_PE}
Roof solar array | other | body | source | | Roof, two 200 W panels in series | PV+: pos -; PV-: neg -
Solar charge controller | charge_controller | body | | Electrical cabinet | | {CONTROLLER}
Alternator | alternator | engine | source | | Engine bay | B+: pos M8
DC-DC charger | dc_dc_charger | body | | | Under the passenger seat | {DC_DC}
Chassis earth point | other | body | | | Floor stud behind the cabinet | Stud: earth M8
LED lights | load | body | | | Ceiling, whole length |
Compressor fridge | load | body | | | Galley |
Roof fan | load | body | | | Roof, over the bed |
Water pump | load | body | | | Under the sink |
12 V and USB sockets | load | body | | | Galley and bed |
Diesel heater | load | body | | | Under the passenger seat box |
Galley outlets | load | body | | | Galley splashback |
Bed outlets | load | body | | | Bed head |
Water heater element | load | body | | | Rear locker |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect, positive | interconnect | House battery 1 > House battery 2 | 2 AWG | 150 | 1.5 ft | pos; note=Short jumper supplied with the batteries.
C-02 | Battery interconnect, negative | interconnect | House battery 1 > House battery 2 | 4/0 AWG | 150 | 1.5 ft | neg
C-03 | Battery 2 positive to main fuse | main_feed | House battery 2 > Main fuse | 4/0 AWG | 250 | 0.5 ft | pos; to=In
C-04 | Main fuse to DC busbar | main_feed | Main fuse > DC busbar | 4/0 AWG | 250 | 5 ft | pos; fuse=300; at=0.15; from=Out
C-05 | Battery 1 negative to DC busbar | main_feed | House battery 1 > DC busbar | 4/0 AWG | 250 | 5 ft | neg
C-06 | Inverter/charger DC feed | dc_branch | DC busbar > Inverter/charger | 2/0 AWG | 185 | 3 ft | fuse=250
C-07 | DC fuse panel feed | dc_branch | DC busbar > DC fuse panel | 6 AWG | 45 | 2 ft | fuse=60; to=+ in
S-01 | Solar array to charge controller | charging | Roof solar array > Solar charge controller | 10 AWG | 13 | 20 ft | V=40; breaker=20; at=6.1; to=PV+; to.neg=PV-; note=Two panels in series; the breaker beside the controller is the PV disconnect.
S-02 | Charge controller to DC busbar | charging | Solar charge controller > DC busbar | 6 AWG | 30 | 3 ft | fuse=40; from=BAT+; from.neg=BAT-
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger | 6 AWG | 38 | 16 ft | pos; engine; fuse=50; at=0.46; loop; to=IN+; note=Loop left at the engine before the bulkhead.
G-02 | DC-DC charger to DC busbar | charging | DC-DC charger > DC busbar | 6 AWG | 30 | 6 ft | fuse=40; from=OUT+
P-01 | Shore inlet to inverter/charger | shore | Shore inlet > Inverter/charger | 16 AWG | 24 | 10 ft | cord; breaker=30; at=0.3; ac_in; note=Inner run made from an extension-cord lead.
A-01 | Inverter/charger output to AC panel | ac_branch | Inverter/charger > AC panel | 10 AWG | 24 | 3 ft | breaker=30; ac_out; to=Main L
A-02 | Galley outlets | ac_branch | AC panel > Galley outlets | 12 AWG | 16 | 15 ft | breaker=20; from=Breaker 1
A-03 | Bed outlets | ac_branch | AC panel > Bed outlets | 14 AWG | 10 | 20 ft | breaker=15; from=Breaker 2
A-04 | Water heater element | ac_branch | AC panel > Water heater element | 12 AWG | 12 | 8 ft | continuous; breaker=20; from=Breaker 3
D-01 | LED lights | dc_branch | DC fuse panel > LED lights | 14 AWG | 4 | 15 ft | fuse=10; from=Way 1
D-02 | Compressor fridge | dc_branch | DC fuse panel > Compressor fridge | 12 AWG | 6 | 12 ft | continuous; critical; fuse=15; from=Way 2
D-03 | Roof fan | dc_branch | DC fuse panel > Roof fan | 14 AWG | 4 | 12 ft | fuse=10; from=Way 3
D-04 | Water pump | dc_branch | DC fuse panel > Water pump | 14 AWG | 6 | 10 ft | fuse=10; from=Way 4
D-05 | 12 V and USB sockets | dc_branch | DC fuse panel > 12 V and USB sockets | 12 AWG | 10 | 10 ft | fuse=15; from=Way 5
D-06 | Diesel heater | dc_branch | DC fuse panel > Diesel heater | 12 AWG | 10 | 8 ft | fuse=15; from=Way 6
E-01 | Inverter/charger case bonding | bonding | Inverter/charger > Chassis earth point | 6 AWG | 1 | 3 ft | earth; from=Case earth
""",  # noqa: E501
    waivers=(
        (
            "PROTECTION_TOO_FAR",
            "S-01",
            "Two-panel series string: its short-circuit current is barely above its working "
            "current and the 10 AWG run carries several times that, so the breaker at the "
            "controller serves as the PV disconnect.",
        ),
    ),
)

TRUCK = System(
    vehicle="5KWTR24X9S0000388",
    title="24 V house system for the box body",
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices=f"""
House battery | battery | battery_box | source | | Rear locker | +: pos M8 10; -: neg M8 10
Main busbar | busbar | body | | Locker panel | | +: pos M8; -: neg M8
DC distribution | dc_panel | body | | Locker panel | | + in: pos M6; - bus: neg M6; Way 1..5: pos screw
Alternator | alternator | engine | source | | Engine, left side | B+: pos M8
DC-DC charger | dc_dc_charger | chassis | | | Sealed box on the chassis rail, behind the cab | {DC_DC}
Roof solar array | other | body | source | | Box-body roof, two strings, fused in a roof junction box | PV+: pos -; PV-: neg -
Solar charge controller | charge_controller | body | | Locker panel | | {CONTROLLER}
Compressor fridge | load | body | | | Kitchen block |
Cabin lights | load | body | | | Ceiling |
Water pump | load | body | | | Under the bench |
Diesel heater | load | body | | | Rear locker |
Roof fan | load | body | | | Roof, over the kitchen |
""",  # noqa: E501
    circuits="""
C-01 | House battery to main busbar | main_feed | House battery > Main busbar | 1/0 AWG | 120 | 1.2 m | fuse=200; at=0.1; note=Terminal fuse on the battery's positive post.
C-02 | DC distribution feed | dc_branch | Main busbar > DC distribution | 6 AWG | 40 | 1.0 m | fuse=60; to=+ in
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger | 8 AWG | 25 | 2.5 m | pos; engine; fuse=40; at=0.4
G-02 | DC-DC charger to main busbar | charging | DC-DC charger > Main busbar | 8 AWG | 20 | 4.0 m | fuse=30; loop; from=OUT+; note=Loop left where the run crosses onto the subframe.
S-01 | Solar array to charge controller | charging | Roof solar array > Solar charge controller | 10 AWG | 19 | 5.0 m | V=40; fuse=25; at=0.5; to=PV+; to.neg=PV-
S-02 | Charge controller to main busbar | charging | Solar charge controller > Main busbar | 8 AWG | 30 | 1.0 m | fuse=40; from=BAT+; from.neg=BAT-
D-01 | Compressor fridge | dc_branch | DC distribution > Compressor fridge | 14 AWG | 3 | 4.0 m | continuous; critical; fuse=10; from=Way 1
D-02 | Cabin lights | dc_branch | DC distribution > Cabin lights | 14 AWG | 2 | 6.0 m | fuse=10; from=Way 2
D-03 | Water pump | dc_branch | DC distribution > Water pump | 14 AWG | 4 | 3.0 m | fuse=10; from=Way 3
D-04 | Diesel heater | dc_branch | DC distribution > Diesel heater | 14 AWG | 5 | 3.0 m | fuse=10; from=Way 4
D-05 | Roof fan | dc_branch | DC distribution > Roof fan | 14 AWG | 2 | 4.0 m | fuse=10; from=Way 5
""",  # noqa: E501
)

MOTORHOME = System(
    vehicle="4TWLR18C5P0019022",
    title="48 V system with 230 V inverter/charger",
    dc=("red", "black"),
    ac=("brown", "blue", "green_yellow"),
    ac_volts=230,
    devices=f"""
House battery 1 | battery | battery_box | source | | Garage, front left | +: pos M8 10; -: neg M8 10
House battery 2 | battery | battery_box | source | | Garage, front right | +: pos M8 10; -: neg M8 10
Main busbar | busbar | body | | Garage electrical bay | | +: pos M10; -: neg M10
Inverter/charger | inverter_charger | body | input=16 | Garage electrical bay | | DC+: pos M10; DC-: neg M10; {AC_IN_OUT}; Case earth: earth M6
Shore inlet | shore_inlet | body | source | | Right rear wall | {L_N_PE}
AC consumer unit | ac_panel | body | | Wardrobe panel | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1..4: line screw
Alternator | alternator | engine | source | | Engine bay | B+: pos M8
DC-DC charger 12/48 | dc_dc_charger | body | | Garage electrical bay | | {DC_DC}
Chassis earth point | other | body | | | Garage floor stud | Stud: earth M8
Kitchen sockets | load | body | | | Kitchen |
Induction hob | load | body | | | Kitchen |
Water heater | load | body | | | Garage |
Bedroom sockets | load | body | | | Rear bedroom |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect | interconnect | House battery 1 > House battery 2 | 2/0 AWG | 60 | 0.5 m |
C-02 | Battery 2 to main busbar | main_feed | House battery 2 > Main busbar | 2/0 AWG | 120 | 1.5 m | fuse=200; at=0.1
C-03 | Inverter/charger DC feed | dc_branch | Main busbar > Inverter/charger | 1/0 AWG | 115 | 1.0 m | fuse=150
P-01 | Shore inlet to inverter/charger | shore | Shore inlet > Inverter/charger | 12 AWG | 16 | 4.0 m | breaker=20; at=0.5; ac_in
A-01 | Inverter/charger output to consumer unit | ac_branch | Inverter/charger > AC consumer unit | 10 AWG | 22 | 3.0 m | breaker=30; ac_out; to=Main L
A-02 | Kitchen sockets | ac_branch | AC consumer unit > Kitchen sockets | 12 AWG | 13 | 5.0 m | breaker=20; from=Breaker 1; splice=black; note=Extended behind the fridge with an offcut.
A-03 | Induction hob | ac_branch | AC consumer unit > Induction hob | 12 AWG | 15 | 3.0 m | continuous; breaker=20; from=Breaker 2
A-04 | Water heater | ac_branch | AC consumer unit > Water heater | 14 AWG | 6 | 4.0 m | continuous; breaker=15; from=Breaker 3
A-05 | Bedroom sockets | ac_branch | AC consumer unit > Bedroom sockets | 14 AWG | 8 | 7.0 m | breaker=15; from=Breaker 4
G-01 | Alternator to DC-DC charger | charging | Alternator > DC-DC charger 12/48 | 6 AWG | 40 | 6.0 m | V=12; pos; engine; fuse=60; at=0.3; loop; to=IN+
G-02 | DC-DC charger to main busbar | charging | DC-DC charger 12/48 > Main busbar | 10 AWG | 10 | 1.5 m | fuse=15; from=OUT+
E-01 | Inverter/charger case bonding | bonding | Inverter/charger > Chassis earth point | 6 AWG | 1 | 1.0 m | earth; from=Case earth
""",  # noqa: E501
)

BOAT = System(
    vehicle="QKW12345D616",
    title="Replace house bank and rewire the DC panel",
    dc=("red", "yellow"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices="""
House battery 1 | battery | battery_box | source | | Battery box under the saloon berth | +: pos 3/8in 10; -: neg 3/8in 10
House battery 2 | battery | battery_box | source | | Battery box under the saloon berth | +: pos 3/8in 10; -: neg 3/8in 10
Battery switch | other | battery_box | | | Bulkhead beside the battery box | 1: pos 3/8in; COM: pos 3/8in
DC main panel | dc_panel | body | | Nav station panel | | + in: pos 5/16in; - bus: neg 5/16in; Way 1..5: pos screw; Bonding bus: earth screw
AC panel | ac_panel | body | | Nav station panel | | Main L: line screw; N bar: neutral screw; PE bar: earth screw; Breaker 1: line screw
Shore inlet | shore_inlet | body | source | | Cockpit, starboard | L: line screw; N: neutral screw; PE: earth screw
Battery charger | inverter_charger | body | input=10 | | Cockpit locker | DC+: pos M6; DC-: neg M6; AC in L: line screw; AC in N: neutral screw; AC in PE: earth screw
Engine block | other | engine | | | Engine compartment | Bonding stud: earth M8
Navigation lights | load | body | | | Bow and stern |
Bilge pump | load | body | | | Bilge |
VHF radio | load | body | | | Nav station |
Cabin lights | load | body | | | Saloon and cabins |
Fridge | load | body | | | Galley |
""",  # noqa: E501
    circuits="""
C-01 | Battery interconnect, positive | interconnect | House battery 1 > House battery 2 | 4/0 | 150 | 1 ft | pos
C-02 | Battery interconnect, negative | interconnect | House battery 1 > House battery 2 | 4/0 | 150 | 1 ft | neg
C-03 | House battery 1 to battery switch | main_feed | House battery 1 > Battery switch | 4 | 150 | 3 ft | pos; fuse=250; at=0.15; to=1; note=Terminal fuse on the battery post.
C-04 | Battery switch to DC main panel | main_feed | Battery switch > DC main panel | 4/0 | 150 | 6 ft | pos; from=COM; to=+ in
C-05 | House battery 2 negative to DC main panel | main_feed | House battery 2 > DC main panel | 4/0 | 150 | 7 ft | neg
P-01 | Shore inlet to AC panel | shore | Shore inlet > AC panel | 10 AWG | 24 | 10 ft | breaker=30; at=0.9; to=Main L
A-01 | Battery charger AC supply | ac_branch | AC panel > Battery charger | 14 AWG | 8 | 6 ft | breaker=15; from=Breaker 1; to=AC in L
G-01 | Battery charger to DC main panel | charging | Battery charger > DC main panel | 8 AWG | 30 | 5 ft | fuse=40; to=+ in
D-01 | Navigation lights | dc_branch | DC main panel > Navigation lights | 12 AWG | 2 | 25 ft | critical; fuse=10; from=Way 1
D-02 | Bilge pump | dc_branch | DC main panel > Bilge pump | 12 AWG | 5 | 15 ft | critical; fuse=10; from=Way 2
D-03 | VHF radio | dc_branch | DC main panel > VHF radio | 12 AWG | 6 | 12 ft | critical; fuse=10; from=Way 3
D-04 | Cabin lights | dc_branch | DC main panel > Cabin lights | 14 AWG | 3 | 20 ft | fuse=10; from=Way 4
D-05 | Fridge | dc_branch | DC main panel > Fridge | 10 AWG | 6 | 15 ft | continuous; untinned; fuse=15; from=Way 5; note=Run reused from the old installation.
E-01 | Engine bonding | bonding | DC main panel > Engine block | 8 AWG | 1 | 10 ft | earth; loop
""",  # noqa: E501
)

SYSTEMS = (VAN, TRUCK, MOTORHOME, BOAT)


def torque_defaults_load() -> None:
    """Seed the shop's default torques for crimped lugs, leaving any existing row alone."""
    for stud, value, source in TORQUE_DEFAULTS:
        if TorqueDefault.objects.filter(stud_size=stud, kind="lug").exists():
            continue
        default = TorqueDefault(
            stud_size=stud, kind="lug", value=Decimal(value), unit="lbf*in", source=source
        )
        default.full_clean()
        default.save()


def _devices(job, system: System) -> dict[str, Device]:
    existing = {d.name: d for d in job.devices.prefetch_related("terminals")}
    for spec in _table(system.devices, _device):
        device = existing.get(spec.name)
        if device is None:
            device = Device(
                job=job,
                name=spec.name,
                kind=spec.kind,
                is_source=spec.source,
                mounting=spec.mounting,
                enclosure=spec.enclosure,
                location=spec.location,
                input_current_a=spec.input_a,
            )
            device.full_clean()
            device.save()
        have = {t.name for t in device.terminals.all()}
        for name, polarity, stud, manual in spec.terminals:
            if name not in have:
                terminal = Terminal(
                    device=device,
                    name=name,
                    polarity=polarity,
                    stud_size=stud,
                    manual_torque_value=manual,
                )
                terminal.full_clean()
                terminal.save()
    # Fresh objects: the terminals just added must be visible to termination matching.
    return {d.name: d for d in job.devices.all()}


_CONDUCTORS = {"pair", "pos", "neg", "ac", "earth"}
_CONSTRUCTIONS = {"cord", "solid", "standard"}


def _colours(system: System, conductors: str) -> tuple[str, str, str]:
    if conductors == "earth":
        return ("", "", system.ac[2])
    if conductors == "ac":
        return system.ac
    positive = system.dc[0] if conductors in ("pair", "pos") else ""
    negative = system.dc[1] if conductors in ("pair", "neg") else ""
    return (positive, negative, "")


def _terminal(device: Device, name: str | None) -> Terminal | None:
    return Terminal.objects.get(device=device, name=name) if name else None


def _placements(spec: CircuitSpec) -> list[tuple[str, str, str]]:
    """(end, polarity, terminal) for ends on devices with several terminals of a polarity."""
    out = [
        (key.split(".")[0], key.split(".")[1], name)
        for key, name in spec.options.items()
        if key.startswith(("from.", "to."))
    ]
    if "ac_in" in spec.flags:
        out += [
            ("to", "line", "AC in L"),
            ("to", "neutral", "AC in N"),
            ("to", "earth", "AC in PE"),
        ]
    if "ac_out" in spec.flags:
        out += [
            ("from", "line", "AC out L"),
            ("from", "neutral", "AC out N"),
            ("from", "earth", "AC out PE"),
        ]
    return out


def _circuit(job, system: System, spec: CircuitSpec, devices: dict[str, Device]) -> Circuit:
    o, flags = spec.options, spec.flags
    ac = spec.role in (Circuit.Role.SHORE_SUPPLY, Circuit.Role.AC_BRANCH)
    conductors = next(iter(flags & _CONDUCTORS), "ac" if ac else "pair")
    colour_a, colour_b, colour_earth = _colours(system, conductors)
    volts = (
        Decimal(o["V"]) if "V" in o else Decimal(system.ac_volts if ac else job.vehicle.dc_voltage)
    )
    kind = "fuse" if "fuse" in o else "breaker" if "breaker" in o else "none"
    frm, to = devices[spec.frm], devices[spec.to]
    placements = _placements(spec)
    chosen = {end: name for end, polarity, name in placements if polarity in ("pos", "line")}
    circuit = circuit_create(
        job=job,
        tag=spec.tag,
        name=spec.name,
        role=spec.role,
        from_device=frm,
        from_terminal=_terminal(frm, o.get("from") or chosen.get("from")),
        to_device=to,
        to_terminal=_terminal(to, o.get("to") or chosen.get("to")),
        nominal_voltage=volts,
        design_current_a=spec.amps,
        continuous="continuous" in flags,
        critical="critical" in flags,
        length_m=spec.length_m,
        length_unit=spec.unit,
        conductor_size=spec.size,
        conductors=conductors,
        parallel=int(o.get("x", 1)),
        construction=next(iter(flags & _CONSTRUCTIONS), "fine"),
        tinned="untinned" not in flags,
        engine_space="engine" in flags,
        colour_a=colour_a,
        colour_b=colour_b,
        colour_earth=colour_earth,
        splice="splice" in o,
        colour_after_splice=o.get("splice", ""),
        protection_type=kind,
        protection_a=Decimal(o[kind]) if kind != "none" else None,
        protection_distance_m=float(o["at"]) if "at" in o else None,
        service_loop_confirmed="loop" in flags,
        notes=o.get("note", ""),
    )
    # Ends the services cannot place (a device with several terminals of that polarity).
    for end, polarity, name in placements:
        terminal = _terminal(frm if end == "from" else to, name)
        for termination in circuit.terminations.filter(
            end=end, polarity=polarity, terminal__isnull=True
        ):
            termination.terminal = terminal
            termination_spec_fill(termination)
            termination.full_clean()
            termination.save()
    return circuit


def _waivers(job, system: System, lead) -> None:
    for code, subject, reason in system.waivers:
        if Waiver.objects.filter(job=job, code=code, subject=subject).exists():
            continue
        try:
            waiver_create(job=job, code=code, subject=subject, reason=reason, lead=lead)
        except ValidationError:
            continue  # the finding is no longer raised (the system was edited): nothing to waive


def load(*, lead) -> None:
    """Load the demo systems into the demo jobs that exist. Call inside a transaction."""
    from shop.models import Job

    torque_defaults_load()
    for system in SYSTEMS:
        job = (
            Job.objects.select_related("vehicle")
            .filter(vehicle__identification=system.vehicle, title=system.title)
            .first()
        )
        if job is None:
            continue
        devices = _devices(job, system)
        tags = set(job.circuits.values_list("tag", flat=True))
        for spec in _table(system.circuits, _circuit_spec):
            if spec.tag not in tags:
                _circuit(job, system, spec, devices)
        _waivers(job, system, lead)
