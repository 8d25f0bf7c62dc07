"""Plain statistics for the insight pages (no Django): Wilson's score interval for a
proportion and percentiles by linear interpolation (what PostgreSQL's percentile_cont
computes), so a rate from 3 readings is never read like one from 300."""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

# Two-sided 95 %: the standard normal quantile at 0.975 (NIST/SEMATECH e-Handbook of
# Statistical Methods, 1.3.6.7.1, table of the normal distribution: 1.96).
Z_95 = 1.959963984540054


@dataclass(frozen=True)
class Rate:
    """k of n, with its 95 % Wilson interval (fractions from 0 to 1)."""

    k: int
    n: int
    low: float
    high: float

    @property
    def value(self) -> float | None:
        return self.k / self.n if self.n else None

    @property
    def pct(self) -> float | None:
        return None if self.value is None else 100 * self.value

    @property
    def low_pct(self) -> float:
        return 100 * self.low

    @property
    def high_pct(self) -> float:
        return 100 * self.high


def wilson(k: int, n: int, z: float = Z_95) -> Rate:
    """Wilson's score interval (Wilson 1927; Newcombe 1998, method 3). With no
    observations the interval is all of 0 to 1: nothing is known."""
    if n < 0 or k < 0 or k > n:
        raise ValueError(f"need 0 <= k <= n, got {k} of {n}")
    if n == 0:
        return Rate(0, 0, 0.0, 1.0)
    p = k / n
    z2 = z * z
    denominator = 1 + z2 / n
    centre = (p + z2 / (2 * n)) / denominator
    half = z * math.sqrt(p * (1 - p) / n + z2 / (4 * n * n)) / denominator
    # Clamp rounding noise at the ends (k = 0 or k = n give exactly 0 or 1).
    return Rate(k, n, max(0.0, centre - half), min(1.0, centre + half))


def percentile(values: Sequence[float], fraction: float) -> float | None:
    """The `fraction` percentile of `values` by linear interpolation between the two
    nearest ranks: position (n - 1) * fraction of the sorted values, as PostgreSQL's
    percentile_cont. None for no values."""
    if not 0 <= fraction <= 1:
        raise ValueError("fraction must be from 0 to 1")
    ordered = sorted(values)
    if not ordered:
        return None
    position = (len(ordered) - 1) * fraction
    below = math.floor(position)
    above = min(below + 1, len(ordered) - 1)
    return ordered[below] + (ordered[above] - ordered[below]) * (position - below)


def median(values: Sequence[float]) -> float | None:
    return percentile(values, 0.5)
