"""Small factory helpers for hand-built electrical systems in tests.

Stable API (other test modules import it):

    make_device(job, **fields) -> Device
    make_terminal(device, **fields) -> Terminal
    make_circuit(job, from_device, to_device, **fields) -> Circuit   (via circuit_create)
    make_battery_bank(job, **options) -> (link, feed)   two paralleled batteries
    findings_for(job, code=None) -> list[SystemFinding]    rule_codes(job) -> set[str]

Defaults describe a plain, finding-free 12 V DC branch: 10 A over 2 m of fine-stranded,
tinned 12 AWG in red/black with a 15 A fuse, between two devices on the body. Tests
override only what the rule they check is about.
"""

from __future__ import annotations

import itertools
from decimal import Decimal

from circuits.models import Circuit, Device, Terminal
from circuits.services import circuit_create

_seq = itertools.count(1)


def make_device(job, **fields) -> Device:
    fields.setdefault("name", f"Device {next(_seq)}")
    fields.setdefault("kind", Device.Kind.LOAD)
    fields.setdefault("mounting", "body")
    if fields["kind"] in (Device.Kind.BATTERY, Device.Kind.ALTERNATOR, Device.Kind.SHORE_INLET):
        fields.setdefault("is_source", True)
    device = Device(job=job, **fields)
    device.full_clean()
    device.save()
    return device


def make_terminal(device: Device, **fields) -> Terminal:
    fields.setdefault("name", f"T{next(_seq)}")
    fields.setdefault("polarity", "pos")
    terminal = Terminal(device=device, **fields)
    terminal.full_clean()
    terminal.save()
    return terminal


def _decimal(value) -> Decimal | None:
    return None if value is None else Decimal(str(value))


def make_circuit(job, from_device: Device, to_device: Device, **fields) -> Circuit:
    """A circuit saved through circuits.services.circuit_create (terminations included)."""
    fields.setdefault("tag", f"T-{next(_seq):02d}")
    fields.setdefault("name", f"Circuit {fields['tag']}")
    fields.setdefault("role", Circuit.Role.DC_BRANCH)
    fields.setdefault("nominal_voltage", 12)
    fields.setdefault("design_current_a", 10)
    fields.setdefault("length_m", 2.0)
    fields.setdefault("conductor_size", "12 AWG")
    ac = fields["role"] in (Circuit.Role.SHORE_SUPPLY, Circuit.Role.AC_BRANCH)
    fields.setdefault("conductors", Circuit.Conductors.AC if ac else Circuit.Conductors.PAIR)
    if fields["conductors"] == Circuit.Conductors.AC:
        fields.setdefault("colour_a", "black")
        fields.setdefault("colour_b", "white")
        fields.setdefault("colour_earth", "green")
    elif fields["conductors"] == Circuit.Conductors.EARTH:
        fields.setdefault("colour_earth", "green")
    else:
        fields.setdefault("colour_a", "red")
        fields.setdefault("colour_b", "black")
    fields.setdefault("protection_type", Circuit.ProtectionType.FUSE)
    if fields["protection_type"] != Circuit.ProtectionType.NONE:
        fields.setdefault("protection_a", 15)
    for name in ("nominal_voltage", "design_current_a", "protection_a"):
        if name in fields:
            fields[name] = _decimal(fields[name])
    return circuit_create(job=job, from_device=from_device, to_device=to_device, **fields)


def make_battery_bank(
    job,
    *,
    interconnect: str = "4/0 AWG",
    feed: str = "4/0 AWG",
    parallel: int = 1,
    engine_space: bool = False,
    main_fuse: float = 300,
    feed_current: float = 250,
) -> tuple[Circuit, Circuit]:
    """Two paralleled batteries ("Battery 1", "Battery 2"), an unfused interconnect C-01
    between them and a main feed C-02 from the second battery to a "Busbar", fused
    0.1 m from the battery."""
    b1 = make_device(job, name="Battery 1", kind=Device.Kind.BATTERY, mounting="battery_box")
    b2 = make_device(job, name="Battery 2", kind=Device.Kind.BATTERY, mounting="battery_box")
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR, mounting="battery_box")
    link = make_circuit(
        job,
        b1,
        b2,
        tag="C-01",
        role="interconnect",
        conductor_size=interconnect,
        parallel=parallel,
        engine_space=engine_space,
        design_current_a=150,
        length_m=0.3,
        protection_type="none",
    )
    main = make_circuit(
        job,
        b2,
        bus,
        tag="C-02",
        role="main_feed",
        conductor_size=feed,
        design_current_a=feed_current,
        length_m=1.0,
        protection_a=main_fuse,
        protection_distance_m=0.1,
    )
    return link, main


def findings_for(job, code: str | None = None) -> list:
    """The job's findings (sizing engine and whole-system rules), optionally one code."""
    from circuits.system import job_system_report

    found = job_system_report(job).all_findings
    return [f for f in found if code is None or f.code == code]


def rule_codes(job) -> set[str]:
    """Codes of the whole-system rules' findings only (not the sizing engine's)."""
    from circuits.sizing import CODES

    return {f.code for f in findings_for(job) if f.code not in CODES}
