"""Shore supply: the shore cord and inlet conductors carry the inverter/charger's input
current setting.

An inverter/charger draws from shore power up to its input current setting (charging and
pass-through together), whatever the design current entered on the shore circuits. For
every inverter/charger, the circuits on its input side are checked: the shore-supply
circuits connected to it (through an inlet, a shore breaker or an AC panel), and any AC
circuit that ends at it.

* SHORE_BELOW_INPUT_SETTING (blocking): a conductor on the input side carries less than
  the input current setting. What a conductor carries is the sizing engine's ampacity for
  it as installed (NEC 2023 Table 310.16 for AC, after derating, times the number in
  parallel), limited for 18-10 AWG to the small-conductor limits of NEC 2023 240.4(D)
  (18 AWG 7 A, 16 AWG 10 A, 14 AWG 15 A, 12 AWG 20 A, 10 AWG 30 A) — also what a cord of
  that size is commonly good for: a 16 AWG cord is good for about 10 A (common practice).
* SHORE_INPUT_SETTING_UNKNOWN (note, subject: the inverter/charger's name): shore power
  feeds an inverter/charger with no input current setting recorded.
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.models import Circuit, Device

from .common import (
    BLOCKING,
    EPS,
    NOTE,
    ampacity_a,
    amps,
    describe,
    device_key,
    finding,
    installed_size,
)

SOURCE = "NEC 2023 Table 310.16 and 240.4(D); common practice: a 16 AWG cord is good for about 10 A"

# NEC 2023 240.4(D), copper (standards reference §4, confirmed).
SMALL_CONDUCTOR_LIMIT_A = {18: 7.0, 16: 10.0, 14: 15.0, 12: 20.0, 10: 30.0}


def usable_current_a(circuit: Circuit, sizings) -> float | None:
    """What the conductor as installed carries, for this rule; None if unknown."""
    size = installed_size(circuit, sizings)
    if size is None:
        return None
    ampacity = ampacity_a(circuit, sizings)
    limit = SMALL_CONDUCTOR_LIMIT_A.get(size.gauge) if size.kind == "awg" else None
    if limit is not None:
        limit *= circuit.parallel
        return limit if not ampacity else min(ampacity, limit)
    return ampacity or None


def _input_side(charger: Device, circuits: list[Circuit]) -> list[Circuit]:
    key = device_key(charger)
    shore_at: dict[int, list[Circuit]] = {}
    for c in circuits:
        if c.role == Circuit.Role.SHORE_SUPPLY:
            shore_at.setdefault(device_key(c.from_device), []).append(c)
            shore_at.setdefault(device_key(c.to_device), []).append(c)
    found = [
        c
        for c in circuits
        if c.role == Circuit.Role.SHORE_SUPPLY
        and key in (device_key(c.from_device), device_key(c.to_device))
        or c.is_ac
        and device_key(c.to_device) == key
    ]
    seen = {c.tag for c in found}
    queue = [c.from_device if device_key(c.to_device) == key else c.to_device for c in found]
    visited = {key}
    while queue:
        device = queue.pop(0)
        here = device_key(device)
        if here in visited or device.kind == Device.Kind.INVERTER_CHARGER:
            continue
        visited.add(here)
        for c in shore_at.get(here, []):
            if c.tag not in seen:
                seen.add(c.tag)
                found.append(c)
                nxt = c.to_device if device_key(c.from_device) == here else c.from_device
                queue.append(nxt)
    return sorted(found, key=lambda c: c.tag)


def _chargers(circuits: list[Circuit]) -> list[Device]:
    found: dict[int, Device] = {}
    for c in circuits:
        for d in (c.from_device, c.to_device):
            if d.kind == Device.Kind.INVERTER_CHARGER:
                found.setdefault(device_key(d), d)
    return sorted(found.values(), key=lambda d: d.name)


def shore(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    for charger in _chargers(circuits):
        fed = _input_side(charger, circuits)
        if not fed:
            continue
        if charger.input_current_a is None:
            out.append(
                finding(
                    "SHORE_INPUT_SETTING_UNKNOWN",
                    NOTE,
                    f"Shore power feeds {charger} ({', '.join(c.tag for c in fed)}) but its AC "
                    "input current setting is not recorded; enter it so the shore cord and "
                    "inlet conductors can be checked against it.",
                    SOURCE,
                    subject=charger.name,
                    circuits=[c.tag for c in fed],
                )
            )
            continue
        setting = float(charger.input_current_a)
        for c in fed:
            usable = usable_current_a(c, sizings)
            if usable is None or usable + EPS >= setting:
                continue
            size = installed_size(c, sizings)
            cord = (
                " A 16 AWG cord is good for about 10 A (common practice)."
                if size is not None and size.gauge == 16
                else ""
            )
            out.append(
                finding(
                    "SHORE_BELOW_INPUT_SETTING",
                    BLOCKING,
                    f"{describe(c)} carries about {amps(usable)}, less than the "
                    f"{amps(setting)} input current setting of {charger}; at full input it "
                    f"overheats.{cord} Fit conductors (and cord) rated at least "
                    f"{amps(setting)}, or set the input current limit to {amps(usable)} or "
                    "less.",
                    SOURCE,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
    return out
