"""The demo systems show what the model records: a re-marked conductor, a bare earth, a
pedestal supply with its cord, and a protection device used as a circuit's protection,
each with what the rules say of it."""

from __future__ import annotations

import re
from decimal import Decimal

import pytest

from circuits.demo import MOTORHOME, VAN, system_load
from circuits.diagram import job_diagram_svg
from circuits.system import job_system_report
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def _loaded(system, *, dc, ac):
    job = make_job(vehicle=make_vehicle(dc_voltage=dc, ac_system=ac))
    system_load(job, system)
    return job


@pytest.fixture
def van():
    return _loaded(VAN, dc=12, ac="120_60")


def test_the_van_has_a_pedestal_and_its_cord_protected_at_the_pedestal(van):
    pedestal = van.devices.get(kind="external_supply")
    assert pedestal.mounting == "off_vehicle" and pedestal.supply_voltage == Decimal("120")
    cord = van.circuits.get(from_device=pedestal)
    assert cord.protection.device == pedestal and cord.protection.rating_a == Decimal("30")
    on_cord = {f.code for f in job_system_report(van).all_findings if f.subject == cord.tag}
    assert not {c for c in on_cord if c.startswith(("SHORE", "PROTECTION_TOO", "UNPROT"))}


def test_the_van_main_fuse_holder_is_the_protection_of_the_runs_either_side(van):
    holder = van.devices.get(name="Main fuse")
    protected = sorted(holder.protected_circuits.values_list("tag", flat=True))
    assert protected == ["C-03", "C-04"]
    c04 = van.circuits.get(tag="C-04")
    assert c04.protection_a is None and c04.protection.words == "300 A fuse in Main fuse"


def test_the_van_bonding_strap_is_bare_and_raises_nothing(van):
    strap = van.circuits.get(tag="E-01")
    assert strap.colour_earth == "bare"
    codes = {f.code for f in job_system_report(van).all_findings if f.subject == "E-01"}
    assert not {c for c in codes if c.startswith("COLOUR_")}


def test_the_motorhome_interconnect_is_black_re_marked_red_a_note():
    job = _loaded(MOTORHOME, dc=48, ac="230_50")
    c01 = job.circuits.get(tag="C-01")
    assert c01.colour_texts()[0] == (
        "positive", "black, marked red with heat-shrink at both ends")  # fmt: skip
    [note] = [f for f in job_system_report(job).all_findings if f.code == "COLOUR_REMARKED"]
    assert note.severity == "note" and note.subject == "C-01"


def test_the_diagram_draws_the_pedestal_outside_the_vehicle_boundary(van):
    svg = job_diagram_svg(job_system_report(van))
    assert 'class="vehicle-boundary"' in svg and "Outside the vehicle" in svg
    outline = re.search(r'<rect[^>]*class="vehicle-boundary"[^>]*>', svg).group(0)
    boundary_top = float(re.search(r'\sy="([\d.]+)"', outline).group(1))
    group = svg.split('data-device="Campground pedestal"', 1)[1]
    box_y = float(re.search(r'<rect[^>]*\sy="([\d.]+)"', group).group(1))
    assert box_y < boundary_top  # above, outside the outline
