"""Size notation across the system: a bare "4" on one circuit and "4/0" on a circuit that
should match it is the 4 vs 4/0 mix-up (common practice: 4/0 = 0000 = 4-0 = four aught)."""

from __future__ import annotations

import pytest

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


def _bank(job, link_size, feed_size):
    make_battery_bank(job, interconnect=link_size, feed=feed_size, feed_current=150)


def test_bare_4_beside_4_0_in_the_same_battery_path_is_blocking(job):
    _bank(job, link_size="4/0", feed_size="4")
    [found] = findings_for(job, "SIZE_NOTATION_MISMATCH")
    assert found.severity == "blocking"
    assert found.subject == "C-02" and found.circuits == ("C-02", "C-01")
    assert found.message.startswith("C-02 says 4, C-01 says 4/0: the same conductor?")
    assert "'4/0'" in found.message and "'4 AWG'" in found.message


@pytest.mark.parametrize("aught", ["0000", "4-0", "four aught", "4/0 AWG"])
def test_any_spelling_of_the_aught_size_counts(job, aught):
    _bank(job, link_size=aught, feed_size="4")
    assert [f.subject for f in findings_for(job, "SIZE_NOTATION_MISMATCH")] == ["C-02"]


def test_explicit_4_awg_is_not_ambiguous(job):
    _bank(job, link_size="4/0", feed_size="4 AWG")
    assert "SIZE_NOTATION_MISMATCH" not in rule_codes(job)


def test_same_role_elsewhere_counts(job):
    bus = make_device(job, name="Busbar", kind="busbar")
    inv1 = make_device(job, name="Inverter", kind="inverter_charger")
    inv2 = make_device(job, name="Second inverter", kind="inverter_charger")
    make_circuit(
        job, bus, inv1, tag="D-01", conductor_size="2/0", design_current_a=150, protection_a=200
    )
    make_circuit(
        job, bus, inv2, tag="D-02", conductor_size="2", design_current_a=100, protection_a=125
    )
    [found] = findings_for(job, "SIZE_NOTATION_MISMATCH")
    assert found.subject == "D-02" and "D-01 says 2/0" in found.message


def test_unrelated_circuits_are_not_compared(job):
    bus = make_device(job, name="Busbar", kind="busbar")
    inv = make_device(job, name="Inverter", kind="inverter_charger")
    lamp = make_device(job, name="Lamp")
    make_circuit(
        job, bus, inv, tag="D-01", conductor_size="2/0", design_current_a=150, protection_a=200
    )
    make_circuit(
        job,
        bus,
        lamp,
        tag="G-01",
        role="charging",
        conductor_size="2",
        design_current_a=100,
        protection_a=125,
    )
    assert "SIZE_NOTATION_MISMATCH" not in rule_codes(job)


def test_system_guard_uses_its_own_code_beside_the_engines(job):
    """The engine's per-circuit guard keeps its own code; the system finding is separate."""
    _bank(job, link_size="4/0", feed_size="4")
    codes = {f.code for f in findings_for(job) if f.subject == "C-02"}
    assert "SIZE_NOTATION_MISMATCH" in codes
    assert codes & {"SIZE_NOTATION_AUGHT", "SIZE_NOTATION_BARE"}
