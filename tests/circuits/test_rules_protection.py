"""Unprotected rule: a conductor leaving a source has protection, close to the source.

Distances (from memory, not confirmed against the standard's text): ABYC E-11 /
33 CFR 183.455 allow protection within 7 in (0.178 m) of a battery, and this tool uses
72 in (1.83 m) for other sources (alternator, shore inlet).
"""

from __future__ import annotations

import pytest

from circuits.models import Device
from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job

pytestmark = pytest.mark.django_db

PROTECTION_CODES = {"UNPROTECTED_FROM_SOURCE", "PROTECTION_TOO_FAR", "PROTECTION_DISTANCE_UNKNOWN"}


@pytest.fixture
def job():
    return make_job()


@pytest.fixture
def battery(job):
    return make_device(job, name="House battery", kind=Device.Kind.BATTERY)


@pytest.fixture
def busbar(job):
    return make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)


def _feed(job, a, b, **fields):
    fields.setdefault("tag", "C-01")
    fields.setdefault("role", "main_feed")
    fields.setdefault("conductor_size", "2/0 AWG")
    fields.setdefault("design_current_a", 150)
    if fields.get("protection_type", "fuse") != "none":
        fields.setdefault("protection_a", 200)
    return make_circuit(job, a, b, **fields)


def test_conductor_leaving_a_battery_without_protection_is_blocking(job, battery, busbar):
    _feed(job, battery, busbar, protection_type="none")
    [found] = findings_for(job, "UNPROTECTED_FROM_SOURCE")
    assert found.severity == "blocking" and found.subject == "C-01"
    assert "House battery" in found.message and "178 mm (7 in)" in found.message


def test_direction_entered_does_not_matter(job, battery, busbar):
    _feed(job, busbar, battery, protection_type="none")  # entered busbar -> battery
    assert [f.subject for f in findings_for(job, "UNPROTECTED_FROM_SOURCE")] == ["C-01"]


def test_protection_within_7_in_of_a_battery_passes(job, battery, busbar):
    _feed(job, battery, busbar, protection_distance_m=0.178)  # 7 in, from memory
    assert not PROTECTION_CODES & rule_codes(job)


def test_protection_beyond_7_in_of_a_battery_is_blocking(job, battery, busbar):
    _feed(job, battery, busbar, protection_distance_m=0.30)
    [found] = findings_for(job, "PROTECTION_TOO_FAR")
    assert found.severity == "blocking" and found.subject == "C-01"
    assert "0.30 m" in found.message and "0.178 m" in found.message


def test_other_sources_allow_72_in(job, busbar):
    alternator = make_device(job, name="Alternator", kind=Device.Kind.ALTERNATOR)
    charger = make_device(job, name="DC-DC charger", kind=Device.Kind.DC_DC_CHARGER)
    _feed(
        job,
        alternator,
        charger,
        role="charging",
        conductor_size="6 AWG",
        design_current_a=40,
        protection_a=50,
        protection_distance_m=1.83,
    )
    assert not PROTECTION_CODES & rule_codes(job)
    inlet = make_device(job, name="Shore inlet", kind=Device.Kind.SHORE_INLET)
    panel = make_device(job, name="AC panel", kind=Device.Kind.AC_PANEL)
    make_circuit(
        job,
        inlet,
        panel,
        tag="S-01",
        role="shore",
        nominal_voltage=120,
        conductor_size="10 AWG",
        design_current_a=24,
        protection_a=30,
        protection_distance_m=2.5,
    )
    [found] = findings_for(job, "PROTECTION_TOO_FAR")
    assert found.subject == "S-01" and "1.83 m" in found.message


def test_unknown_distance_is_a_warning_asking_for_it(job, battery, busbar):
    _feed(job, battery, busbar, protection_distance_m=None)
    [found] = findings_for(job, "PROTECTION_DISTANCE_UNKNOWN")
    assert found.severity == "warning" and found.subject == "C-01"


def test_fuse_holder_at_the_far_end_counts_at_the_circuit_length(job, battery):
    fuse = make_device(job, name="Main fuse", kind=Device.Kind.PROTECTION)
    _feed(job, battery, fuse, protection_type="none", length_m=0.15)
    assert not PROTECTION_CODES & rule_codes(job)
    _feed(job, battery, fuse, tag="C-02", protection_type="none", length_m=0.6)
    [found] = findings_for(job, "PROTECTION_TOO_FAR")
    assert found.subject == "C-02" and "Main fuse" in found.message


def test_interconnect_between_batteries_is_protected_by_the_main_feed(job, battery):
    other = make_device(job, name="Second battery", kind=Device.Kind.BATTERY)
    _feed(
        job,
        battery,
        other,
        role="interconnect",
        conductor_size="4/0 AWG",
        protection_type="none",
        length_m=0.3,
    )
    assert not PROTECTION_CODES & rule_codes(job)


def test_negative_only_and_bonding_conductors_are_not_ungrounded(job, battery, busbar):
    _feed(job, battery, busbar, conductors="neg", protection_type="none")
    _feed(
        job,
        battery,
        busbar,
        tag="C-02",
        role="bonding",
        conductors="earth",
        conductor_size="8 AWG",
        design_current_a=1,
        protection_type="none",
    )
    assert not PROTECTION_CODES & rule_codes(job)


def test_circuits_between_non_sources_are_not_checked(job, busbar):
    lamp = make_device(job, name="Lamp")
    make_circuit(job, busbar, lamp, tag="D-01", protection_type="none")
    assert not PROTECTION_CODES & rule_codes(job)


def test_battery_end_sets_the_stricter_limit_when_both_ends_are_sources(job, battery):
    charger = make_device(job, name="DC-DC charger", kind=Device.Kind.DC_DC_CHARGER, is_source=True)
    _feed(
        job,
        charger,
        battery,
        role="charging",
        conductor_size="6 AWG",
        design_current_a=30,
        protection_a=40,
        protection_distance_m=1.0,
    )
    [found] = findings_for(job, "PROTECTION_TOO_FAR")
    assert "House battery" in found.message and "0.178 m" in found.message
