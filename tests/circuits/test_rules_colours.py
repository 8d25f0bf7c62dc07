"""Colour rule. Colours: ABYC E-11 Table XIV (DC + red, − yellow or black, bonding green or
green-yellow); AC line black or brown, neutral white or grey (NEC 200.6, from memory) or
light blue (ABYC E-11, boats), earth green or green-yellow (NEC 250.119, from memory);
230 V: line brown, neutral blue, earth green-and-yellow (IEC 60445:2010 §6.3)."""

from __future__ import annotations

import pytest

from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def _job(ac_system="120_60", kind="van"):
    return make_job(vehicle=make_vehicle(kind=kind, ac_system=ac_system))


def _dc(job, tag="D-01", **fields):
    a = make_device(job, name=f"DC panel {tag}", kind="dc_panel")
    b = make_device(job, name=f"Load {tag}")
    return make_circuit(job, a, b, tag=tag, **fields)


def _ac(job, tag="A-01", **fields):
    a = make_device(job, name=f"AC panel {tag}", kind="ac_panel")
    b = make_device(job, name=f"Outlet {tag}")
    fields.setdefault("nominal_voltage", 120)
    fields.setdefault("conductor_size", "12 AWG")
    fields.setdefault("protection_a", 20)
    return make_circuit(job, a, b, tag=tag, role="ac_branch", **fields)


def _colour_codes(job) -> set[str]:
    return {c for c in rule_codes(job) if c.startswith("COLOUR_")}


def test_red_and_black_or_yellow_dc_pass():
    job = _job()
    _dc(job, colour_a="red", colour_b="black")
    _dc(job, tag="D-02", colour_a="red", colour_b="yellow")
    assert _colour_codes(job) == set()


def test_dc_positive_not_red_is_a_warning():
    job = _job()
    _dc(job, colour_a="brown", colour_b="black")
    [found] = findings_for(job, "COLOUR_DC_POSITIVE")
    assert found.severity == "warning" and found.subject == "D-01"
    assert "brown" in found.message and "red" in found.message


def test_dc_negative_not_yellow_or_black_is_a_warning():
    job = _job()
    _dc(job, colour_a="red", colour_b="blue")
    [found] = findings_for(job, "COLOUR_DC_NEGATIVE")
    assert found.severity == "warning" and "yellow or black" in found.message


def test_a_live_conductor_in_earth_colours_is_blocking():
    job = _job()
    _dc(job, colour_a="red", colour_b="green_yellow")
    [found] = findings_for(job, "COLOUR_EARTH_ON_LIVE")
    assert found.severity == "blocking" and "DC negative" in found.message


def test_120_v_colours_pass_and_light_blue_neutral_only_in_a_boat():
    van = _job("120_60")
    _ac(van, colour_a="black", colour_b="white", colour_earth="green")
    _ac(van, tag="A-02", colour_a="brown", colour_b="grey", colour_earth="green_yellow")
    assert _colour_codes(van) == set()
    _ac(van, tag="A-03", colour_a="black", colour_b="blue", colour_earth="green")
    assert [f.subject for f in findings_for(van, "COLOUR_AC_NEUTRAL")] == ["A-03"]
    boat = _job("120_60", kind="boat")
    _ac(boat, colour_a="black", colour_b="blue", colour_earth="green")
    assert _colour_codes(boat) == set()


def test_230_v_colours_follow_iec_60445():
    job = _job("230_50")
    _ac(job, nominal_voltage=230, colour_a="brown", colour_b="blue", colour_earth="green_yellow")
    assert _colour_codes(job) == set()
    _ac(
        job,
        tag="A-02",
        nominal_voltage=230,
        colour_a="brown",
        colour_b="white",
        colour_earth="green_yellow",
    )
    [found] = findings_for(job, "COLOUR_AC_NEUTRAL")
    assert found.subject == "A-02" and "blue" in found.message
    assert "IEC 60445" in found.source


def test_plain_green_earth_in_a_230_v_system_is_a_warning():
    job = _job("230_50")
    _ac(job, nominal_voltage=230, colour_a="brown", colour_b="blue", colour_earth="green")
    [found] = findings_for(job, "COLOUR_AC_EARTH_GREEN")
    assert found.severity == "warning"


def test_ac_earth_in_a_line_colour_is_blocking():
    job = _job("120_60")
    _ac(job, colour_a="black", colour_b="white", colour_earth="black")
    [found] = findings_for(job, "COLOUR_AC_EARTH")
    assert found.severity == "blocking" and found.subject == "A-01"


def test_black_for_dc_negative_and_ac_line_in_one_panel_is_a_warning_with_remedy():
    job = _job("120_60")
    dc_panel = make_device(job, name="DC distribution", kind="dc_panel", enclosure="Main panel")
    ac_panel = make_device(job, name="AC breakers", kind="ac_panel", enclosure="main panel ")
    lamp = make_device(job, name="Lamp")
    outlet = make_device(job, name="Outlet")
    make_circuit(job, dc_panel, lamp, tag="D-01", colour_a="red", colour_b="black")
    make_circuit(
        job,
        ac_panel,
        outlet,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        protection_a=20,
        colour_a="black",
        colour_b="white",
        colour_earth="green",
    )
    [found] = findings_for(job, "COLOUR_BLACK_DC_AND_AC")
    assert found.severity == "warning"
    assert found.subject == "Main panel"
    assert found.circuits == ("D-01", "A-01")
    assert "yellow" in found.message


def test_black_in_one_device_without_an_enclosure_counts_too():
    job = _job("120_60")
    combo = make_device(job, name="Combined panel", kind="dc_panel")
    lamp = make_device(job, name="Lamp")
    outlet = make_device(job, name="Outlet")
    make_circuit(job, combo, lamp, tag="D-01", colour_a="red", colour_b="black")
    make_circuit(
        job,
        combo,
        outlet,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        protection_a=20,
        colour_a="black",
        colour_b="white",
        colour_earth="green",
    )
    [found] = findings_for(job, "COLOUR_BLACK_DC_AND_AC")
    assert found.subject == "Combined panel"


def test_yellow_dc_negative_beside_black_ac_line_is_fine():
    job = _job("120_60")
    panel = make_device(job, name="Combined panel", kind="dc_panel")
    lamp = make_device(job, name="Lamp")
    outlet = make_device(job, name="Outlet")
    make_circuit(job, panel, lamp, tag="D-01", colour_a="red", colour_b="yellow")
    make_circuit(
        job,
        panel,
        outlet,
        tag="A-01",
        role="ac_branch",
        nominal_voltage=120,
        protection_a=20,
        colour_a="black",
        colour_b="white",
        colour_earth="green",
    )
    assert "COLOUR_BLACK_DC_AND_AC" not in rule_codes(job)


def test_black_in_different_panels_is_fine():
    job = _job("120_60")
    _dc(job, colour_a="red", colour_b="black")
    _ac(job, colour_a="black", colour_b="white", colour_earth="green")
    assert "COLOUR_BLACK_DC_AND_AC" not in rule_codes(job)


def test_splice_that_changes_colour_is_a_warning():
    job = _job()
    _dc(job, colour_a="red", colour_b="black", splice=True, colour_after_splice="brown")
    _dc(job, tag="D-02", colour_a="red", colour_b="black", splice=True, colour_after_splice="red")
    [found] = findings_for(job, "COLOUR_SPLICE_CHANGE")
    assert found.subject == "D-01" and "red to brown" in found.message


def test_tape_remarking_of_a_small_conductor_is_a_warning():
    # NEC 2023 200.6(B) / 250.119(A) (from memory): re-identification at the ends only
    # for 4 AWG and larger; the default test circuit is smaller.
    job = _job()
    _dc(
        job,
        colour_a="black",
        colour_b="black",
        marking_a_method="tape",
        marking_a_colour="red",
        marking_a_ends="both",
    )
    [found] = findings_for(job, "COLOUR_TAPE_REMARKED")
    assert found.severity == "warning"


def test_bonding_conductor_is_green_or_green_yellow():
    job = _job()
    chassis = make_device(job, name="Chassis point", kind="other")
    inverter = make_device(job, name="Inverter case", kind="inverter_charger")
    make_circuit(
        job,
        inverter,
        chassis,
        tag="E-01",
        role="bonding",
        conductors="earth",
        conductor_size="6 AWG",
        design_current_a=1,
        protection_type="none",
        colour_earth="green_yellow",
    )
    make_circuit(
        job,
        inverter,
        chassis,
        tag="E-02",
        role="bonding",
        conductors="earth",
        conductor_size="6 AWG",
        design_current_a=1,
        protection_type="none",
        colour_earth="black",
    )
    assert [f.subject for f in findings_for(job, "COLOUR_BONDING")] == ["E-02"]
    assert "COLOUR_EARTH_ON_LIVE" not in rule_codes(job)


def test_ac_circuits_without_an_ac_system_ask_for_it():
    job = _job("none")
    _ac(job, colour_a="brown", colour_b="blue", colour_earth="green_yellow")
    [found] = findings_for(job, "COLOUR_AC_SYSTEM_UNKNOWN")
    assert found.severity == "note" and found.subject == "system"
    assert "COLOUR_AC_NEUTRAL" not in rule_codes(job)  # either system's colours accepted


def test_blank_colours_are_not_judged():
    job = _job()
    _dc(job, colour_a="", colour_b="")
    assert _colour_codes(job) == set()
