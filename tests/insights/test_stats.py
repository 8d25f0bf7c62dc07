"""Wilson's interval and percentiles against published worked values."""

from __future__ import annotations

import pytest

from insights.stats import median, percentile, wilson


def test_wilson_interval_matches_the_published_worked_example():
    # Newcombe 1998, "Two-sided confidence intervals for the single proportion",
    # Statistics in Medicine 17:857-872, table I, method 3 (Wilson score, no continuity
    # correction): 81 of 263 gives 0.2553 to 0.3662 (from memory: table not re-read here).
    rate = wilson(81, 263)
    assert rate.low == pytest.approx(0.2553, abs=5e-5)
    assert rate.high == pytest.approx(0.3662, abs=5e-5)


def test_wilson_interval_at_the_ends_stays_inside_zero_to_one():
    # Newcombe 1998, table I, method 3: 0 of 20 gives 0 to 0.1611 (from memory).
    none = wilson(0, 20)
    assert none.low == 0
    assert none.high == pytest.approx(0.1611, abs=5e-5)
    every = wilson(20, 20)
    assert every.low == pytest.approx(1 - 0.1611, abs=5e-5)
    assert every.high == pytest.approx(1.0)


def test_one_of_one_is_not_read_like_thirty_of_a_hundred():
    # Why the pages sort by the lower bound: 1/1 is 100 % but could be as low as ~21 %.
    assert wilson(1, 1).low < wilson(30, 100).low


def test_no_observations_means_nothing_is_known():
    rate = wilson(0, 0)
    assert (rate.low, rate.high, rate.value) == (0.0, 1.0, None)


def test_impossible_counts_are_refused():
    with pytest.raises(ValueError):
        wilson(3, 2)


def test_percentile_interpolates_like_percentile_cont():
    # PostgreSQL documentation, "Aggregate Functions", percentile_cont: "interpolating
    # between adjacent input items if needed"; position (n - 1) * fraction.
    values = [-20, -15, -5, 0, 0]
    assert percentile(values, 0.25) == -15
    assert median(values) == -5
    assert percentile(values, 0.75) == 0
    assert median([1, 2, 3, 4]) == 2.5
    assert percentile([1, 2, 3, 4], 0.25) == 1.75
    assert median([]) is None
