"""A circuit's protection has one home: the protection device at one end of its run, or
its own in-line fuse or breaker, never both.

Check values: protection within 7 in (178 mm) of a battery (ABYC E-11 / 33 CFR 183.455,
from memory, as circuits.rules.protection); a conductor protected at its ampacity (NEC
2023 240.4); 10 AWG copper 30 A small-conductor limit (NEC 2023 240.4(D), standards
reference §4).
"""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError
from django.db import IntegrityError, transaction

from circuits.forms import CircuitForm
from circuits.models import Circuit
from circuits.services import circuit_update, device_save
from tests.circuits.factories import findings_for, make_circuit, make_device, rule_codes
from tests.factories import make_job

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    return make_job()


@pytest.fixture
def holder(job):
    return make_device(job, name="Main fuse", kind="protection", protection_type="fuse",
                       protection_a=Decimal("300"))  # fmt: skip


@pytest.fixture
def battery(job):
    return make_device(job, name="House battery", kind="battery")


def _feed(job, battery, holder, **fields):
    fields.setdefault("protection_device", holder)
    fields.setdefault("protection_type", "none")
    return make_circuit(job, battery, holder, tag="C-03", role="main_feed", conductors="pos",
                        conductor_size="4/0 AWG", design_current_a=250, length_m=0.15,
                        **fields)  # fmt: skip


def test_the_rating_type_and_position_are_read_from_the_device(job, battery, holder):
    c = _feed(job, battery, holder)
    p = c.protection
    assert (p.kind, p.rating_a, p.device, p.end) == ("fuse", Decimal("300"), holder, "to")
    assert p.words == "300 A fuse in Main fuse"


def test_a_device_within_7_in_of_the_battery_passes_and_farther_is_too_far(job, battery, holder):
    c = _feed(job, battery, holder)
    assert not {"UNPROTECTED_FROM_SOURCE", "PROTECTION_TOO_FAR"} & rule_codes(job)
    circuit_update(circuit=c, length_m=0.5)
    [found] = findings_for(job, "PROTECTION_TOO_FAR")
    assert "Main fuse" in found.message


def test_the_sizing_engine_checks_the_conductor_against_the_devices_rating(job, holder):
    busbar = make_device(job, name="Busbar", kind="busbar")
    make_circuit(job, holder, busbar, tag="C-04", role="main_feed", conductors="pos",
                 conductor_size="10 AWG", design_current_a=20, protection_device=holder,
                 protection_type="none")  # fmt: skip
    assert findings_for(job, "PROTECTION_ABOVE_AMPACITY")


def test_both_homes_at_once_are_refused_by_clean(job, battery, holder):
    with pytest.raises(ValidationError) as caught:
        _feed(job, battery, holder, protection_type="fuse", protection_a=300)
    assert "protection_a" in caught.value.message_dict


def test_both_homes_at_once_are_refused_by_the_database(job, battery, holder):
    c = _feed(job, battery, holder)
    with pytest.raises(IntegrityError), transaction.atomic():
        Circuit.objects.filter(pk=c.pk).update(protection_type="fuse", protection_a=300)


def test_the_device_must_be_an_end_of_the_run_and_have_a_rating(job, battery, holder):
    load = make_device(job, name="Fridge")
    with pytest.raises(ValidationError) as caught:
        make_circuit(job, battery, load, protection_device=holder, protection_type="none")
    assert "not at either end" in caught.value.message_dict["protection_device"][0]
    bare = make_device(job, name="Old holder", kind="protection")
    with pytest.raises(ValidationError) as caught:
        make_circuit(job, battery, bare, protection_device=bare, protection_type="none")
    assert "no rating" in caught.value.message_dict["protection_device"][0]


def test_a_device_in_use_as_protection_keeps_its_rating(job, battery, holder):
    _feed(job, battery, holder)
    fields = {"name": holder.name, "kind": "protection", "mounting": "body",
              "protection_type": "fuse", "protection_a": None}  # fmt: skip
    with pytest.raises(ValidationError) as caught:
        device_save(job=job, device=holder, fields=fields)
    assert "C-03" in " ".join(caught.value.messages)
    holder.refresh_from_db()
    assert holder.protection_a == Decimal("300")


def _form_data(battery, holder, **over):
    data = {
        "tag": "C-09", "name": "Feed", "role": "main_feed", "conductors": "pos",
        "from_device": battery.pk, "to_device": holder.pk, "design_current_a": "250",
        "nominal_voltage": "12", "length": "0.15 m", "length_unit": "m",
        "conductor_size": "4/0", "parallel": "1", "construction": "fine", "tinned": "on",
        "insulation_c": "105", "bundled": "1",
    }  # fmt: skip
    data.update(over)
    return data


def test_the_form_saves_a_device_home_and_leaves_the_circuits_own_fields_empty(
    job, battery, holder
):
    form = CircuitForm(_form_data(battery, holder, protection_home="device",
                                  protection_device=holder.pk), job=job)  # fmt: skip
    assert form.is_valid(), form.errors
    fields = form.circuit_fields()
    assert fields["protection_device"] == holder and fields["protection_type"] == "none"
    assert fields["protection_a"] is None


def test_the_form_refuses_a_rating_beside_a_protection_device(job, battery, holder):
    form = CircuitForm(_form_data(battery, holder, protection_home="device",
                                  protection_device=holder.pk, protection_a="300",
                                  protection_distance="0.1 m"), job=job)  # fmt: skip
    assert not form.is_valid()
    assert "read from the protection device" in form.errors["protection_a"][0]
    assert "protection_distance" in form.errors


def test_the_form_refuses_a_device_picked_with_in_line_protection(job, battery, holder):
    form = CircuitForm(_form_data(battery, holder, protection_home="inline",
                                  protection_type="fuse", protection_a="300",
                                  protection_device=holder.pk), job=job)  # fmt: skip
    assert not form.is_valid() and "protection_device" in form.errors


def test_the_form_in_line_home_needs_fuse_or_breaker(job, battery, holder):
    form = CircuitForm(_form_data(battery, holder, protection_home="inline",
                                  protection_a="300"), job=job)  # fmt: skip
    assert not form.is_valid() and "protection_type" in form.errors
    form = CircuitForm(_form_data(battery, holder, protection_home="inline",
                                  protection_type="fuse", protection_a="300",
                                  protection_distance="0.1 m"), job=job)  # fmt: skip
    assert form.is_valid(), form.errors
    assert form.circuit_fields()["protection_device"] is None


def test_the_bottleneck_rule_reads_the_devices_rating(job, battery, holder):
    # A 2 AWG link between paralleled batteries feeding a 300 A fuse holder carries less
    # than the fuse: bottleneck (NEC 2023 240.4; common practice).
    second = make_device(job, name="Battery 2", kind="battery")
    make_circuit(job, battery, second, tag="C-01", role="interconnect", conductors="pos",
                 conductor_size="2 AWG", design_current_a=150, length_m=0.4,
                 protection_type="none")  # fmt: skip
    _feed(job, second, holder)
    [found] = findings_for(job, "BOTTLENECK_INTERCONNECT")
    assert found.subject == "C-01" and "300 A protection on C-03" in found.message
