"""Loading the demo systems into the demo jobs, idempotently (see the package's docstring)."""

from __future__ import annotations

from decimal import Decimal

from django.core.exceptions import ValidationError

from circuits.models import Circuit, Device, Terminal, TorqueDefault, Waiver
from circuits.services import circuit_create, termination_spec_fill, waiver_create

from .boat import BOAT
from .motorhome import MOTORHOME
from .tables import TORQUE_DEFAULTS, CircuitSpec, System, circuit_spec, device_spec, read_table
from .truck import TRUCK
from .van import VAN

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
    for spec in read_table(system.devices, device_spec):
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
                protection_type=spec.protection[0] if spec.protection else "",
                protection_a=spec.protection[1] if spec.protection else None,
                supply_voltage=spec.supply_v,
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


def _colours(system: System, spec: CircuitSpec, conductors: str) -> dict[str, str]:
    """The insulation colours (the system's, or the spec's own) and any re-marking."""
    if conductors == "earth":
        colours = ("", "", system.ac[2])
    elif conductors == "ac":
        colours = system.ac
    else:
        positive = system.dc[0] if conductors in ("pair", "pos") else ""
        negative = system.dc[1] if conductors in ("pair", "neg") else ""
        colours = (positive, negative, "")
    out = {}
    for role, colour in zip(("a", "b", "earth"), colours, strict=True):
        field = "colour_earth" if role == "earth" else f"colour_{role}"
        out[field] = spec.options.get(f"colour.{role}", colour)
        if f"mark.{role}" in spec.options:
            method, mark_colour, ends = spec.options[f"mark.{role}"].split(":")
            out |= {
                f"marking_{role}_method": method,
                f"marking_{role}_colour": mark_colour,
                f"marking_{role}_ends": ends,
            }
    return out


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
        **_colours(system, spec, conductors),
        splice="splice" in o,
        colour_after_splice=o.get("splice", ""),
        protection_device=devices[o["prot"]] if "prot" in o else None,
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


def system_load(job, system: System) -> None:
    """Give a job a demo system's devices and the circuits it lacks (devices by name,
    circuits by tag: what is there is left as it is)."""
    devices = _devices(job, system)
    tags = set(job.circuits.values_list("tag", flat=True))
    for spec in read_table(system.circuits, circuit_spec):
        if spec.tag not in tags:
            _circuit(job, system, spec, devices)


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
        system_load(job, system)
        _waivers(job, system, lead)
