"""Forms of the electrical-system pages: lengths typed with their unit, trade-notation
sizes, choices limited to the job, defaults from the vehicle, and clear errors."""

from __future__ import annotations

from decimal import Decimal

import pytest

from circuits.forms import (
    CircuitForm,
    DeviceForm,
    TerminalFormSet,
    TerminationForm,
    WaiverForm,
    format_length,
)
from circuits.models import Circuit, Device, Termination
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


def _data(job, **overrides) -> dict:
    """A complete, valid circuit as a person would type it."""
    a = job.devices.filter(name="Busbar").first() or make_device(
        job, name="Busbar", kind=Device.Kind.BUSBAR
    )
    b = job.devices.filter(name="Water pump").first() or make_device(
        job, name="Water pump", kind=Device.Kind.LOAD
    )
    data = {
        "tag": "D-01",
        "name": "Water pump",
        "role": Circuit.Role.DC_BRANCH,
        "conductors": Circuit.Conductors.PAIR,
        "from_device": a.pk,
        "to_device": b.pk,
        "nominal_voltage": "",
        "design_current_a": "10",
        "length": "3 m",
        "length_unit": "m",
        "conductor_size": "12 AWG",
        "parallel": "1",
        "construction": Circuit.Construction.FINE,
        "tinned": "on",
        "insulation_c": "105",
        "bundled": "1",
        "protection_type": Circuit.ProtectionType.FUSE,
        "protection_a": "15",
        "colour_a": "red",
        "colour_b": "black",
    }
    data.update(overrides)
    return data


@pytest.fixture
def job():
    return make_job(make_vehicle(dc_voltage=12, ac_system="230_50"))


@pytest.mark.parametrize(
    ("typed", "unit_select", "metres", "shown_unit"),
    [
        ("10 ft", "m", 10 * FOOT_M, "ft"),
        ("3 m", "ft", 3.0, "m"),
        ("120 in", "m", 120 * 0.0254, "ft"),  # inches show back in feet
        ("250 cm", "ft", 2.5, "m"),
        ("12", "ft", 12 * FOOT_M, "ft"),  # a bare number takes the unit chosen beside it
        ("4,5", "m", 4.5, "m"),  # decimal comma as typed on many tablets
    ],
)
def test_length_is_read_with_its_unit(job, typed, unit_select, metres, shown_unit):
    form = CircuitForm(_data(job, length=typed, length_unit=unit_select), job=job)
    assert form.is_valid(), form.errors
    fields = form.circuit_fields()
    assert fields["length_m"] == pytest.approx(metres)
    assert fields["length_unit"] == shown_unit


@pytest.mark.parametrize(
    ("typed", "words"),
    [
        ("10 kg", "not a length"),
        ("ten feet", "Cannot read the length"),
        ("0 m", "greater than zero"),
        ("600 m", "between 1 cm and 500 m"),
        ("10 parsecs", "between 1 cm and 500 m"),
        ("10 furlongs and a bit", "Cannot read the length"),
    ],
)
def test_a_bad_length_is_an_error_beside_the_length_field(job, typed, words):
    form = CircuitForm(_data(job, length=typed), job=job)
    assert not form.is_valid()
    assert words in " ".join(form.errors["length"])
    assert set(form.errors) == {"length"}


def test_the_length_shows_back_in_the_unit_it_was_entered_in(job):
    a, b = make_device(job), make_device(job)
    circuit = make_circuit(job, a, b, length_m=10 * FOOT_M, length_unit="ft")
    form = CircuitForm(instance=circuit, job=job)
    assert form["length"].value() == "10 ft"
    assert format_length(3.5, "m") == "3.5 m"
    assert format_length(1.2 * FOOT_M, "ft") == "1.2 ft"


def test_protection_distance_takes_a_unit_and_may_be_zero_or_blank(job):
    form = CircuitForm(_data(job, protection_distance="7 in"), job=job)
    assert form.is_valid(), form.errors
    assert form.circuit_fields()["protection_distance_m"] == pytest.approx(7 * 0.0254)
    form = CircuitForm(_data(job, protection_distance="0"), job=job)
    assert form.is_valid(), form.errors
    assert form.circuit_fields()["protection_distance_m"] == 0.0
    form = CircuitForm(_data(job, protection_distance=""), job=job)
    assert form.is_valid(), form.errors
    assert form.circuit_fields()["protection_distance_m"] is None
    form = CircuitForm(_data(job, protection_distance="near"), job=job)
    assert not form.is_valid()
    assert "Cannot read the length" in form.errors["protection_distance"][0]


def test_an_unreadable_size_lists_the_accepted_forms(job):
    form = CircuitForm(_data(job, conductor_size="4 aught-ish"), job=job)
    assert not form.is_valid()
    message = form.errors["conductor_size"][0]
    assert "cannot read the conductor size" in message
    assert "4/0" in message and "mm²" in message


def test_a_blank_size_cannot_be_saved_but_can_be_previewed(job):
    assert "conductor_size" in CircuitForm(_data(job, conductor_size=""), job=job).errors
    preview = CircuitForm(_data(job, conductor_size=""), job=job, for_save=False)
    assert preview.is_valid(), preview.errors


def test_device_choices_are_limited_to_the_job(job):
    other_job = make_job()
    stranger = make_device(other_job, name="Someone else's battery")
    form = CircuitForm(_data(job, from_device=stranger.pk), job=job)
    assert stranger not in form.fields["from_device"].queryset
    assert not form.is_valid()
    assert "from_device" in form.errors


def test_terminal_choices_follow_the_chosen_device(job):
    data = _data(job)
    busbar = Device.objects.get(pk=data["from_device"])
    pump = Device.objects.get(pk=data["to_device"])
    stud = make_terminal(busbar, name="Stud 1", polarity="pos")
    pump_plus = make_terminal(pump, name="+", polarity="pos")
    form = CircuitForm(data, job=job)
    assert list(form.fields["from_terminal"].queryset) == [stud]
    # A terminal of the other device is refused with words that say why.
    form = CircuitForm({**data, "from_terminal": pump_plus.pk}, job=job)
    assert not form.is_valid()
    assert form.errors["from_terminal"] == ["Choose a terminal of the from device."]


def test_nominal_voltage_defaults_to_the_vehicle_system(job):
    form = CircuitForm(_data(job), job=job)
    assert form.is_valid(), form.errors
    assert form.cleaned_data["nominal_voltage"] == Decimal(12)
    ac = _data(job, role=Circuit.Role.AC_BRANCH, conductors="ac", colour_a="brown")
    form = CircuitForm(ac, job=job)
    assert form.is_valid(), form.errors
    assert form.cleaned_data["nominal_voltage"] == Decimal(230)


def test_an_ac_circuit_on_a_vehicle_without_ac_needs_its_voltage():
    job = make_job(make_vehicle(ac_system="none"))
    form = CircuitForm(_data(job, role=Circuit.Role.AC_BRANCH, conductors="ac"), job=job)
    assert not form.is_valid()
    assert "no AC system" in form.errors["nominal_voltage"][0]


def test_a_tag_already_used_in_the_job_is_refused_beside_the_tag(job):
    make_circuit(job, make_device(job), make_device(job), tag="D-01")
    form = CircuitForm(_data(job, tag="d-01"), job=job)
    assert not form.is_valid()
    assert form.errors["tag"] == ["This job already has a circuit tagged d-01."]


def test_model_rules_still_apply_through_the_form(job):
    form = CircuitForm(_data(job, protection_a=""), job=job)
    assert not form.is_valid()
    assert form.errors["protection_a"] == ["Give the rating of the fuse or breaker."]


def test_sizing_needs_lists_what_is_missing(job):
    form = CircuitForm(_data(job, design_current_a="", length="far"), job=job, for_save=False)
    assert form.sizing_draft() is None
    needed = dict(form.sizing_needed())
    assert set(needed) == {"Design current (A)", "One-way length"}
    assert "Cannot read the length" in needed["One-way length"]


def test_device_names_are_unique_within_the_job(job):
    make_device(job, name="House battery")
    form = DeviceForm({"name": "house battery", "kind": "battery", "mounting": "body"}, job=job)
    assert not form.is_valid()
    assert form.errors["name"] == ["This job already has a device named house battery."]


def test_terminal_names_are_unique_within_a_device(job):
    device = make_device(job)
    data = {
        "terminals-TOTAL_FORMS": "2",
        "terminals-INITIAL_FORMS": "0",
        "terminals-0-name": "+",
        "terminals-0-polarity": "pos",
        "terminals-0-manual_torque_unit": "N*m",
        "terminals-1-name": "+",
        "terminals-1-polarity": "pos",
        "terminals-1-manual_torque_unit": "N*m",
    }
    formset = TerminalFormSet(data, instance=device, prefix="terminals")
    assert not formset.is_valid()
    assert "name" in " ".join(formset.non_form_errors())


def test_a_termination_torque_needs_its_source(job):
    circuit = make_circuit(job, make_device(job), make_device(job))
    termination = circuit.terminations.first()
    data = {
        "kind": "lug",
        "stud_size": "M8",
        "torque_value": "12",
        "torque_unit": "N*m",
        "torque_tolerance_pct": "10",
        "torque_source": Termination.SpecSource.NONE,
    }
    form = TerminationForm(data, instance=termination)
    assert not form.is_valid()
    assert "comes from" in form.errors["torque_source"][0]


def test_a_waiver_reason_must_say_something(job):
    form = WaiverForm({"code": "CONSTRUCTION_SOLID", "subject": "D-01", "reason": "ok"})
    assert not form.is_valid()
    assert "at least 15 characters (2 so far)" in form.errors["reason"][0]
