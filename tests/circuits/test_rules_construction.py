"""Construction rule: solid conductors and portable cord in permanent wiring are blocking,
untinned copper near salt water is a warning, standard stranding a note.

Sources: 33 CFR 183.425 / ABYC E-11 (stranded conductors; from memory); NEC 400.12
(cord not a substitute for fixed wiring; from memory); common practice (tinned, finely
stranded conductors preferred).
"""

from __future__ import annotations

import pytest

from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db

CONSTRUCTION_CODES = {
    "CONSTRUCTION_SOLID",
    "CONSTRUCTION_CORD_PERMANENT",
    "CONSTRUCTION_UNTINNED_MARINE",
    "CONSTRUCTION_STANDARD_STRANDED",
}


def _branch(job, **fields):
    a = make_device(job, name=f"Panel {fields.get('tag', 'D-01')}", kind="dc_panel")
    b = make_device(job, name=f"Load {fields.get('tag', 'D-01')}")
    fields.setdefault("tag", "D-01")
    return make_circuit(job, a, b, **fields)


def test_fine_stranded_tinned_conductor_raises_nothing():
    job = make_job(vehicle=make_vehicle(kind="boat"))
    _branch(job)
    assert not CONSTRUCTION_CODES & rule_codes(job)


def test_solid_conductor_is_blocking():
    job = make_job()
    _branch(job, construction="solid")
    [found] = findings_for(job, "CONSTRUCTION_SOLID")
    assert found.severity == "blocking" and found.subject == "D-01"
    assert "stranded" in found.message


def test_portable_cord_as_permanent_wiring_is_blocking():
    job = make_job()
    _branch(job, construction="cord")
    [found] = findings_for(job, "CONSTRUCTION_CORD_PERMANENT")
    assert found.severity == "blocking" and found.subject == "D-01"


def test_cord_on_the_shore_supply_is_the_shore_cord_itself():
    job = make_job(vehicle=make_vehicle(ac_system="120_60"))
    inlet = make_device(job, name="Shore inlet", kind="shore_inlet")
    panel = make_device(job, name="AC panel", kind="ac_panel")
    make_circuit(
        job,
        inlet,
        panel,
        tag="S-01",
        role="shore",
        nominal_voltage=120,
        construction="cord",
        conductor_size="10 AWG",
        design_current_a=24,
        protection_a=30,
        protection_distance_m=0.5,
    )
    assert "CONSTRUCTION_CORD_PERMANENT" not in rule_codes(job)


@pytest.mark.parametrize("kind, salt", [("boat", False), ("van", True)])
def test_untinned_in_a_boat_or_near_salt_water_is_a_warning(kind, salt):
    job = make_job(vehicle=make_vehicle(kind=kind, near_salt_water=salt))
    _branch(job, tinned=False)
    [found] = findings_for(job, "CONSTRUCTION_UNTINNED_MARINE")
    assert found.severity == "warning" and found.subject == "D-01"


def test_untinned_inland_van_is_fine():
    job = make_job(vehicle=make_vehicle(kind="van", near_salt_water=False))
    _branch(job, tinned=False)
    assert "CONSTRUCTION_UNTINNED_MARINE" not in rule_codes(job)


def test_standard_stranding_gets_a_note_preferring_fine_stranding():
    job = make_job()
    _branch(job, construction="standard")
    [found] = findings_for(job, "CONSTRUCTION_STANDARD_STRANDED")
    assert found.severity == "note" and "finely stranded" in found.message
