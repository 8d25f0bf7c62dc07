"""Overcurrent protection: the window between what the load needs and what the
conductor allows.

Largest rating the conductor allows
    Its derated ampacity (all conductors in parallel together), and for AC the
    small-conductor limits of NEC 240.4(D) (18 AWG 7 A, 16 AWG 10 A, 14 AWG 15 A,
    12 AWG 20 A, 10 AWG 30 A). The engine does not round up to the next standard
    rating (NEC 240.4(B) would allow that up to 800 A) and does not use the
    marine allowance of up to 150 % of ampacity (ABYC E-11, ISO 13590): the
    stricter rule is the default, and findings mention the allowance.

Smallest rating the load needs
    The design current, times 1.25 for a continuous load (3 h or more; NEC
    210.20(A), 215.3).

Standard ratings
    NEC 240.6(A), its additional fuse ratings 1, 3, 6, 10 A, and the ratings
    common for DC fuses (common practice).
"""

from __future__ import annotations

import bisect

__all__ = [
    "CONTINUOUS_FACTOR",
    "STANDARD_RATINGS_A",
    "is_standard_rating",
    "min_protection_a",
    "ratings_between",
]

CONTINUOUS_FACTOR = 1.25
_EPS = 1e-9

_NEC_240_6_A = (
    15, 20, 25, 30, 35, 40, 45, 50, 60, 70, 80, 90, 100, 110, 125, 150, 175, 200, 225, 250,
    300, 350, 400, 450, 500, 600, 700, 800, 1000, 1200, 1600, 2000, 2500, 3000, 4000, 5000,
    6000,
)  # fmt: skip
_NEC_ADDITIONAL_FUSES = (1, 3, 6, 10)
_COMMON_DC_FUSES = (
    2, 5, 7.5, 15, 20, 25, 30, 40, 50, 60, 70, 80, 100, 125, 150, 175, 200, 225, 250, 300,
    350, 400, 500,
)  # fmt: skip

STANDARD_RATINGS_A: tuple[float, ...] = tuple(
    sorted({float(r) for r in (*_NEC_240_6_A, *_NEC_ADDITIONAL_FUSES, *_COMMON_DC_FUSES)})
)


def min_protection_a(current_a: float, continuous: bool) -> float:
    return current_a * (CONTINUOUS_FACTOR if continuous else 1.0)


def ratings_between(low_a: float, high_a: float) -> tuple[float, ...]:
    """Standard ratings r with low <= r <= high (empty when there is none)."""
    start = bisect.bisect_left(STANDARD_RATINGS_A, low_a - _EPS)
    stop = bisect.bisect_right(STANDARD_RATINGS_A, high_a + _EPS)
    return STANDARD_RATINGS_A[start:stop]


def has_rating_between(low_a: float, high_a: float) -> bool:
    start = bisect.bisect_left(STANDARD_RATINGS_A, low_a - _EPS)
    return start < len(STANDARD_RATINGS_A) and STANDARD_RATINGS_A[start] <= high_a + _EPS


def is_standard_rating(rating_a: float) -> bool:
    i = bisect.bisect_left(STANDARD_RATINGS_A, rating_a - _EPS)
    return i < len(STANDARD_RATINGS_A) and abs(STANDARD_RATINGS_A[i] - rating_a) <= _EPS
