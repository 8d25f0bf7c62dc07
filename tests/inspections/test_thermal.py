"""Thermal classes after the heat-cycle run, against the temperature-rise table of the
ANSI/NETA Maintenance Testing Specifications' thermographic survey section (values from
memory, as given in issue 8; edition not confirmed): over similar connections under
similar load 1–3 °C possible, 4–15 °C probable, above 15 °C major; over ambient 1–10 °C
possible, 11–20 °C probable, 21–40 °C monitor until corrected, above 40 °C major."""

from __future__ import annotations

import pytest

from inspections.thermal import (
    Connection,
    ThermalClass,
    assess,
    assess_run,
    class_over_ambient,
    class_over_similar,
)

NONE, POSSIBLE, PROBABLE, MONITOR, MAJOR = (
    ThermalClass.NONE,
    ThermalClass.POSSIBLE,
    ThermalClass.PROBABLE,
    ThermalClass.MONITOR,
    ThermalClass.MAJOR,
)


@pytest.mark.parametrize(
    "rise, expected",
    [
        (-2, NONE),
        (0.9, NONE),
        (1, POSSIBLE),  # NETA table: 1–10 °C over ambient, possible deficiency
        (10, POSSIBLE),
        (10.5, PROBABLE),  # between bands: the worse one
        (11, PROBABLE),  # 11–20 °C, probable deficiency
        (20, PROBABLE),
        (21, MONITOR),  # 21–40 °C, monitor until corrective measures
        (40, MONITOR),
        (40.1, MAJOR),  # above 40 °C, major discrepancy
        (90, MAJOR),
    ],
)
def test_rise_over_ambient_follows_the_neta_table(rise, expected):
    assert class_over_ambient(rise) == expected


@pytest.mark.parametrize(
    "rise, expected",
    [
        (0.5, NONE),
        (1, POSSIBLE),  # NETA table: 1–3 °C over similar, possible deficiency
        (3, POSSIBLE),
        (3.5, PROBABLE),
        (4, PROBABLE),  # 4–15 °C, probable deficiency
        (15, PROBABLE),
        (15.1, MAJOR),  # above 15 °C, major discrepancy
    ],
)
def test_rise_over_similar_connections_follows_the_neta_table(rise, expected):
    assert class_over_similar(rise) == expected


def test_the_worse_of_the_two_comparisons_wins():
    # 8 °C over ambient alone is possible; 16 °C over its neighbours makes it major.
    result = assess(28, 20, similar_c=[12, 12])
    assert (result.by_ambient, result.by_similar, result.thermal_class) == (POSSIBLE, MAJOR, MAJOR)
    # And a connection as warm as its neighbours is judged on ambient alone.
    assert assess(45, 20, similar_c=[45]).thermal_class == MONITOR


def test_without_similar_connections_only_ambient_counts():
    result = assess(25, 20)
    assert result.rise_over_similar_c is None and result.thermal_class == POSSIBLE


@pytest.mark.parametrize(
    "cls, blocks",
    [(NONE, False), (POSSIBLE, False), (PROBABLE, True), (MONITOR, True), (MAJOR, True)],
)
def test_probable_deficiency_or_worse_blocks_retorque(cls, blocks):
    assert cls.blocks_retorque is blocks


def test_the_reference_among_similar_connections_is_their_median():
    # One idle, cold lug among warm ones does not make the warm ones look hot.
    result = assess(30, 20, similar_c=[29, 30, 12])
    assert result.rise_over_similar_c == pytest.approx(1.0)


def test_only_connections_on_the_same_device_under_similar_load_are_compared():
    readings = [
        Connection("hot", group="bus", load_a=100, temperature_c=40),
        Connection("peer", group="bus", load_a=80, temperature_c=24),
        Connection("idle", group="bus", load_a=5, temperature_c=21),  # not similar load
        Connection("far", group="battery", load_a=100, temperature_c=21),  # other device
    ]
    results = assess_run(20, readings)
    assert results["hot"].rise_over_similar_c == pytest.approx(16)
    assert results["hot"].thermal_class == MAJOR
    assert results["idle"].rise_over_similar_c is None
    assert results["far"].rise_over_similar_c is None
    # Cooler than its peer is no deficiency; 4 °C over ambient is possible.
    assert results["peer"].thermal_class == POSSIBLE
