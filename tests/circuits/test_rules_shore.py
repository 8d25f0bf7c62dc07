"""Shore-supply rule: the shore cord and inlet conductors carry the inverter/charger's input
current setting.

What a conductor carries: NEC 2023 Table 310.16 (via the sizing engine), limited for small
conductors by NEC 2023 240.4(D): 16 AWG 10 A, 14 AWG 15 A, 12 AWG 20 A, 10 AWG 30 A. A
16 AWG cord is good for about 10 A (common practice).
"""

from __future__ import annotations

import pytest

from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db

SHORE_CODES = {"SHORE_BELOW_INPUT_SETTING", "SHORE_INPUT_SETTING_UNKNOWN"}


@pytest.fixture
def job():
    return make_job(vehicle=make_vehicle(ac_system="120_60"))


@pytest.fixture
def inlet(job):
    return make_device(job, name="Shore inlet", kind="shore_inlet")


@pytest.fixture
def charger(job):
    return make_device(job, name="Inverter/charger", kind="inverter_charger", input_current_a=30)


def _shore(job, a, b, tag="S-01", **fields):
    fields.setdefault("conductor_size", "10 AWG")
    fields.setdefault("design_current_a", 24)
    fields.setdefault("protection_a", 30)
    fields.setdefault("protection_distance_m", 0.5)
    return make_circuit(job, a, b, tag=tag, role="shore", nominal_voltage=120, **fields)


def test_16_awg_cord_on_a_30_a_input_is_blocking(job, inlet, charger):
    _shore(
        job,
        inlet,
        charger,
        construction="cord",
        conductor_size="16 AWG",
        design_current_a=8,
        protection_a=10,
    )
    [found] = findings_for(job, "SHORE_BELOW_INPUT_SETTING")
    assert found.severity == "blocking" and found.subject == "S-01"
    assert "about 10 A" in found.message and "30 A" in found.message
    assert "Inverter/charger" in found.message
    assert "A 16 AWG cord is good for about 10 A" in found.message


def test_10_awg_carries_a_30_a_setting(job, inlet, charger):
    _shore(job, inlet, charger)  # 10 AWG: 30 A limit, NEC 240.4(D)
    assert not SHORE_CODES & rule_codes(job)


def test_every_conductor_on_the_way_to_the_input_is_checked(job, inlet, charger):
    breaker = make_device(job, name="Shore breaker", kind="protection")
    _shore(job, inlet, breaker, tag="S-01")
    _shore(
        job,
        breaker,
        charger,
        tag="S-02",
        conductor_size="12 AWG",
        design_current_a=16,
        protection_a=20,
    )
    assert [f.subject for f in findings_for(job, "SHORE_BELOW_INPUT_SETTING")] == ["S-02"]


def test_an_ac_circuit_ending_at_the_input_is_checked(job, inlet, charger):
    panel = make_device(job, name="AC panel", kind="ac_panel")
    _shore(job, inlet, panel)
    make_circuit(
        job,
        panel,
        charger,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        conductor_size="14 AWG",
        design_current_a=12,
        protection_a=15,
    )
    [found] = findings_for(job, "SHORE_BELOW_INPUT_SETTING")
    assert found.subject == "A-01" and "15 A" in found.message


def test_the_inverter_output_is_not_its_input(job, inlet, charger):
    _shore(job, inlet, charger)
    panel = make_device(job, name="AC panel", kind="ac_panel")
    make_circuit(
        job,
        charger,
        panel,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        conductor_size="14 AWG",
        design_current_a=12,
        protection_a=15,
    )
    assert not SHORE_CODES & rule_codes(job)


def test_missing_input_setting_is_a_note_on_the_device(job, inlet):
    charger = make_device(job, name="Charger without setting", kind="inverter_charger")
    _shore(job, inlet, charger)
    [found] = findings_for(job, "SHORE_INPUT_SETTING_UNKNOWN")
    assert found.severity == "note" and found.subject == "Charger without setting"
    assert found.circuits == ("S-01",)
