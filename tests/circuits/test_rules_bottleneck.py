"""Bottleneck rule: every conductor between a battery and its first protection carries the
full rating of what it feeds; a battery interconnect thinner than the main feed is blocking.

Ampacities below come from the sizing engine: 33 CFR 183.425 Table 5, 105 °C insulation,
outside engine spaces: 2 AWG 210 A, 1/0 285 A, 4/0 445 A; engine-space factor 0.85
(33 CFR 183.425 Table 5 via the USCG guideline reprint).
"""

from __future__ import annotations

import pytest

from circuits.models import Device
from tests.circuits.factories import (
    findings_for,
    make_battery_bank,
    make_circuit,
    make_device,
    rule_codes,
)
from tests.factories import make_job

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    return make_job()


def _bank(job, **options):
    """Two paralleled batteries, an interconnect between them, a fused 4/0 main feed from
    the second battery to a busbar."""
    return make_battery_bank(job, **options)


def test_thin_interconnect_between_paralleled_batteries_is_blocking(job):
    _bank(job, interconnect="2 AWG")  # 210 A against the 4/0 main feed's 445 A
    [found] = findings_for(job, "BOTTLENECK_INTERCONNECT")
    assert found.severity == "blocking"
    assert found.subject == "C-01"
    assert found.circuits == ("C-01", "C-02")
    assert "Thin interconnect is a bottleneck" in found.message
    assert "C-02" in found.message and "4/0 AWG" in found.message
    # 210 A is also below the 300 A main fuse: the message says so.
    assert "300 A" in found.message
    assert found.source


def test_interconnect_as_large_as_the_main_feed_passes(job):
    _bank(job, interconnect="4/0")
    assert not {"BOTTLENECK_INTERCONNECT", "BOTTLENECK_PATH"} & rule_codes(job)


def test_parallel_conductors_count_towards_the_interconnect(job):
    _bank(job, interconnect="1/0 AWG", parallel=2)  # 2 × 285 A = 570 A ≥ 445 A
    assert not {"BOTTLENECK_INTERCONNECT", "BOTTLENECK_PATH"} & rule_codes(job)


def test_derating_counts_the_same_size_in_an_engine_space_is_thinner(job):
    _bank(job, interconnect="4/0 AWG", engine_space=True)  # 0.85 × 445 A = 378 A < 445 A
    [found] = findings_for(job, "BOTTLENECK_INTERCONNECT")
    assert found.subject == "C-01"


def test_thin_interconnect_shown_with_its_circuit(job):
    from circuits.system import job_system_report

    _bank(job, interconnect="2 AWG")
    report = job_system_report(job)
    codes = {f.code for f in report.by_tag()["C-01"].findings}
    assert "BOTTLENECK_INTERCONNECT" in codes
    assert "BOTTLENECK_INTERCONNECT" not in {f.code for f in report.by_tag()["C-02"].findings}


def test_unfused_feed_to_the_fuse_holder_must_carry_the_fuse_downstream(job):
    """Battery -> 2 AWG lead -> fuse holder -> 4/0 feed fused at 300 A: the short lead
    before the fuse sees whatever the 300 A fuse lets through."""
    bat = make_device(job, name="Battery", kind=Device.Kind.BATTERY)
    fuse = make_device(job, name="Main fuse", kind=Device.Kind.PROTECTION)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_circuit(
        job,
        bat,
        fuse,
        tag="C-01",
        role="main_feed",
        conductor_size="2 AWG",
        design_current_a=150,
        length_m=0.15,
        protection_type="none",
    )
    make_circuit(
        job,
        fuse,
        bus,
        tag="C-02",
        role="main_feed",
        conductor_size="4/0 AWG",
        design_current_a=250,
        length_m=1.0,
        protection_a=300,
        protection_distance_m=0.15,
    )
    [found] = findings_for(job, "BOTTLENECK_PATH")
    assert found.severity == "blocking"
    assert found.subject == "C-01"
    assert found.circuits == ("C-01", "C-02")
    assert "210 A" in found.message and "300 A" in found.message


def test_unfused_feed_beyond_a_fused_one_must_carry_that_fuse(job):
    """Battery -> fused 4/0 (300 A) -> battery switch -> unfused 2 AWG -> busbar: the 2 AWG
    run is protected only by the 300 A fuse upstream."""
    bat = make_device(job, name="Battery", kind=Device.Kind.BATTERY)
    switch = make_device(job, name="Battery switch", kind=Device.Kind.OTHER)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_circuit(
        job,
        bat,
        switch,
        tag="C-01",
        role="main_feed",
        conductor_size="4/0 AWG",
        design_current_a=250,
        length_m=0.5,
        protection_a=300,
        protection_distance_m=0.1,
    )
    make_circuit(
        job,
        switch,
        bus,
        tag="C-02",
        role="main_feed",
        conductor_size="2 AWG",
        design_current_a=150,
        length_m=0.5,
        protection_type="none",
    )
    [found] = findings_for(job, "BOTTLENECK_PATH")
    assert found.subject == "C-02"


def test_path_ends_at_the_busbar_branches_are_not_part_of_it(job):
    """A 12 AWG branch off the busbar is not in the battery's path."""
    _, _ = _bank(job)
    bus = job.devices.get(name="Busbar")
    lamp = make_device(job, name="Lamp")
    make_circuit(job, bus, lamp, tag="D-01", conductor_size="12 AWG", protection_a=15)
    assert not {"BOTTLENECK_INTERCONNECT", "BOTTLENECK_PATH"} & rule_codes(job)


def test_unfused_feed_to_a_busbar_must_carry_its_largest_branch(job):
    """No fuse on the 4 AWG feed; the busbar's largest branch is fused at 200 A."""
    bat = make_device(job, name="Battery", kind=Device.Kind.BATTERY)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    inverter = make_device(job, name="Inverter", kind=Device.Kind.INVERTER_CHARGER)
    make_circuit(
        job,
        bat,
        bus,
        tag="C-01",
        role="main_feed",
        conductor_size="4 AWG",
        design_current_a=100,
        length_m=0.5,
        protection_type="none",
    )
    make_circuit(
        job,
        bus,
        inverter,
        tag="D-01",
        conductor_size="2/0 AWG",
        design_current_a=150,
        length_m=1.0,
        protection_a=200,
    )
    [found] = findings_for(job, "BOTTLENECK_PATH")  # 4 AWG: 160 A < 200 A
    assert found.subject == "C-01" and found.circuits == ("C-01", "D-01")


def test_two_separate_banks_are_judged_separately(job):
    _bank(job, interconnect="4/0")
    start = make_device(job, name="Starter battery", kind=Device.Kind.BATTERY)
    bus2 = make_device(job, name="Engine busbar", kind=Device.Kind.BUSBAR)
    make_circuit(
        job,
        start,
        bus2,
        tag="C-10",
        role="main_feed",
        conductor_size="2 AWG",
        design_current_a=100,
        length_m=0.5,
        protection_a=150,
        protection_distance_m=0.1,
    )
    # The starter battery's 2 AWG feed is not compared with the house bank's 4/0 and 300 A.
    assert not {"BOTTLENECK_INTERCONNECT", "BOTTLENECK_PATH"} & rule_codes(job)


def test_codes_and_subjects_are_stable_across_recomputation(job):
    _bank(job, interconnect="2 AWG")
    first = [(f.code, f.subject) for f in findings_for(job)]
    assert first == [(f.code, f.subject) for f in findings_for(job)]
