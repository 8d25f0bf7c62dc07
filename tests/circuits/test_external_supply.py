"""External supplies (a campground or marina pedestal, a generator, a building socket):
off the vehicle, with their own breaker and voltage; the shore cord runs from them to the
inlet, protected at its source.

Check values: a 16 AWG cord carries about 10 A and 10 AWG 30 A (NEC 2023 240.4(D),
standards reference §4); 120 V and 230 V nominal AC systems, the 10 % band is common
practice; the input current limit set to the shore breaker is common practice.
"""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError

from circuits.forms import DeviceForm
from circuits.models import Device
from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def _pedestal(job, amps=30, volts=120, **fields):
    return make_device(job, name="Pedestal", kind="external_supply", mounting="off_vehicle",
                       is_source=True, protection_type="breaker", protection_a=Decimal(amps),
                       supply_voltage=Decimal(volts), **fields)  # fmt: skip


def _shore(job, *, amps=30, volts=120, cord="10 AWG", setting=30, cord_protection="device"):
    pedestal = _pedestal(job, amps, volts)
    inlet = make_device(job, name="Shore inlet", kind="shore_inlet")
    charger = make_device(job, name="Inverter/charger", kind="inverter_charger",
                          input_current_a=Decimal(setting))  # fmt: skip
    protection = (
        {"protection_device": pedestal, "protection_type": "none"}
        if cord_protection == "device"
        else {"protection_type": "none"}
    )
    make_circuit(job, pedestal, inlet, tag="P-00", role="shore", nominal_voltage=120,
                 design_current_a=8, conductor_size=cord, construction="cord",
                 length_m=7.5, **protection)  # fmt: skip
    make_circuit(job, inlet, charger, tag="P-01", role="shore", nominal_voltage=120,
                 design_current_a=8, conductor_size="10 AWG", protection_type="breaker",
                 protection_a=30, protection_distance_m=0.3)  # fmt: skip
    return pedestal


def _job(ac_system="120_60"):
    return make_job(vehicle=make_vehicle(kind="van", ac_system=ac_system))


def test_an_external_supply_stands_off_the_vehicle_with_its_breaker_and_voltage():
    job = _job()
    with pytest.raises(ValidationError) as caught:
        make_device(job, name="Generator", kind="external_supply", mounting="body")
    errors = caught.value.message_dict
    assert {"mounting", "is_source", "supply_voltage", "protection_a"} <= set(errors)
    with pytest.raises(ValidationError) as caught:
        make_device(job, name="Fridge", mounting="off_vehicle")
    assert "mounting" in caught.value.message_dict


def test_the_device_form_makes_an_external_supply_a_source_off_the_vehicle():
    job = _job()
    form = DeviceForm({"name": "Marina pedestal", "kind": "external_supply",
                       "mounting": "body", "protection_type": "breaker",
                       "protection_a": "16 A", "supply_voltage": "230 V"}, job=job)  # fmt: skip
    assert form.is_valid(), form.errors
    assert form.cleaned_data["is_source"] and form.cleaned_data["mounting"] == "off_vehicle"
    form = DeviceForm({"name": "Pedestal 2", "kind": "external_supply", "mounting": "body",
                       "protection_a": "30", "supply_voltage": "9000"}, job=job)  # fmt: skip
    assert not form.is_valid() and "supply_voltage" in form.errors


def test_a_cord_protected_at_a_matching_pedestal_is_clean():
    job = _job()
    _shore(job)
    assert not {c for c in rule_codes(job) if c.startswith(("SHORE", "PROTECTION", "SLACK",
                                                             "UNPROTECTED"))}  # fmt: skip


def test_a_thin_cord_on_a_30_a_pedestal_is_blocking_once():
    # Protection read from the pedestal: for 14 AWG the sizing engine says the 30 A
    # breaker is above what the cord carries (15 A, NEC 2023 240.4(D)); the shore rule
    # does not say it again.
    job = _job()
    _shore(job, cord="14 AWG", setting=10)
    assert "SHORE_CORD_BELOW_SUPPLY" not in rule_codes(job)
    engine = {f.code for f in findings_for(job) if f.subject == "P-00"}
    assert engine & {"PROTECTION_ABOVE_AMPACITY", "PROTECTION_ABOVE_SMALL_CONDUCTOR_LIMIT"}


def test_a_16_awg_cord_the_engine_has_no_table_for_is_judged_by_the_shore_rule():
    # NEC 310.16 starts at 14 AWG, so the engine cannot weigh the breaker; 240.4(D)
    # gives 16 AWG 10 A.
    job = _job()
    _shore(job, cord="16 AWG", setting=10)
    [found] = findings_for(job, "SHORE_CORD_BELOW_SUPPLY")
    assert found.severity == "blocking" and "10 A" in found.message


def test_a_thin_cord_not_protected_through_the_pedestal_is_weighed_against_its_breaker():
    job = _job()
    _shore(job, cord="16 AWG", setting=10, cord_protection="none")
    [found] = findings_for(job, "SHORE_CORD_BELOW_SUPPLY")
    assert found.severity == "blocking" and "30 A" in found.message and "10 A" in found.message
    # The cord is judged against its supply, not the input setting on top.
    assert [f.subject for f in findings_for(job, "SHORE_BELOW_INPUT_SETTING")] == []


def test_an_input_setting_above_the_pedestal_breaker_is_a_warning():
    job = _job()
    _shore(job, amps=16, cord="12 AWG", setting=30)
    [found] = findings_for(job, "SHORE_INPUT_ABOVE_SUPPLY")
    assert found.severity == "warning" and found.subject == "Inverter/charger"
    assert "16 A" in found.message


def test_a_230_v_supply_into_a_120_v_system_is_blocking_and_below_is_a_warning():
    job = _job("120_60")
    _shore(job, volts=230)
    [found] = findings_for(job, "SHORE_SUPPLY_VOLTAGE")
    assert found.severity == "blocking" and found.subject == "Pedestal"
    low = _job("230_50")
    _shore(low, volts=120)
    [found] = findings_for(low, "SHORE_SUPPLY_VOLTAGE")
    assert found.severity == "warning"


def test_the_cord_needs_no_service_loop_and_is_protected_at_its_source():
    job = _job()
    _shore(job)
    inlet = Device.objects.get(job=job, name="Shore inlet")
    inlet.mounting = "chassis"
    inlet.save()
    on_cord = {f.code for f in findings_for(job) if f.subject == "P-00"}
    assert not {"SLACK_BODY_CHASSIS", "SLACK_SERVICE_LOOP", "PROTECTION_TOO_FAR"} & on_cord
    # The inlet-to-charger run, fixed wiring from chassis to body, is still asked.
    assert "SLACK_BODY_CHASSIS" in {f.code for f in findings_for(job) if f.subject == "P-01"}
