"""job_system_report: the sizing engine on every circuit, the whole-system rules across
them, rule findings shown with the circuit they are about, and leads' waivers matched to
findings by code and subject."""

from __future__ import annotations

import copy

import pytest
from django.db import connection
from django.test.utils import CaptureQueriesContext

from circuits.models import Circuit, Waiver
from circuits.rules import RULES
from circuits.services import circuit_update, waiver_create
from circuits.system import job_system_report, system_report_from
from tests.circuits.factories import make_battery_bank, make_circuit, make_device
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db

REASON = "Accepted for the demo rig; replaced before handover."


@pytest.fixture
def job():
    return make_job(vehicle=make_vehicle(ac_system="120_60"))


@pytest.fixture
def system(job):
    """Two batteries with a thin 2 AWG interconnect, a fused 4/0 main feed, a 12 AWG branch,
    and black as DC negative and AC line in one panel."""
    make_battery_bank(job, interconnect="2 AWG")
    bus = job.devices.get(name="Busbar")
    panel = make_device(job, name="Panel", kind="dc_panel", enclosure="Cabinet")
    ac = make_device(job, name="AC breakers", kind="ac_panel", enclosure="Cabinet")
    outlet = make_device(job, name="Outlet")
    make_circuit(job, bus, panel, tag="D-01", colour_b="black")
    make_circuit(
        job,
        ac,
        outlet,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        protection_a=20,
        colour_a="black",
    )
    return job


def test_every_circuit_is_sized(system):
    report = job_system_report(system)
    assert [c.circuit.tag for c in report.circuits] == ["A-01", "C-01", "C-02", "D-01"]
    d01 = report.by_tag()["D-01"]
    assert d01.error is None
    # 12 AWG, 105 °C, outside engine spaces: 45 A (33 CFR 183.425 Table 5).
    assert d01.report.result.ampacity_a == pytest.approx(45.0)
    # 4/0 AWG, 105 °C: 445 A (33 CFR 183.425 Table 5).
    assert report.by_tag()["C-02"].report.result.ampacity_a == pytest.approx(445.0)


def test_rule_finding_about_one_circuit_is_shown_with_it(system):
    report = job_system_report(system)
    c01 = report.by_tag()["C-01"]
    assert "BOTTLENECK_INTERCONNECT" in {f.code for f in c01.findings}
    assert c01.worst.severity == "blocking"
    assert "BOTTLENECK_INTERCONNECT" in {f.code for f in report.all_findings}
    assert "BOTTLENECK_INTERCONNECT" not in {f.code for f in report.system_findings}


def test_finding_about_a_panel_is_a_system_finding(system):
    report = job_system_report(system)
    [panel] = [f for f in report.system_findings if f.code == "COLOUR_BLACK_DC_AND_AC"]
    assert panel.subject == "Cabinet"
    assert all(
        "COLOUR_BLACK_DC_AND_AC" not in {f.code for f in c.findings} for c in report.circuits
    )


def test_findings_sort_most_serious_first(system):
    ranks = [f.rank for f in job_system_report(system).all_findings]
    assert ranks == sorted(ranks)


def test_waiver_matched_by_code_and_subject_and_shown(system, lead):
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    report = job_system_report(system)
    [waived] = [f for f in report.all_findings if f.code == "BOTTLENECK_INTERCONNECT"]
    assert waived.waived and waived.waiver.lead == lead
    assert waived.waiver.reason == REASON
    assert waived not in report.open_blocking
    # Shown with its circuit too, waived there as well.
    c01 = report.by_tag()["C-01"]
    assert any(f.waived for f in c01.findings if f.code == "BOTTLENECK_INTERCONNECT")


def test_waiver_for_another_subject_does_not_match(system, lead):
    waiver = waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    Waiver.objects.filter(pk=waiver.pk).update(subject="C-02")
    report = job_system_report(system)
    [found] = [f for f in report.all_findings if f.code == "BOTTLENECK_INTERCONNECT"]
    assert not found.waived and found in report.open_blocking


def test_waiver_on_a_system_finding(system, lead):
    waiver_create(
        job=system, code="COLOUR_BLACK_DC_AND_AC", subject="Cabinet", reason=REASON, lead=lead
    )
    [found] = [
        f for f in job_system_report(system).system_findings if f.code == "COLOUR_BLACK_DC_AND_AC"
    ]
    assert found.waived


def test_waived_finding_sorts_after_open_ones_of_its_severity(system, lead):
    Circuit.objects.filter(job=system, tag="D-01").update(construction="solid", colour_b="green")
    waiver_create(job=system, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=lead)
    d01 = job_system_report(system).by_tag()["D-01"]
    blocking = [f.code for f in d01.findings if f.severity == "blocking"]
    assert blocking == ["COLOUR_EARTH_ON_LIVE", "CONSTRUCTION_SOLID"]
    assert d01.worst.code == "COLOUR_EARTH_ON_LIVE"


def test_a_circuit_the_engine_cannot_size_is_reported_not_raised(system):
    Circuit.objects.filter(job=system, tag="D-01").update(conductor_size="banana")
    report = job_system_report(system)
    d01 = report.by_tag()["D-01"]
    assert d01.report is None and "banana" in d01.error
    assert "BOTTLENECK_INTERCONNECT" in {f.code for f in report.all_findings}


def test_every_rule_takes_the_sizings_and_works_without_them(system):
    circuits = list(system.circuits.for_schedule())
    devices = list(system.devices.all())
    report = job_system_report(system)
    sizings = report.by_tag()
    for rule in RULES:
        given = [(f.code, f.subject) for f in rule(devices, circuits, system.vehicle, sizings)]
        alone = [(f.code, f.subject) for f in rule(devices, circuits, system.vehicle)]
        assert given == alone, rule.__name__


def test_a_preview_can_evaluate_an_unsaved_change(system):
    circuits = list(system.circuits.for_schedule())
    edited = copy.copy(next(c for c in circuits if c.tag == "C-01"))
    edited.conductor_size = "4/0"
    circuits = [edited if c.tag == "C-01" else c for c in circuits]
    report = system_report_from(list(system.devices.all()), circuits, system.vehicle)
    assert "BOTTLENECK_INTERCONNECT" not in {f.code for f in report.all_findings}
    # Nothing was saved.
    assert Circuit.objects.get(job=system, tag="C-01").conductor_size == "2 AWG"


def _queries(job) -> int:
    with CaptureQueriesContext(connection) as ctx:
        job_system_report(job)
    return len(ctx.captured_queries)


def test_report_queries_do_not_grow_with_the_number_of_circuits(system):
    before = _queries(system)
    bus = system.devices.get(name="Busbar")
    for n in range(10):
        load = make_device(system, name=f"Extra load {n}")
        make_circuit(system, bus, load, tag=f"X-{n:02d}")
    assert _queries(system) == before


def _bottleneck(job):
    [found] = [
        f for f in job_system_report(job).all_findings if f.code == "BOTTLENECK_INTERCONNECT"
    ]
    return found


def test_a_lapsed_waiver_leaves_its_blocking_finding_open(system, lead):
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    circuit_update(circuit=system.circuits.get(tag="C-01"), length_m=0.9)
    report = job_system_report(system)
    found = _bottleneck(system)
    assert not found.waived and found.lapsed_waiver is not None
    assert found in report.open_blocking and found in report.lapsed
    # Shown with its circuit as open too (the schedule row, the editor panel).
    c01 = report.by_tag()["C-01"]
    assert any(f.open_blocking for f in c01.findings if f.code == "BOTTLENECK_INTERCONNECT")


def test_a_change_to_another_circuit_the_finding_names_lapses_it(system, lead):
    """The interconnect is judged against the main feed: the feed's facts count too."""
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    circuit_update(circuit=system.circuits.get(tag="C-02"), protection_a=350)
    found = _bottleneck(system)
    assert not found.waived
    assert "C-02: protection rating 300 A → 350 A" in found.lapse_note


def test_a_preview_of_a_material_change_shows_the_waiver_lapsed(system, lead):
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    draft = copy.copy(system.circuits.get(tag="C-01"))
    draft.design_current_a = 200
    report = job_system_report(system, draft=draft)
    [found] = [f for f in report.all_findings if f.code == "BOTTLENECK_INTERCONNECT"]
    assert not found.waived
    assert found.lapse_note.endswith("design current 150 A → 200 A")
    # The stored circuit is still covered.
    assert _bottleneck(system).waived


def test_a_new_circuit_given_a_deleted_circuits_tag_does_not_inherit_its_waiver(system, lead):
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    old = system.circuits.get(tag="C-01")
    b1, b2 = old.from_device, old.to_device
    old.delete()
    make_circuit(
        system, b1, b2, tag="C-01", role="interconnect", conductor_size="2 AWG",
        design_current_a=150, length_m=0.3, protection_type="none",
    )  # fmt: skip
    found = _bottleneck(system)
    assert not found.waived and found.lapsed_waiver is not None
    assert "another circuit that had this tag" in found.lapse_note


def test_a_withdrawn_waiver_no_longer_matches(system, lead):
    from circuits.services import waiver_withdraw

    waiver = waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    waiver_withdraw(waiver=waiver, user=lead)
    found = _bottleneck(system)
    assert found.waiver is None and not found.waived and found.lapsed_waiver is None


def test_a_finding_about_an_unsaved_circuit_is_open_not_lapsed(system, lead):
    """A preview built from a half-filled form has no id to compare the waiver's facts by:
    the finding is open, with no change text made up."""
    waiver_create(
        job=system, code="BOTTLENECK_INTERCONNECT", subject="C-01", reason=REASON, lead=lead
    )
    unsaved = copy.copy(system.circuits.get(tag="C-01"))
    unsaved.pk = None
    circuits = [c for c in system.circuits.for_schedule() if c.tag != "C-01"] + [unsaved]
    waivers = list(system.waivers.active())
    report = system_report_from(list(system.devices.all()), circuits, system.vehicle, waivers)
    [found] = [f for f in report.all_findings if f.code == "BOTTLENECK_INTERCONNECT"]
    assert not found.waived and found.lapsed_waiver is None and found.open_blocking
