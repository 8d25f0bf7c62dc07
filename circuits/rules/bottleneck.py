"""Bottleneck: every conductor between a battery and its first protection carries the full
rating of what it feeds, and no battery interconnect is thinner than the main feed.

The path (see common.battery_banks) runs from each battery along battery interconnects and
main feeds to the first protection device (fuse or breaker holder), busbar or DC panel.
Current up to the rating downstream can flow through every conductor on it: with
paralleled batteries, if one battery's protection or management system disconnects it,
the other battery delivers the whole load through the interconnect. So:

* BOTTLENECK_INTERCONNECT (blocking): a battery interconnect whose ampacity is below the
  ampacity of a main feed in the same bank ("a thin interconnect is a bottleneck"). This
  holds even when the thin link happens to clear today's fuse, because a thinner link also
  shares the current unevenly and runs hot first.
* BOTTLENECK_PATH (blocking): a path conductor whose ampacity is below the largest rating
  it feeds. That rating is the largest of: the protection of the other path circuits (the
  main fuse recorded on the main feed, or read from the fuse holder it ends at: every
  rating comes from the circuit's one home, Circuit.protection), and the protection (else
  the design current) of each circuit leaving the device where the path ends (the fuse
  holder's outgoing feed, or the busbar's largest branch). With none of those known, the
  largest main-feed design current is used. A path circuit that carries its own
  protection is not held to the others' ratings: the sizing engine checks it against its
  own fuse (PROTECTION_ABOVE_AMPACITY), and its fuse is a rating the rest of the path must carry.
  The walk goes on past such a circuit, because an unfused main feed beyond it is
  protected only by that fuse.

Ampacity is the sizing engine's, for the conductor as installed: table value after every
factor, times the number in parallel. Sources: NEC 2023 240.4 (a conductor is protected at
its ampacity); ABYC E-11 (overcurrent protection of battery conductors; from memory);
common practice (interconnects as large as the main feed).
"""

from __future__ import annotations

from collections.abc import Mapping

from circuits.findings import CircuitSizing, SystemFinding
from circuits.models import Circuit

from .common import (
    BLOCKING,
    EPS,
    Bank,
    ampacity_a,
    amps,
    battery_banks,
    describe,
    device_key,
    finding,
    size_text,
)

SOURCE = (
    "NEC 2023 240.4 (conductor protected at its ampacity); ABYC E-11 battery conductors "
    "(from memory); common practice: battery interconnects at least as large as the main feed"
)


def _ratings(bank: Bank, circuits: list[Circuit]) -> list[tuple[float, str, str]]:
    """(amps, tag of the circuit it comes from, words) for what the path feeds."""
    ratings: list[tuple[float, str, str]] = []
    for c in bank.path:
        if c.protection_rating_a is not None:
            ratings.append(
                (
                    float(c.protection_rating_a),
                    c.tag,
                    f"the {amps(c.protection_rating_a)} protection on {c.tag}",
                )
            )
    end_keys = {device_key(d) for d in bank.ends}
    for c in circuits:
        if (
            c.tag in bank.tags
            or c.conductors == Circuit.Conductors.EARTH
            or c.role == Circuit.Role.BONDING
        ):
            continue
        if device_key(c.from_device) in end_keys:
            if c.protection_rating_a is not None:
                rating = amps(c.protection_rating_a)
                words = f"the {rating} protection of {c.tag}, fed from {c.from_device}"
                ratings.append((float(c.protection_rating_a), c.tag, words))
            else:
                words = f"the {amps(c.design_current_a)} design current of {c.tag}"
                ratings.append((float(c.design_current_a), c.tag, words))
    if not ratings:
        for c in bank.path:
            if c.role == Circuit.Role.MAIN_FEED:
                words = f"the {amps(c.design_current_a)} design current of {c.tag}"
                ratings.append((float(c.design_current_a), c.tag, words))
    return ratings


def _bank_findings(
    bank: Bank, circuits: list[Circuit], sizings: Mapping[str, CircuitSizing] | None
) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    rated = {c.tag: ampacity_a(c, sizings) for c in bank.path}
    feeds = [c for c in bank.path if c.role == Circuit.Role.MAIN_FEED and rated[c.tag]]
    widest = max(feeds, key=lambda c: rated[c.tag], default=None)
    ratings = _ratings(bank, circuits)
    batteries = " and ".join(b.name for b in bank.batteries)
    for c in bank.path:
        own = rated[c.tag]
        if own is None:
            continue  # no readable size: the sizing engine says so on the circuit
        others = [r for r in ratings if r[1] != c.tag]
        need = max(others, default=None)
        own_protection = c.protection.fitted
        short = need is not None and own + EPS < need[0] and not own_protection
        if (
            c.role == Circuit.Role.BATTERY_INTERCONNECT
            and widest is not None
            and own + EPS < rated[widest.tag]
        ):
            extra = f" It is also below {need[2]}." if short else ""
            out.append(
                finding(
                    "BOTTLENECK_INTERCONNECT",
                    BLOCKING,
                    f"Thin interconnect is a bottleneck: {describe(c)} between {c.from_device} "
                    f"and {c.to_device} carries {amps(own)}, less than the main feed "
                    f"{describe(widest)} at {amps(rated[widest.tag])} that it parallels into; "
                    f"every battery's share of the load passes through it.{extra} Use a "
                    f"conductor at least as large as {widest.tag} ({size_text(widest)}).",
                    SOURCE,
                    subject=c.tag,
                    circuits=[c.tag, widest.tag],
                )
            )
        elif short:
            out.append(
                finding(
                    "BOTTLENECK_PATH",
                    BLOCKING,
                    f"{describe(c)} lies between {batteries} and the first protection, so it "
                    f"must carry {need[2]}, but it carries only {amps(own)}. Fit a conductor "
                    f"rated at least {amps(need[0])} (ampacity after derating, times the "
                    "number in parallel).",
                    SOURCE,
                    subject=c.tag,
                    circuits=[c.tag, need[1]],
                )
            )
    return out


def bottleneck(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    out: list[SystemFinding] = []
    for bank in battery_banks(circuits):
        if bank.path:
            out.extend(_bank_findings(bank, circuits, sizings))
    return out
