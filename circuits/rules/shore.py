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

The shore cord's far end is an external supply (a campground or marina pedestal, a
generator, a building socket: Device kind "external_supply"), off the vehicle, with its
own breaker and voltage. The cord is the circuit from it to the inlet, protected at its
source by that breaker. The cord is weighed against both:
* SHORE_CORD_BELOW_SUPPLY (blocking): the cord carries less than the supply's breaker
  rating, so the breaker does not protect it (NEC 2023 240.4: a conductor is protected
  at its ampacity; 240.4(D) for 18-10 AWG). Not raised again when the cord's protection
  is that breaker and the sizing engine already says so on the cord
  (PROTECTION_ABOVE_AMPACITY, PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT).
* A cord whose supply's breaker rating is known is not held to the inverter/charger's
  input setting (SHORE_BELOW_INPUT_SETTING) on top: at most the breaker's current flows
  in it, and SHORE_CORD_BELOW_SUPPLY has judged it against that. The conductors inside
  the vehicle still carry the input setting.
* SHORE_INPUT_ABOVE_SUPPLY (warning, subject: the inverter/charger's name): the input
  current setting is above the breaker of the supply that feeds it; at full input the
  supply's breaker trips. Set the input current limit to the supply's rating or less
  (common practice: the input limit is set to the shore breaker).
* SHORE_SUPPLY_VOLTAGE (subject: the supply's name): the supply's voltage is more than
  10 % from the vehicle's AC system (120 V or 230 V nominal; the 10 % band is common
  practice): blocking when above (equipment rated 120 V on a 230 V supply fails and can
  burn), warning when below (chargers and motors may not start or run hot).
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.models import Circuit, Device

from .common import (
    BLOCKING,
    EPS,
    NOTE,
    WARNING,
    ampacity_a,
    amps,
    describe,
    device_key,
    finding,
    installed_size,
    sizing_of,
)

SOURCE = "NEC 2023 Table 310.16 and 240.4(D); common practice: a 16 AWG cord is good for about 10 A"
SOURCE_SUPPLY = (
    "NEC 2023 240.4 and 240.4(D) (a conductor protected at its ampacity); common practice: "
    "the input current limit set to the shore supply's breaker"
)
SOURCE_VOLTAGE = "common practice: a shore supply within 10 % of the vehicle's 120 V or 230 V"
VOLTAGE_BAND = 0.10  # common practice
AC_NOMINAL_V = {"120_60": 120.0, "230_50": 230.0}
# The engine's findings that already say a cord's protection is above what it carries.
_ENGINE_SAYS = {"PROTECTION_ABOVE_AMPACITY", "PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT"}

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


def supply_of(circuit: Circuit) -> Device | None:
    """The external supply at one end of the circuit (a shore cord's far end), or None."""
    for device in (circuit.from_device, circuit.to_device):
        if device.is_external:
            return device
    return None


def _cord_findings(c: Circuit, supply: Device, sizings) -> list[SystemFinding]:
    if supply.protection_a is None:
        return []
    rating = float(supply.protection_a)
    usable = usable_current_a(c, sizings)
    if usable is None or usable + EPS >= rating:
        return []
    sizing = sizing_of(c, sizings)
    engine_codes = {f.code for f in sizing.findings} if sizing is not None else set()
    through_supply = c.protection.device is not None and device_key(
        c.protection.device
    ) == device_key(supply)
    if through_supply and engine_codes & _ENGINE_SAYS:
        return []
    return [
        finding(
            "SHORE_CORD_BELOW_SUPPLY",
            BLOCKING,
            f"{describe(c)} carries about {amps(usable)}, less than the {amps(rating)} "
            f"breaker of {supply}, its supply: a fault or overload in the cord does not trip "
            f"that breaker before the cord overheats. Use a cord rated at least "
            f"{amps(rating)}, or a supply protected at {amps(usable)} or less.",
            SOURCE_SUPPLY,
            subject=c.tag,
            circuits=[c.tag],
        )
    ]


def _voltage_findings(supply: Device, cords: list[Circuit], vehicle) -> list[SystemFinding]:
    nominal = AC_NOMINAL_V.get(getattr(vehicle, "ac_system", "none"))
    if nominal is None or supply.supply_voltage is None:
        return []
    volts = float(supply.supply_voltage)
    if abs(volts - nominal) <= nominal * VOLTAGE_BAND + EPS:
        return []
    above = volts > nominal
    harm = (
        "equipment built for it fails and can burn on the higher voltage"
        if above
        else "chargers and motors may not start, or run hot"
    )
    return [
        finding(
            "SHORE_SUPPLY_VOLTAGE",
            BLOCKING if above else WARNING,
            f"{supply} supplies {volts:g} V but the vehicle's AC system is {nominal:g} V: "
            f"{harm}. Plug in only to a {nominal:g} V supply, or fit a transformer or "
            "converter rated for the load.",
            SOURCE_VOLTAGE,
            subject=supply.name,
            circuits=[c.tag for c in cords],
        )
    ]


def _supplies(circuits: list[Circuit]) -> dict[int, tuple[Device, list[Circuit]]]:
    found: dict[int, tuple[Device, list[Circuit]]] = {}
    for c in circuits:
        supply = supply_of(c)
        if supply is not None:
            found.setdefault(device_key(supply), (supply, []))[1].append(c)
    return found


def _input_above_supply(charger: Device, fed: list[Circuit]) -> list[SystemFinding]:
    setting = float(charger.input_current_a)
    for c in fed:
        supply = supply_of(c)
        if supply is None or supply.protection_a is None:
            continue
        rating = float(supply.protection_a)
        if setting > rating + EPS:
            return [
                finding(
                    "SHORE_INPUT_ABOVE_SUPPLY",
                    WARNING,
                    f"{charger} is set to draw up to {amps(setting)} from shore power, but "
                    f"{supply} is protected at {amps(rating)}: at full input its breaker "
                    f"trips. Set the input current limit to {amps(rating)} or less while on "
                    "this supply.",
                    SOURCE_SUPPLY,
                    subject=charger.name,
                    circuits=[c.tag],
                )
            ]
    return []


def shore(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    for supply, cords in _supplies(circuits).values():
        for c in cords:
            out += _cord_findings(c, supply, sizings)
        out += _voltage_findings(supply, cords, vehicle)
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
        out += _input_above_supply(charger, fed)
        for c in fed:
            supply = supply_of(c)
            if supply is not None and supply.protection_a is not None:
                continue  # a cord judged against its supply's breaker (above)
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
