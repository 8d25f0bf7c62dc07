"""A conductor's insulation colour and its re-marking, and the colour rule judging what a
person sees at each end.

Colours: ABYC E-11 Table XIV (DC + red, − yellow or black; bonding green or green-yellow);
NEC 250.119 (bare equipment earthing conductor allowed; from memory). Re-marking: NEC 2023
200.6(B) (grounded conductors of 4 AWG and larger re-identified at each termination) and
250.119(A) (earthing conductors of 4 AWG and larger), from memory: the project's standards
reference does not hold their text. 4 AWG = 21.15 mm² (ASTM B258, standards reference §1).
"""

from __future__ import annotations

import pytest
from django.core.exceptions import ValidationError

from circuits.models import Circuit
from circuits.models.marking import colour_text, seen_colours
from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def _job(ac_system="120_60"):
    return make_job(vehicle=make_vehicle(kind="van", ac_system=ac_system))


def _dc(job, tag="D-01", **fields):
    a = make_device(job, name=f"Panel {tag}", kind="dc_panel")
    b = make_device(job, name=f"Load {tag}")
    return make_circuit(job, a, b, tag=tag, **fields)


def _marked(role="a", method="heat_shrink", colour="red", ends="both", **fields):
    return {
        f"marking_{role}_method": method,
        f"marking_{role}_colour": colour,
        f"marking_{role}_ends": ends,
        **fields,
    }


# ---- what the record says ----


def test_the_text_names_the_insulation_then_the_marking():
    c = Circuit(colour_a="black", **_marked())
    assert colour_text(c, "a") == "black, marked red with heat-shrink at both ends"
    c = Circuit(colour_b="black", **_marked("b", "tape", "yellow", "to"))
    assert colour_text(c, "b") == "black, marked yellow with tape at the to end"
    assert colour_text(Circuit(colour_earth="bare"), "earth") == "bare"


def test_each_end_shows_the_marking_where_marked_else_the_insulation():
    c = Circuit(colour_a="black", **_marked(ends="from"))
    assert seen_colours(c, "a") == {"from": "red", "to": "black"}


def test_the_schedule_summary_names_each_conductor():
    c = Circuit(conductors="pair", colour_a="black", colour_b="black", **_marked())
    assert c.colour_summary == (
        "positive black, marked red with heat-shrink at both ends; negative black"
    )


def test_a_marking_needs_its_colour_and_ends_and_nothing_without_a_method():
    job = _job()
    with pytest.raises(ValidationError) as caught:
        _dc(job, colour_a="black", marking_a_method="tape")
    assert {"marking_a_colour", "marking_a_ends"} <= set(caught.value.message_dict)
    with pytest.raises(ValidationError) as caught:
        _dc(job, tag="D-02", marking_b_colour="yellow")
    assert "marking_b_method" in caught.value.message_dict


def test_bare_is_an_insulation_colour_but_not_a_marking_colour():
    job = _job()
    with pytest.raises(ValidationError) as caught:
        _dc(job, **_marked(colour="bare"))
    assert "marking_a_colour" in caught.value.message_dict


# ---- the colour rule judges what is seen ----


def test_black_positive_marked_red_at_both_ends_passes_the_colour_check():
    job = _job()
    _dc(job, conductor_size="2/0 AWG", design_current_a=100, protection_a=150,
        colour_a="black", **_marked())  # fmt: skip
    assert "COLOUR_DC_POSITIVE" not in rule_codes(job)


def test_large_conductor_marked_at_both_ends_is_a_note():
    # Common practice for a positive; 2/0 AWG is above 4 AWG.
    job = _job()
    _dc(job, conductor_size="2/0 AWG", design_current_a=100, protection_a=150,
        colour_a="black", **_marked())  # fmt: skip
    [found] = findings_for(job, "COLOUR_REMARKED")
    assert found.severity == "note"
    assert "black, marked red with heat-shrink at both ends" in found.message


def test_large_negative_marked_at_both_ends_cites_nec_200_6_b():
    job = _job()
    _dc(job, conductor_size="4 AWG", design_current_a=60, protection_a=80,
        colour_b="white", **_marked("b", "printed_band", "yellow"))  # fmt: skip
    [found] = findings_for(job, "COLOUR_REMARKED")
    assert found.severity == "note" and "200.6(B)" in found.message


def test_small_conductor_re_marked_is_a_warning():
    job = _job()
    _dc(job, colour_a="black", **_marked())  # 12 AWG, below 4 AWG
    [found] = findings_for(job, "COLOUR_REMARKED")
    assert found.severity == "warning" and "4 AWG" in found.message


def test_marked_at_one_end_the_other_end_is_judged_by_its_insulation():
    job = _job()
    _dc(job, conductor_size="2/0 AWG", design_current_a=100, protection_a=150,
        colour_a="black", **_marked(ends="from"))  # fmt: skip
    [remark] = findings_for(job, "COLOUR_REMARKED")
    assert remark.severity == "warning" and "to end shows black" in remark.message
    [wrong] = findings_for(job, "COLOUR_DC_POSITIVE")
    assert "DC positive at the to end is black" in wrong.message


def test_tape_adds_that_tape_fades():
    job = _job()
    _dc(job, conductor_size="2/0 AWG", design_current_a=100, protection_a=150,
        colour_a="black", **_marked(method="tape"))  # fmt: skip
    [found] = findings_for(job, "COLOUR_TAPE_REMARKED")
    assert found.severity == "note" and "Tape fades" in found.message


def test_a_live_conductor_marked_green_at_an_end_is_blocking():
    job = _job()
    _dc(job, colour_b="black", **_marked("b", "tape", "green", "to"))
    [found] = findings_for(job, "COLOUR_EARTH_ON_LIVE")
    assert found.severity == "blocking" and "at the to end" in found.message


# ---- bare ----


def test_a_bare_bonding_strap_is_fine():
    job = _job()
    inverter = make_device(job, name="Inverter", kind="inverter_charger")
    chassis = make_device(job, name="Chassis point", kind="other")
    make_circuit(job, inverter, chassis, tag="E-01", role="bonding", conductors="earth",
                 conductor_size="6 AWG", design_current_a=1, protection_type="none",
                 colour_earth="bare")  # fmt: skip
    assert not {c for c in rule_codes(job) if c.startswith("COLOUR_")}


def test_a_bare_ac_earth_is_fine():
    job = _job()
    a = make_device(job, name="AC panel", kind="ac_panel")
    b = make_device(job, name="Outlet")
    make_circuit(job, a, b, tag="A-01", role="ac_branch", nominal_voltage=120,
                 protection_a=20, colour_earth="bare")  # fmt: skip
    assert "COLOUR_AC_EARTH" not in rule_codes(job)


def test_a_bare_current_carrying_conductor_is_blocking_whatever_marks_its_ends():
    job = _job()
    _dc(job, colour_a="bare", **_marked())
    [found] = findings_for(job, "COLOUR_BARE_LIVE")
    assert found.severity == "blocking" and "DC positive is bare" in found.message
