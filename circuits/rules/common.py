"""What the whole-system rules share: building findings, reading a circuit's sizing, and
walking the battery bank's path.

Rules get devices and circuits already loaded (circuits with from_device/to_device) and
never query the database per circuit; the sizing of each circuit comes in `sizings`
(tag -> CircuitSizing) from circuits.system. Devices are compared by primary key, since a
circuit's from_device is a different Python object from the one in the device list.
"""

from __future__ import annotations

from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field

from circuits.findings import CircuitSizing, SystemFinding, size_one
from circuits.models import Circuit, Device
from circuits.sizing.findings import BLOCKING, NOTE, WARNING

__all__ = [
    "BLOCKING",
    "EPS",
    "NOTE",
    "WARNING",
    "Bank",
    "ampacity_a",
    "amps",
    "battery_banks",
    "describe",
    "device_key",
    "finding",
    "installed_size",
    "size_text",
    "sizing_of",
]

EPS = 1e-6

# Roles that make up the path from a battery to its first protection or busbar.
PATH_ROLES = (Circuit.Role.BATTERY_INTERCONNECT, Circuit.Role.MAIN_FEED)
# Devices where that path ends: the protection (fuse/breaker holder) or the distribution
# (a busbar, or a DC panel, which is a busbar with its branch fuses).
PATH_ENDS = (Device.Kind.PROTECTION, Device.Kind.BUSBAR, Device.Kind.DC_PANEL)


def finding(
    code: str,
    severity: str,
    message: str,
    source: str,
    *,
    subject: str,
    circuits: Iterable[str] = (),
) -> SystemFinding:
    return SystemFinding(
        code=code,
        severity=severity,
        message=message,
        source=source,
        subject=subject,
        circuits=tuple(dict.fromkeys(circuits)),  # keep order, drop repeats
    )


def device_key(device: Device) -> int:
    return device.pk if device.pk is not None else id(device)


def sizing_of(
    circuit: Circuit, sizings: Mapping[str, CircuitSizing] | None
) -> CircuitSizing | None:
    if sizings is not None and circuit.tag in sizings:
        return sizings[circuit.tag]
    return size_one(circuit)


def installed_size(circuit: Circuit, sizings: Mapping[str, CircuitSizing] | None):
    """The ConductorSize the circuit was entered with, or None (no size, unreadable)."""
    sizing = sizing_of(circuit, sizings)
    if sizing is None or sizing.report is None or sizing.report.input.size is None:
        return None
    return sizing.report.input.size


def ampacity_a(circuit: Circuit, sizings: Mapping[str, CircuitSizing] | None) -> float | None:
    """Ampacity of the conductor as installed (every factor, times the number in parallel),
    or None when the circuit has no readable size. A circuit entered without a size is
    sized by recommendation; that recommended conductor is not what is installed, so it
    does not count here."""
    sizing = sizing_of(circuit, sizings)
    if sizing is None or sizing.report is None or sizing.report.input.size is None:
        return None
    result = sizing.report.result
    return result.ampacity_a if result is not None else None


def size_text(circuit: Circuit) -> str:
    label = circuit.size_label
    return f"{circuit.parallel} × {label}" if circuit.parallel > 1 else label


def lower_first(label: str) -> str:
    """'Battery interconnect' -> 'battery interconnect'; 'DC branch' stays."""
    return label if label[:2].isupper() else label[:1].lower() + label[1:]


def describe(circuit: Circuit) -> str:
    """'C-01 (battery interconnect, 2 AWG)' for messages."""
    return f"{circuit.tag} ({lower_first(circuit.get_role_display())}, {size_text(circuit)})"


def amps(value) -> str:
    """'300 A', '12.5 A' (takes floats and Decimals)."""
    return f"{float(value):.4g} A"


@dataclass
class Bank:
    """Batteries joined by interconnects and main feeds, and the path from them to the first
    protection or busbar: `path` holds those circuits, `ends` the devices where it stops."""

    batteries: list[Device] = field(default_factory=list)
    path: list[Circuit] = field(default_factory=list)
    ends: list[Device] = field(default_factory=list)

    @property
    def tags(self) -> set[str]:
        return {c.tag for c in self.path}


def _other_end(circuit: Circuit, key: int) -> Device:
    return circuit.to_device if device_key(circuit.from_device) == key else circuit.from_device


def battery_banks(circuits: list[Circuit]) -> list[Bank]:
    """Walk out from every battery along battery interconnects and main feeds.

    The walk passes through batteries and through devices such as a battery switch, and
    stops at a protection device (fuse or breaker holder), a busbar or a DC panel, which
    ends the path.
    It goes on past a circuit carrying its own protection: an unfused main feed beyond that
    fuse (say, after a battery switch) is protected only by it, so it is part of the path
    and must carry that rating. Earth-only circuits carry no load current and are not part
    of the path. Batteries reached from one another form one bank, reported once.
    """
    by_device: dict[int, list[Circuit]] = {}
    for c in circuits:
        if c.role in PATH_ROLES and c.conductors != Circuit.Conductors.EARTH:
            by_device.setdefault(device_key(c.from_device), []).append(c)
            by_device.setdefault(device_key(c.to_device), []).append(c)
    batteries: dict[int, Device] = {}
    for c in circuits:
        for d in (c.from_device, c.to_device):
            if d.kind == Device.Kind.BATTERY:
                batteries[device_key(d)] = d
    seen_batteries: set[int] = set()
    banks: list[Bank] = []
    for key in sorted(batteries):
        if key in seen_batteries:
            continue
        bank = Bank()
        visited = {key}
        queue = [batteries[key]]
        path_tags: set[str] = set()
        end_keys: set[int] = set()
        while queue:
            device = queue.pop(0)
            here = device_key(device)
            if device.kind == Device.Kind.BATTERY:
                seen_batteries.add(here)
                bank.batteries.append(device)
            for c in by_device.get(here, []):
                if c.tag in path_tags:
                    continue
                path_tags.add(c.tag)
                bank.path.append(c)
                nxt = _other_end(c, here)
                nxt_key = device_key(nxt)
                if nxt.kind in PATH_ENDS:
                    if nxt_key not in end_keys:
                        end_keys.add(nxt_key)
                        bank.ends.append(nxt)
                    continue
                if nxt_key not in visited:
                    visited.add(nxt_key)
                    queue.append(nxt)
        bank.path.sort(key=lambda c: c.tag)
        banks.append(bank)
    return banks
