"""Whole-system rules, run across a job's devices and circuits on every evaluation.

Each rule is a function::

    rule(devices, circuits, vehicle, sizings=None) -> list[SystemFinding]

* ``devices``: the job's devices (terminals prefetched);
* ``circuits``: the job's circuits, with from_device/to_device (and terminals) loaded;
* ``vehicle``: the job's vehicle (kind, near_salt_water, ac_system, dc_voltage);
* ``sizings``: circuit tag -> circuits.system.CircuitSizing, the sizing engine's result
  for each circuit, so no rule sizes a circuit again. Optional: when a caller leaves it
  out, a rule sizes the circuits it needs itself (circuits.system.size_one).

Rules never query the database per circuit and store nothing. Every finding has a stable
code, a severity, a plain-words message naming the circuits or devices and the remedy,
and its source. Its ``subject`` is the circuit tag when it is about one circuit (it is
then shown with that circuit too), else a device or enclosure name or "system"; leads'
waivers match findings by (code, subject), so both stay stable across recomputation.

The rule families, one module each: bottleneck, protection (unprotected conductors),
construction, colours, slack, shore, notation.
"""

from __future__ import annotations

from .bottleneck import bottleneck
from .colours import colours
from .construction import construction
from .notation import notation
from .protection import unprotected
from .shore import shore
from .slack import slack

RULES: list = [bottleneck, unprotected, construction, colours, slack, shore, notation]

__all__ = [
    "RULES",
    "bottleneck",
    "colours",
    "construction",
    "notation",
    "shore",
    "slack",
    "unprotected",
]
