"""Slack rule: a run between bodies that move against each other needs a confirmed service
loop (common practice; ABYC E-11 conductor support, from memory)."""

from __future__ import annotations

import pytest

from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    return make_job()


def _run(job, from_mounting, to_mounting, **fields):
    a = make_device(job, name="Alternator", kind="alternator", mounting=from_mounting)
    b = make_device(job, name="DC-DC charger", kind="dc_dc_charger", mounting=to_mounting)
    return make_circuit(
        job,
        a,
        b,
        tag="G-01",
        role="charging",
        conductor_size="6 AWG",
        design_current_a=40,
        protection_a=50,
        protection_distance_m=0.5,
        **fields,
    )


def test_engine_to_chassis_run_without_confirmed_loop_is_a_warning(job):
    _run(job, "engine", "chassis")
    [found] = findings_for(job, "SLACK_SERVICE_LOOP")
    assert found.severity == "warning" and found.subject == "G-01"
    assert "Alternator (engine)" in found.message and "DC-DC charger (chassis)" in found.message
    assert "service loop" in found.message


def test_confirmed_service_loop_clears_it(job):
    _run(job, "engine", "chassis", service_loop_confirmed=True)
    assert not {"SLACK_SERVICE_LOOP", "SLACK_BODY_CHASSIS"} & rule_codes(job)


def test_same_mounting_needs_no_loop(job):
    _run(job, "engine", "engine")
    assert not {"SLACK_SERVICE_LOOP", "SLACK_BODY_CHASSIS"} & rule_codes(job)


def test_chassis_to_body_is_a_note_to_check(job):
    _run(job, "chassis", "body")
    [found] = findings_for(job, "SLACK_BODY_CHASSIS")
    assert found.severity == "note"


def test_battery_box_in_the_body_is_one_body(job):
    _run(job, "battery_box", "body")
    assert not {"SLACK_SERVICE_LOOP", "SLACK_BODY_CHASSIS"} & rule_codes(job)
