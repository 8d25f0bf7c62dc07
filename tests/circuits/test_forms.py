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
    TorqueDefaultForm,
    WaiverForm,
    format_length,
)
from circuits.models import Circuit, Device, Termination, TorqueDefault
from circuits.sizing import LIMITS
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
        ("10 kg", "unit we do not read"),
        ("ten feet", "Cannot read the one-way length"),
        ("0 m", "greater than zero"),
        ("600 m", "between 1 cm and 500 m"),
        ("10 parsecs", "10 parsecs has a unit we do not read; write m, mm, cm, ft or in"),
        ("10 furlongs and a bit", "unit we do not read"),
        # Unit text that pint would have evaluated (and crashed or hung on).
        ("10 (", "unit we do not read"),
        ("10 m/0", "unit we do not read"),
        ("10 'ft'", "unit we do not read"),
        ("10 m**(9**9**9)", "unit we do not read"),
        ("1e308 m", "exponent beyond e±6"),
        ("nan", "not a finite number"),
        ("10² m", "not a digit we read"),
        ("1" * 41, "at most 40"),
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
    assert "Cannot read the protection distance" in form.errors["protection_distance"][0]
    form = CircuitForm(_data(job, protection_distance="-1 m"), job=job)
    assert "cannot be negative" in form.errors["protection_distance"][0]
    form = CircuitForm(_data(job, protection_distance="2 km"), job=job)
    assert "unit we do not read" in form.errors["protection_distance"][0]


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
    assert "Cannot read the one-way length" in needed["One-way length"]


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


# ---- numbers through the strict parser, with the ranges of its LIMITS table ----


@pytest.mark.parametrize(
    ("name", "typed", "words"),
    [
        ("design_current_a", "1e308", "exponent beyond e±6"),
        ("design_current_a", "NaN", "not a finite number"),
        ("design_current_a", "inf", "not a finite number"),
        ("design_current_a", "-5", "greater than zero"),
        ("design_current_a", "20000", "between 0.01 A and 10 kA"),
        ("design_current_a", "2²", "not a digit we read"),
        ("design_current_a", "20 V", "is a voltage, not a current"),
        ("nominal_voltage", "1001", "between 1 V and 1000 V"),
        ("nominal_voltage", "0", "greater than zero"),
        ("nominal_voltage", "1e308", "exponent beyond e±6"),
        ("protection_a", "1e6", "between 0.1 A and 10 kA"),
        ("protection_a", "Infinity", "not a finite number"),
        ("parallel", "9", "at least 1 and at most 8"),
        ("parallel", "1e30", "exponent beyond e±6"),
        ("parallel", "1.5", "whole number"),
        ("bundled", "101", "at least 1 and at most 100"),
        ("bundled", "0", "at least 1 and at most 100"),
    ],
)
def test_numbers_outside_their_range_are_refused_beside_the_field(job, name, typed, words):
    form = CircuitForm(_data(job, **{name: typed}), job=job)
    assert not form.is_valid()
    assert words in " ".join(form.errors[name]), form.errors
    assert set(form.errors) == {name}


def test_an_ac_voltage_above_its_range_is_refused():
    job = make_job(make_vehicle(ac_system="230_50"))
    data = _data(job, role=Circuit.Role.AC_BRANCH, conductors="ac", colour_a="brown",
                 nominal_voltage="1200")  # fmt: skip
    form = CircuitForm(data, job=job)
    assert "between 1 V and 1000 V" in form.errors["nominal_voltage"][0]


def test_unicode_decimal_digits_are_read_and_a_unit_may_be_typed(job):
    # Arabic-Indic ten amps, a length in Devanagari digits, a current in milliamps.
    form = CircuitForm(_data(job, design_current_a="١٠", length="३ m"), job=job)
    assert form.is_valid(), form.errors
    assert form.cleaned_data["design_current_a"] == Decimal(10)
    assert form.circuit_fields()["length_m"] == pytest.approx(3.0)
    form = CircuitForm(_data(job, design_current_a="500 mA", nominal_voltage="24 V"), job=job)
    assert form.is_valid(), form.errors
    assert form.cleaned_data["design_current_a"] == Decimal("0.5")
    assert form.cleaned_data["nominal_voltage"] == Decimal(24)


@pytest.mark.parametrize("side", ["from_device", "to_device", "from_terminal", "to_terminal"])
@pytest.mark.parametrize("tampered", [str(10**308), "²", "١", "-1", "1e3"])
def test_huge_device_id_is_a_field_error(job, side, tampered):
    form = CircuitForm(_data(job, **{side: tampered}), job=job)
    assert not form.is_valid()
    assert side in form.errors
    message = form.errors[side][0]
    assert "Select a valid choice" in message or "Choose a terminal" in message


def test_unicode_digit_ids_do_not_crash_the_terminal_choices(job):
    busbar = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_terminal(busbar, name="Stud 1", polarity="pos")
    # str.isdigit() accepts "²" and int() then refuses it: the device is simply not chosen.
    form = CircuitForm(job=job, initial={"from_device": "²", "to_device": str(10**308)})
    assert form.fields["from_terminal"].with_device  # no device picked: every terminal
    assert "Busbar: Stud 1" in str(form["from_terminal"])
    bound = CircuitForm(_data(job, from_device="²"), job=job)
    assert not bound.is_valid()
    assert "Busbar: Stud 1" in str(bound["from_terminal"])


def test_a_termination_torque_outside_its_range_is_refused(job):
    circuit = make_circuit(job, make_device(job), make_device(job))
    data = {
        "kind": "lug",
        "stud_size": "M8",
        "torque_value": "5000",
        "torque_unit": "lbf*ft",  # 6779 N·m (NIST SP 811: 1 lbf·ft = 1.355818 N·m)
        "torque_tolerance_pct": "60",
        "torque_source": Termination.SpecSource.MANUAL,
    }
    form = TerminationForm(data, instance=circuit.terminations.first())
    assert not form.is_valid()
    assert "between 0 and 2000 N·m" in form.errors["torque_value"][0]
    assert "between 1 % and 30 %" in form.errors["torque_tolerance_pct"][0]
    for typed in ("nan", "1e308", "-3", "12 N·m"):
        form = TerminationForm(
            {**data, "torque_value": typed}, instance=circuit.terminations.first()
        )
        assert "torque_value" in form.errors, typed


def test_a_default_torque_and_a_terminal_torque_are_range_checked(job):
    data = {"stud_size": "M8", "kind": "lug", "value": "inf", "unit": "N*m",
            "tolerance_pct": "10", "source": "Shop table"}  # fmt: skip
    form = TorqueDefaultForm(data)
    assert "not a finite number" in form.errors["value"][0]
    form = TorqueDefaultForm({**data, "value": "3000"})
    assert "between 0 and 2000 N·m" in form.errors["value"][0]
    form = TorqueDefaultForm({**data, "value": "9,5"})
    assert form.is_valid(), form.errors
    assert form.cleaned_data["value"] == Decimal("9.5")
    device = make_device(job)
    terminals = {
        "terminals-TOTAL_FORMS": "1",
        "terminals-INITIAL_FORMS": "0",
        "terminals-0-name": "+",
        "terminals-0-polarity": "pos",
        "terminals-0-manual_torque_value": "1e308",
        "terminals-0-manual_torque_unit": "N*m",
    }
    formset = TerminalFormSet(terminals, instance=device, prefix="terminals")
    assert not formset.is_valid()
    assert "exponent" in formset.forms[0].errors["manual_torque_value"][0]


def test_a_device_input_current_is_range_checked(job):
    data = {"name": "Inverter", "kind": "inverter_charger", "mounting": "body",
            "input_current_a": "1e308"}  # fmt: skip
    form = DeviceForm(data, job=job)
    assert "exponent" in form.errors["input_current_a"][0]
    form = DeviceForm({**data, "input_current_a": "16 A"}, job=job)
    assert form.is_valid(), form.errors
    assert form.cleaned_data["input_current_a"] == Decimal(16)


def _bounds(model, name: str) -> tuple[float | None, float | None]:
    limits = {
        type(v).__name__: v.limit_value
        for v in model._meta.get_field(name).validators
        if hasattr(v, "limit_value")
    }
    return limits.get("MinValueValidator"), limits.get("MaxValueValidator")


@pytest.mark.parametrize(
    ("limit", "model", "name"),
    [
        ("length", Circuit, "length_m"),
        ("parallel", Circuit, "parallel"),
        ("bundled", Circuit, "bundled"),
        ("tolerance", TorqueDefault, "tolerance_pct"),
        ("tolerance", Termination, "torque_tolerance_pct"),
    ],
)
def test_a_value_the_parser_takes_is_one_the_record_keeps(limit, model, name):
    low, high = _bounds(model, name)
    assert (LIMITS[limit].low, LIMITS[limit].high) == (low, high)


@pytest.mark.parametrize(
    ("limit", "model", "name"),
    [
        ("current", Circuit, "design_current_a"),
        ("protection", Circuit, "protection_a"),
        ("voltage", Circuit, "nominal_voltage"),
        ("input_current", Device, "input_current_a"),
    ],
)
def test_the_parser_lower_bounds_match_the_records(limit, model, name):
    low, _ = _bounds(model, name)
    assert LIMITS[limit].low == low
