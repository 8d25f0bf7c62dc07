"""What a waiver is granted on: finding_facts gathers the circuit (and, where the rule reads
them, device and vehicle) values a finding rests on, canonically, so that a material change
changes the hash and a cosmetic one does not; describe_changes says what changed in words.

Plain Python on unsaved records (ids set by hand): no database."""

from __future__ import annotations

import hashlib
import json
from decimal import Decimal

import pytest

from circuits.models import Circuit, Device
from circuits.system import SystemFinding
from circuits.waiver_facts import (
    CIRCUIT_FACTS,
    describe_changes,
    fact_names,
    facts_hash,
    finding_facts,
)
from shop.models import Vehicle


def _device(pk: int, **fields) -> Device:
    fields.setdefault("name", f"Device {pk}")
    fields.setdefault("kind", Device.Kind.LOAD)
    return Device(pk=pk, **fields)


BATTERY_1 = _device(1, name="Battery 1", kind="battery", is_source=True, mounting="battery_box")
BATTERY_2 = _device(2, name="Battery 2", kind="battery", is_source=True, mounting="battery_box")
BUSBAR = _device(3, name="Busbar", kind="busbar", mounting="battery_box")
DEVICES = [BATTERY_1, BATTERY_2, BUSBAR]


def _circuit(pk=10, **fields) -> Circuit:
    values = {
        "tag": "C-01",
        "name": "Battery interconnect",
        "role": "interconnect",
        "from_device": BATTERY_1,
        "to_device": BATTERY_2,
        "nominal_voltage": Decimal("12.0"),
        "design_current_a": Decimal("100.00"),
        "length_m": 3.0,
        "conductor_size": "2 AWG",
        "protection_type": "none",
    }
    values.update(fields)
    return Circuit(pk=pk, **values)


def _finding(code="BOTTLENECK_INTERCONNECT", subject="C-01", circuits=("C-01",), message="m"):
    return SystemFinding(
        code=code,
        severity="blocking",
        message=message,
        source="test",
        subject=subject,
        circuits=circuits,
    )


def _facts(*circuits, finding=None, devices=DEVICES, vehicle=None) -> dict:
    by_tag = {c.tag: c for c in circuits}
    return finding_facts(finding or _finding(), by_tag, devices, vehicle)


def test_facts_are_the_named_circuits_material_values_keyed_by_id():
    facts = _facts(_circuit())
    assert list(facts["circuits"]) == ["10"]
    assert set(facts["circuits"]["10"]) == {name for name, _, _ in CIRCUIT_FACTS}
    values = facts["circuits"]["10"]
    assert values["length_m"] == "3" and values["design_current_a"] == "100"
    assert values["from_device"] == "1" and values["conductor_size"] == "2 AWG"
    assert facts["subject"] == "10"


def test_cosmetic_fields_are_not_facts():
    before = _facts(_circuit())
    renamed = _circuit(
        tag="C-11", name="Another name", notes="re-routed behind the seat", length_unit="ft"
    )
    finding = _finding(subject="C-11", circuits=("C-11",))
    assert facts_hash(_facts(renamed, finding=finding)) == facts_hash(before)


def test_the_same_values_written_differently_give_the_same_facts():
    plain = _facts(_circuit(conductor_size="4/0 AWG", length_m=0.9144, design_current_a=100))
    spelled = _facts(
        _circuit(
            conductor_size=" 4/0 ",
            length_m=3 * 0.3048,  # 0.9144000000000001 in binary floating point
            design_current_a=Decimal("100.00"),
        )
    )
    assert facts_hash(plain) == facts_hash(spelled)


@pytest.mark.parametrize(
    "change",
    [
        {"length_m": 9.0},
        {"design_current_a": Decimal("150")},
        {"conductor_size": "4 AWG"},
        {"parallel": 2},
        {"to_device": BUSBAR},
        {"insulation_c": 90},
        {"engine_space": True},
        {"protection_type": "fuse", "protection_a": Decimal("150")},
        {"colour_a": "black"},
        {"service_loop_confirmed": True},
    ],
)
def test_a_material_change_changes_the_hash(change):
    assert facts_hash(_facts(_circuit(**change))) != facts_hash(_facts(_circuit()))


def test_the_hash_is_sha256_of_the_sorted_key_json():
    facts = _facts(_circuit())
    text = json.dumps(facts, sort_keys=True, separators=(",", ":"))
    assert facts_hash(facts) == hashlib.sha256(text.encode()).hexdigest()


def test_the_message_is_not_a_fact():
    one = _facts(_circuit(), finding=_finding(message="Thin interconnect between Battery 1 ..."))
    other = _facts(_circuit(), finding=_finding(message="Reworded: a thin interconnect ..."))
    assert one == other


def test_the_change_text_says_what_changed_in_plain_words():
    old = _facts(_circuit())
    new = _facts(_circuit(length_m=9.0, design_current_a=Decimal("150")))
    names = fact_names([_circuit()], DEVICES)
    assert describe_changes(old, new, names=names) == [
        "length 3 m → 9 m",
        "design current 100 A → 150 A",
    ]


def test_the_change_text_names_devices_and_other_circuits():
    link, feed = _circuit(), _circuit(pk=11, tag="C-02", role="main_feed", to_device=BUSBAR)
    finding = _finding(circuits=("C-01", "C-02"))
    old = _facts(link, feed, finding=finding)
    new = _facts(link, _circuit(pk=11, tag="C-02", role="main_feed"), finding=finding)
    names = fact_names([link, feed], DEVICES)
    assert describe_changes(old, new, names=names) == ["C-02: to Busbar → Battery 2"]


def test_a_system_finding_rests_on_every_circuit_it_names():
    finding = _finding(code="COLOUR_BLACK_DC_AND_AC", subject="Cabinet", circuits=("D-01",))
    d01 = _circuit(pk=20, tag="D-01", role="dc_branch")
    a01 = _circuit(pk=21, tag="A-01", role="ac_branch")
    old = _facts(d01, a01, finding=finding)
    wider = _finding(code="COLOUR_BLACK_DC_AND_AC", subject="Cabinet", circuits=("D-01", "A-01"))
    new = _facts(d01, a01, finding=wider)
    assert old["subject"] is None
    assert facts_hash(old) != facts_hash(new)
    names = fact_names([d01, a01], DEVICES)
    assert describe_changes(old, new, names=names) == ["now also about A-01"]


def test_the_shore_rule_rests_on_the_inverter_input_setting():
    charger = _device(4, name="Inverter", kind="inverter_charger", input_current_a=Decimal("30"))
    cord = _circuit(pk=30, tag="S-01", role="shore", from_device=BUSBAR, to_device=charger)
    finding = _finding(code="SHORE_BELOW_INPUT_SETTING", subject="S-01", circuits=("S-01",))
    devices = [*DEVICES, charger]
    old = _facts(cord, finding=finding, devices=devices)
    raised = _device(4, name="Inverter", kind="inverter_charger", input_current_a=Decimal("50"))
    new = _facts(cord, finding=finding, devices=[*DEVICES, raised])
    names = fact_names([cord], devices)
    assert describe_changes(old, new, names=names) == [
        "Inverter: AC input current setting 30 A → 50 A"
    ]


def test_device_facts_are_only_those_the_rule_reads():
    slack = _finding(code="SLACK_SERVICE_LOOP")
    moved = [_device(1, name="Battery 1", kind="battery", mounting="engine"), BATTERY_2, BUSBAR]
    boxed = [
        _device(1, name="Battery 1", kind="battery", mounting="battery_box", enclosure="Locker"),
        BATTERY_2,
        BUSBAR,
    ]
    base = _facts(_circuit(), finding=slack)
    assert _facts(_circuit(), finding=slack, devices=moved) != base
    assert _facts(_circuit(), finding=slack, devices=boxed) == base


def test_the_sizing_engines_findings_rest_on_the_circuit_alone():
    engine = _finding(code="AMPACITY_BELOW_LOAD")
    boat = Vehicle(kind="boat", ac_system="230_50", near_salt_water=True)
    moved = [_device(1, name="Battery 1", kind="busbar", mounting="engine"), BATTERY_2, BUSBAR]
    base = _facts(_circuit(), finding=engine)
    assert _facts(_circuit(), finding=engine, devices=moved, vehicle=boat) == base
    assert base["devices"] == {} and base["vehicle"] == {}


def test_colour_rules_rest_on_the_vehicles_ac_system():
    colour = _finding(code="COLOUR_AC_NEUTRAL")
    us = Vehicle(kind="van", ac_system="120_60")
    eu = Vehicle(kind="van", ac_system="230_50")
    old = _facts(_circuit(), finding=colour, vehicle=us)
    new = _facts(_circuit(), finding=colour, vehicle=eu)
    assert describe_changes(old, new, names={}) == ["vehicle AC system 120 V 60 Hz → 230 V 50 Hz"]


def test_a_code_it_does_not_know_rests_on_every_device_and_vehicle_fact():
    facts = _facts(_circuit(), finding=_finding(code="SOME_FUTURE_RULE"), vehicle=Vehicle())
    assert set(facts["devices"]["1"]) == {
        "kind",
        "is_source",
        "mounting",
        "enclosure",
        "input_current_a",
        "protection_a",
        "supply_voltage",
    }
    assert set(facts["vehicle"]) == {"kind", "ac_system", "near_salt_water"}


def test_an_unsaved_circuit_is_keyed_new():
    facts = _facts(_circuit(pk=None))
    assert list(facts["circuits"]) == ["new"] and facts["subject"] == "new"
