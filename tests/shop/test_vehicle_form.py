"""Vehicle form: specific errors beside the field, and nothing saved on bad input."""

from __future__ import annotations

import pytest
from django.utils import timezone

from shop.forms import VehicleForm
from shop.models import Vehicle
from tests.factories import make_owner, make_vehicle

pytestmark = pytest.mark.django_db


def _data(owner, **overrides) -> dict:
    data = {
        "owner": owner.pk,
        "kind": "van",
        "make": "Testmake",
        "model": "Longbase",
        "year": 2022,
        "identification": "1M8GDM9AXKP042788",  # Wikibooks VIN check-digit worked example
        "dc_voltage": 12,
        "ac_system": "none",
    }
    data.update(overrides)
    return data


def test_good_vehicle_saves_with_normalised_vin():
    owner = make_owner()
    form = VehicleForm(_data(owner, identification="1m8gdm9a-xkp042788"))
    assert form.is_valid(), form.errors
    assert form.save().identification == "1M8GDM9AXKP042788"


def test_bad_check_digit_is_reported_on_the_identification_field():
    owner = make_owner()
    form = VehicleForm(_data(owner, identification="1M8GDM9A1KP042788"))
    assert not form.is_valid()
    assert "Check digit" in form.errors["identification"][0]
    assert Vehicle.objects.count() == 0


def test_year_out_of_range_is_reported_on_the_year_field():
    owner = make_owner()
    form = VehicleForm(_data(owner, year=1890))
    assert not form.is_valid()
    assert f"between 1950 and {timezone.now().year + 1}" in form.errors["year"][0]


def test_unknown_dc_voltage_is_refused():
    owner = make_owner()
    form = VehicleForm(_data(owner, dc_voltage=36))
    assert not form.is_valid()
    assert form.errors["dc_voltage"] == [
        "Nominal DC voltage must be 12, 24 or 48 V; 36 V is not one."
    ]


def test_duplicate_identification_is_refused_beside_the_field():
    owner = make_owner()
    make_vehicle(owner, identification="1M8GDM9AXKP042788")
    form = VehicleForm(_data(owner, identification="1m8gdm9axkp042788"))
    assert not form.is_valid()
    assert "already has this identification" in form.errors["identification"][0]
    assert Vehicle.objects.count() == 1


def test_boat_takes_a_hull_number_not_a_vin():
    owner = make_owner()
    form = VehicleForm(_data(owner, kind="boat", identification="1M8GDM9AXKP042788"))
    assert not form.is_valid()
    assert "hull identification number" in form.errors["identification"][0]
    form = VehicleForm(_data(owner, kind="boat", identification="QKW12345D616"))
    assert form.is_valid(), form.errors


def test_editing_a_vehicle_keeps_its_own_identification():
    vehicle = make_vehicle(identification="1M8GDM9AXKP042788")
    form = VehicleForm(_data(vehicle.owner, model="Changed"), instance=vehicle)
    assert form.is_valid(), form.errors
