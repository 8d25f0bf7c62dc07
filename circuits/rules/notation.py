"""Size notation across the system: the same conductor entered differently in two places.

The sizing engine checks one circuit at a time (SIZE_NOTATION_AUGHT: a bare "4" where only
4/0 carries the load). Here the guard looks across circuits: a size written as a bare
number 1-4 ("4") on one circuit, and the aught size of the same digit ("4/0", "0000",
"four aught") on a circuit that ought to match it — one in the same battery path
(interconnects and main feeds from a battery to its first protection or busbar), or one
with the same role. That is the classic 4 vs 4/0 mix-up: someone reads "4" on the schedule
and fits 4 AWG where 4/0 AWG was meant.

* SIZE_NOTATION_MISMATCH (blocking, on the bare one, naming the other): write the size
  unambiguously — "4/0" if 4/0 AWG was meant, "4 AWG" if 4 AWG really was.

Source: common practice (trade size notation: 4/0 = 0000 = 4-0 = four aught).
"""

from __future__ import annotations

from circuits.findings import SystemFinding
from circuits.sizing import is_bare_number

from .common import BLOCKING, battery_banks, finding, installed_size

SOURCE = "common practice: trade size notation (4/0 = 0000 = 4-0 = four aught)"


def notation(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]:
    sizes = {c.tag: installed_size(c, sizings) for c in circuits}
    bank_of: dict[str, int] = {}
    for index, bank in enumerate(battery_banks(circuits)):
        for tag in bank.tags:
            bank_of.setdefault(tag, index)
    out: list[SystemFinding] = []
    for c in circuits:
        size = sizes[c.tag]
        if size is None or not is_bare_number(c.conductor_size) or size.gauge not in (1, 2, 3, 4):
            continue
        aught = f"{size.gauge}/0 AWG"
        peers = [
            o
            for o in circuits
            if o.tag != c.tag
            and sizes[o.tag] is not None
            and sizes[o.tag].label == aught
            and (o.role == c.role or (c.tag in bank_of and bank_of.get(o.tag) == bank_of[c.tag]))
        ]
        if not peers:
            continue
        # Name the likeliest twin first: the same battery path, then the same role.
        peers.sort(key=lambda o: (bank_of.get(o.tag, -1) != bank_of.get(c.tag), o.tag))
        named = ", ".join(f"{o.tag} says {o.conductor_size.strip()}" for o in peers[:2])
        if len(peers) > 2:
            named += f" (and {len(peers) - 2} more)"
        written = c.conductor_size.strip()
        out.append(
            finding(
                "SIZE_NOTATION_MISMATCH",
                BLOCKING,
                f"{c.tag} says {written}, {named}: the same conductor? '{written}' reads as "
                f"{size.label}. If {aught} was meant, write '{size.gauge}/0' on {c.tag}; if "
                f"{size.label} really is meant, write '{written} AWG'. Never fit {size.label} "
                f"where {aught} was specified.",
                SOURCE,
                subject=c.tag,
                circuits=[c.tag, *(o.tag for o in peers)],
            )
        )
    return out
