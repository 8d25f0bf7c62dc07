"""Unprotected: every ungrounded conductor leaving a source is protected, close to the source.

A circuit leaves a source when either end device is marked as a source or is an external
supply (the direction a circuit was entered in does not matter: a main feed entered
busbar -> battery still leaves the battery). A shore cord runs between two sources, the
external supply and the inlet; current flows from the supply, so the supply is the
source it is measured from.

The protection is read from its one home (Circuit.protection): a protection device at one
end of the run sits at no distance from the source when it is the source (an external
supply's own breaker) and one circuit length away when it is the far end (a fuse holder
the run from the battery lands on); the circuit's own in-line protection sits at its
recorded distance. Then:

* UNPROTECTED_FROM_SOURCE (blocking): no fuse or breaker, so a short anywhere along the run
  is fed by the source's whole fault current. If the far end is a fuse or breaker holder
  (Device kind "protection") not chosen as the protection (older records), the protection
  is still taken to sit there, one circuit length from the source, and the distance rule
  below applies instead.
* PROTECTION_TOO_FAR (blocking): protection farther from the source than allowed:
  0.178 m (7 in) from a battery, 1.83 m (72 in) from any other source (alternator, shore
  inlet, a source marked as such). When both ends are sources the stricter limit applies.
* PROTECTION_DISTANCE_UNKNOWN (warning): protection is recorded but not its distance from
  the source; the rule cannot check it until it is entered.

Not checked, by design:
* Earth and bonding conductors and negative-only conductors: they are not ungrounded
  (current-carrying, unearthed) conductors.
* A battery interconnect between two batteries: paralleled batteries form one source, and
  the interconnect is protected by the bank's main-feed protection (the bottleneck rule
  then makes sure the interconnect carries that protection's full rating), so no
  per-interconnect fuse is demanded.

The distances are ABYC E-11's overcurrent-protection distances as remembered (from
memory, not confirmed against the text): 7 in (178 mm) from the battery connection, 40 in
(1.02 m) for a conductor connected to the DC system away from the battery and sheathed,
72 in (1.83 m) for a conductor sheathed or in a raceway throughout; engine cranking-motor
conductors are exempt. 33 CFR 183.455 has the same scheme (from memory). This tool does not
record sheathing, so it applies 7 in at batteries and 72 in at other sources; a lead can
waive a finding where a documented exception applies (a sheathed run, a current-limited
source such as a two-string solar array).
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.models import Circuit, Device

from .common import BLOCKING, EPS, WARNING, describe, device_key, finding

BATTERY_LIMIT_M = 0.178  # 7 in: ABYC E-11 / 33 CFR 183.455, from memory
OTHER_SOURCE_LIMIT_M = 1.83  # 72 in: ABYC E-11 / 33 CFR 183.455, from memory

SOURCE = (
    "ABYC E-11 overcurrent protection: within 7 in (178 mm) of a battery, 72 in (1.83 m) "
    "of other sources (from memory); 33 CFR 183.455 (from memory)"
)

_EXEMPT_CONDUCTORS = (Circuit.Conductors.EARTH, Circuit.Conductors.NEGATIVE)


def _limit(sources: list[Device]) -> tuple[float, Device, str]:
    for d in sources:
        if d.kind == Device.Kind.BATTERY:
            return BATTERY_LIMIT_M, d, "178 mm (7 in) of a battery"
    return OTHER_SOURCE_LIMIT_M, sources[0], "1.83 m (72 in) of a source"


def _is_interconnect_between_batteries(c: Circuit) -> bool:
    return (
        c.role == Circuit.Role.BATTERY_INTERCONNECT
        and c.from_device.kind == Device.Kind.BATTERY
        and c.to_device.kind == Device.Kind.BATTERY
    )


def _sources(c: Circuit) -> list[Device]:
    ends = (c.from_device, c.to_device)
    return [d for d in ends if d.is_external] or [d for d in ends if d.supplies]


def _check(c: Circuit) -> SystemFinding | None:
    sources = _sources(c)
    if not sources:
        return None
    if c.role == Circuit.Role.BONDING or c.conductors in _EXEMPT_CONDUCTORS:
        return None
    if _is_interconnect_between_batteries(c):
        return None
    limit, source, words = _limit(sources)
    far = c.to_device if device_key(source) == device_key(c.from_device) else c.from_device
    protection = c.protection
    distance = protection.distance_m
    where = "its protection"
    if protection.device is not None:
        at_source = device_key(protection.device) == device_key(source)
        distance = 0.0 if at_source else float(c.length_m)
        where = f"the protection in {protection.device}"
    elif not protection.fitted:
        if far.kind != Device.Kind.PROTECTION or far.is_source:
            return finding(
                "UNPROTECTED_FROM_SOURCE",
                BLOCKING,
                f"{describe(c)} leaves {source}, a source, with no fuse or breaker: a short "
                "anywhere along it is fed by the source's full fault current. Fit protection "
                f"within {words} and record its rating and distance.",
                SOURCE,
                subject=c.tag,
                circuits=[c.tag],
            )
        distance = float(c.length_m)
        where = f"the protection in {far} at its far end"
    if distance is None:
        return finding(
            "PROTECTION_DISTANCE_UNKNOWN",
            WARNING,
            f"{describe(c)} leaves {source}, a source; record how far its protection sits from "
            f"{source} so the distance can be checked (at most {words}).",
            SOURCE,
            subject=c.tag,
            circuits=[c.tag],
        )
    if distance > limit + EPS:
        return finding(
            "PROTECTION_TOO_FAR",
            BLOCKING,
            f"{describe(c)}: {where} is {distance:.2f} m from {source}, but protection must "
            f"sit within {words}; the unprotected length can burn without the fuse or breaker "
            f"opening. Move the protection to within {limit:.3g} m of {source}.",
            SOURCE,
            subject=c.tag,
            circuits=[c.tag],
        )
    return None


def unprotected(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    return [f for c in circuits if (f := _check(c)) is not None]
