"""Construction: what the conductor is made of.

* CONSTRUCTION_SOLID (blocking): solid-core conductors work-harden and crack under
  vibration; vehicle and boat wiring is stranded. Source: 33 CFR 183.425 and ABYC E-11
  conductor stranding (stranded copper required; from memory).
* CONSTRUCTION_CORD_PERMANENT (blocking): portable flexible cord used for permanent
  wiring. The shore-supply role is exempt: there the cord is the shore cord itself.
  Source: NEC 2023 400.12 (flexible cord is not a substitute for fixed wiring; from memory).
* CONSTRUCTION_UNTINNED_MARINE (warning): untinned copper in a boat, or in a vehicle kept
  near salt water, corrodes along the strands under the insulation. Source: ABYC E-11
  (tinned conductors recommended; from memory); common practice.
* CONSTRUCTION_STANDARD_STRANDED (note): finely stranded conductors are preferred in
  vehicles; standard stranding tolerates less flexing. Source: common practice; ABYC E-11
  stranding types (from memory).
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.models import Circuit

from .common import BLOCKING, NOTE, WARNING, describe, finding

SOURCE_SOLID = "33 CFR 183.425; ABYC E-11 conductor stranding (stranded copper; from memory)"
SOURCE_CORD = "NEC 2023 400.12: flexible cord not a substitute for fixed wiring (from memory)"
SOURCE_TINNED = "ABYC E-11: tinned copper recommended in marine use (from memory); common practice"
SOURCE_STRANDING = (
    "common practice: finely stranded conductors in vehicles; ABYC E-11 (from memory)"
)


def _salt(vehicle) -> bool:
    return vehicle is not None and (vehicle.kind == "boat" or vehicle.near_salt_water)


def _where(vehicle) -> str:
    return "a boat" if vehicle.kind == "boat" else "a vehicle kept near salt water"


def construction(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    for c in circuits:
        if c.construction == Circuit.Construction.SOLID:
            out.append(
                finding(
                    "CONSTRUCTION_SOLID",
                    BLOCKING,
                    f"{describe(c)} is solid-core: solid conductors crack at the terminals "
                    "under vibration. Replace it with stranded (preferably fine-stranded) "
                    "conductor.",
                    SOURCE_SOLID,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
        elif c.construction == Circuit.Construction.CORD and c.role != Circuit.Role.SHORE_SUPPLY:
            out.append(
                finding(
                    "CONSTRUCTION_CORD_PERMANENT",
                    BLOCKING,
                    f"{describe(c)} is portable flexible cord used as permanent wiring; cord "
                    "is for the shore connection, not fixed runs. Replace it with conductors "
                    "rated for fixed wiring in the vehicle.",
                    SOURCE_CORD,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
        elif c.construction == Circuit.Construction.STANDARD:
            out.append(
                finding(
                    "CONSTRUCTION_STANDARD_STRANDED",
                    NOTE,
                    f"{describe(c)} is standard-stranded; finely stranded conductor is "
                    "preferred in vehicles, where runs flex and vibrate.",
                    SOURCE_STRANDING,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
        if not c.tinned and _salt(vehicle):
            out.append(
                finding(
                    "CONSTRUCTION_UNTINNED_MARINE",
                    WARNING,
                    f"{describe(c)} is untinned copper in {_where(vehicle)}; salt air corrodes "
                    "bare strands under the insulation. Use tinned conductor.",
                    SOURCE_TINNED,
                    subject=c.tag,
                    circuits=[c.tag],
                )
            )
    return out
