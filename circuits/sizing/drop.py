"""Voltage drop over the round trip.

The current leaves on one conductor and comes back on another (positive and
negative, or line and neutral), so the conductor length is twice the one-way run.
n identical conductors in parallel share the current, so the drop is divided by n.

    V = I x R'(T) x 2 L / n        drop % = 100 V / V_nominal

R'(T) is the DC resistance per metre of one conductor at the conductor temperature
T (see ``catalogue``). For AC the same resistive drop is used, because the power
factor of the load is not known here. Up to about 1 AWG this is close to, or
above, the drop through the AC impedance; from 1/0 AWG up the reactance grows
relative to the resistance (at 500 kcmil it exceeds it), so the resistive figure
understates the drop and the engine adds a note saying so (AC impedance: NEC
Chapter 9 Table 9).

Default temperature: the insulation rating. A conductor loaded to its ampacity runs
at about its insulation rating, and copper resistance rises with temperature (about
0.4 % per degree), so computing the drop at the rating bounds it from above; any
cooler conductor drops less. Taking 20 C instead would understate the drop of a
fully loaded 105 C cable by a quarter (254.5 / 339.5 = 0.75).

Limits: 3 % for critical loads (main feeders, bilge blowers, electronics,
navigation lights) and 10 % for others, after ABYC E-11; or a limit the user gives.
"""

from __future__ import annotations

__all__ = [
    "CRITICAL_DROP_PCT",
    "GENERAL_DROP_PCT",
    "default_drop_limit_pct",
    "drop_pct",
    "max_one_way_length_m",
    "round_trip_drop_v",
]

CRITICAL_DROP_PCT = 3.0
GENERAL_DROP_PCT = 10.0


def default_drop_limit_pct(critical: bool) -> float:
    return CRITICAL_DROP_PCT if critical else GENERAL_DROP_PCT


def round_trip_drop_v(
    current_a: float, ohm_per_m: float, one_way_m: float, parallel: int = 1
) -> float:
    """Volts lost over out-and-back conductors of ``one_way_m`` each, ``parallel`` per pole."""
    return current_a * ohm_per_m * 2.0 * one_way_m / parallel


def drop_pct(drop_v: float, nominal_v: float) -> float:
    return 100.0 * drop_v / nominal_v


def max_one_way_length_m(
    current_a: float, ohm_per_m: float, limit_v: float, parallel: int = 1
) -> float:
    """Longest one-way run that keeps the round-trip drop within ``limit_v``."""
    return limit_v * parallel / (current_a * ohm_per_m * 2.0)
