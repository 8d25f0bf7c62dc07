"""Circuit writes: terminations follow the conductors (one per conductor end, parallel
conductors included), torque specs fill from the device manual first and the shop default
second, and waivers pass their gates."""

from __future__ import annotations

from collections import Counter
from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError

from circuits.models import Termination, TorqueDefault, Waiver
from circuits.services import circuit_update, waiver_create
from circuits.system import job_system_report
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    return make_job()


@pytest.fixture
def ends(job):
    battery = make_device(job, name="Battery", kind="battery")
    busbar = make_device(job, name="Busbar", kind="busbar")
    return battery, busbar


def _by_polarity(circuit) -> Counter:
    return Counter(t.polarity for t in circuit.terminations.all())


def test_dc_pair_with_two_in_parallel_has_four_terminations_each_side(job, ends):
    circuit = make_circuit(
        job,
        *ends,
        role="main_feed",
        conductor_size="2/0",
        parallel=2,
        design_current_a=200,
        protection_a=300,
    )
    assert _by_polarity(circuit) == {"pos": 4, "neg": 4}
    positive = circuit.terminations.filter(polarity="pos")
    assert sorted((t.end, t.conductor_index) for t in positive) == [
        ("from", 1),
        ("from", 2),
        ("to", 1),
        ("to", 2),
    ]


@pytest.mark.parametrize(
    "conductors, expected",
    [
        ("pos", {"pos": 2}),
        ("neg", {"neg": 2}),
        ("ac", {"line": 2, "neutral": 2, "earth": 2}),
        ("earth", {"earth": 2}),
    ],
)
def test_each_conductor_has_two_ends(job, ends, conductors, expected):
    fields = {"role": "bonding", "protection_type": "none"} if conductors == "earth" else {}
    circuit = make_circuit(job, *ends, conductors=conductors, **fields)
    assert _by_polarity(circuit) == expected


def test_ends_land_on_the_devices_terminals(job, ends):
    battery, busbar = ends
    plus = make_terminal(battery, name="+", polarity="pos", stud_size="M8")
    minus = make_terminal(battery, name="-", polarity="neg", stud_size="M8")
    circuit = make_circuit(job, battery, busbar)
    at_battery = {t.polarity: t for t in circuit.terminations.filter(end="from")}
    assert at_battery["pos"].terminal == plus and at_battery["pos"].stud_size == "M8"
    assert at_battery["neg"].terminal == minus
    assert all(t.terminal is None for t in circuit.terminations.filter(end="to"))


def test_device_manual_torque_wins_over_the_shop_default(job, ends):
    battery, busbar = ends
    TorqueDefault.objects.create(
        stud_size="M8", kind="lug", value=Decimal("11.3"), unit="N*m", source="Shop table"
    )
    make_terminal(
        battery,
        name="+",
        polarity="pos",
        stud_size="M8",
        manual_torque_value=Decimal("10"),
        manual_torque_unit="N*m",
    )
    make_terminal(busbar, name="+", polarity="pos", stud_size="M8")
    circuit = make_circuit(job, battery, busbar, conductors="pos")
    at = {t.end: t for t in circuit.terminations.all()}
    assert at["from"].torque_value == Decimal("10")
    assert at["from"].torque_source == Termination.SpecSource.MANUAL
    assert "Battery" in at["from"].torque_source_note
    assert at["to"].torque_value == Decimal("11.3")
    assert at["to"].torque_source == Termination.SpecSource.SHOP_DEFAULT
    assert at["to"].torque_source_note == "Shop table"


def test_no_manual_and_no_default_leaves_the_spec_unset(job, ends):
    battery, busbar = ends
    make_terminal(battery, name="+", polarity="pos", stud_size="M10")
    circuit = make_circuit(job, battery, busbar, conductors="pos")
    spec = circuit.terminations.get(end="from")
    assert spec.torque_value is None and spec.torque_source == Termination.SpecSource.NONE


def test_sync_removes_ends_when_parallel_drops(job, ends):
    circuit = make_circuit(
        job,
        *ends,
        role="main_feed",
        conductor_size="2/0",
        parallel=2,
        design_current_a=200,
        protection_a=300,
    )
    kept = set(circuit.terminations.filter(conductor_index=1).values_list("pk", flat=True))
    circuit_update(circuit=circuit, parallel=1)
    assert _by_polarity(circuit) == {"pos": 2, "neg": 2}
    assert set(circuit.terminations.values_list("pk", flat=True)) == kept


def test_sync_removes_the_negative_when_the_circuit_becomes_positive_only(job, ends):
    circuit = make_circuit(job, *ends)
    circuit_update(circuit=circuit, conductors="pos")
    assert _by_polarity(circuit) == {"pos": 2}


def test_sync_moves_ends_to_the_new_device(job, ends):
    battery, busbar = ends
    make_terminal(busbar, name="+", polarity="pos", stud_size="M8")
    panel = make_device(job, name="DC panel", kind="dc_panel")
    new_plus = make_terminal(panel, name="+", polarity="pos", stud_size="M6")
    TorqueDefault.objects.create(
        stud_size="M6", kind="lug", value=Decimal("5.6"), unit="N*m", source="Shop table M6"
    )
    circuit = make_circuit(job, battery, busbar, conductors="pos")
    circuit_update(circuit=circuit, to_device=panel)
    moved = circuit.terminations.get(end="to")
    assert moved.terminal == new_plus and moved.stud_size == "M6"
    assert moved.torque_value == Decimal("5.6")


# Waivers ------------------------------------------------------------------------------


@pytest.fixture
def solid_circuit(job, ends):
    """A solid-core conductor: CONSTRUCTION_SOLID on D-01 (blocking)."""
    lamp = make_device(job, name="Lamp")
    return make_circuit(job, ends[1], lamp, tag="D-01", construction="solid")


REASON = "Temporary test rig, removed before handover."


def test_lead_waives_a_current_finding(job, solid_circuit, lead):
    waiver = waiver_create(
        job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=lead
    )
    assert waiver.lead == lead and waiver.created_at is not None


def test_only_a_lead_can_waive(job, solid_circuit, technician, office):
    for user in (technician, office):
        with pytest.raises(PermissionDenied):
            waiver_create(
                job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=user
            )
    assert not Waiver.objects.exists()


@pytest.mark.parametrize("reason", ["", "   ", "because"])
def test_waiver_needs_a_written_reason(job, solid_circuit, lead, reason):
    with pytest.raises(ValidationError) as exc:
        waiver_create(job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=reason, lead=lead)
    assert "reason" in exc.value.message_dict
    assert not Waiver.objects.exists()


def test_waiver_needs_a_current_finding(job, solid_circuit, lead):
    with pytest.raises(ValidationError, match="no longer raised"):
        waiver_create(job=job, code="CONSTRUCTION_SOLID", subject="D-99", reason=REASON, lead=lead)
    with pytest.raises(ValidationError, match="no longer raised"):
        waiver_create(
            job=job, code="CONSTRUCTION_CORD_PERMANENT", subject="D-01", reason=REASON, lead=lead
        )
    assert not Waiver.objects.exists()


def test_a_finding_is_waived_once(job, solid_circuit, lead):
    waiver_create(job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=lead)
    other_lead = make_user(roles.LEAD)
    with pytest.raises(ValidationError, match="already waived"):
        waiver_create(
            job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=other_lead
        )
    assert Waiver.objects.count() == 1


def test_a_waiver_follows_its_circuit_when_the_tag_is_renamed(job, solid_circuit, lead):
    waiver_create(job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=lead)
    circuit_update(circuit=solid_circuit, tag="D-11")
    [found] = [f for f in job_system_report(job).all_findings if f.code == "CONSTRUCTION_SOLID"]
    assert found.subject == "D-11"
    assert found.waived and found.waiver.reason == REASON


def test_renaming_through_a_bound_form_still_moves_the_waiver(job, solid_circuit, lead):
    """A model form puts the new tag on the instance before the service runs."""
    waiver_create(job=job, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead=lead)
    solid_circuit.tag = "D-12"
    circuit_update(circuit=solid_circuit)
    assert Waiver.objects.get().subject == "D-12"
