"""Owner and vehicle pages: every role sees them, only lead and office change them."""

from __future__ import annotations

import pytest
from django.urls import reverse

from shop.models import Owner, Vehicle
from tests.factories import make_owner, make_vehicle

pytestmark = pytest.mark.django_db


def _pages(owner: Owner, vehicle: Vehicle) -> dict[str, list[str]]:
    return {
        "read": [
            reverse("owner_list"),
            owner.get_absolute_url(),
            vehicle.get_absolute_url(),
        ],
        "write": [
            reverse("owner_new"),
            reverse("owner_edit", args=[owner.pk]),
            reverse("vehicle_new"),
            reverse("vehicle_edit", args=[vehicle.pk]),
        ],
    }


def test_anonymous_is_sent_to_sign_in_everywhere(anon_client):
    vehicle = make_vehicle()
    pages = _pages(vehicle.owner, vehicle)
    for url in pages["read"] + pages["write"]:
        assert anon_client.get(url).status_code == 302, url


def test_technician_reads_but_gets_403_on_office_pages(technician_client):
    vehicle = make_vehicle()
    pages = _pages(vehicle.owner, vehicle)
    for url in pages["read"]:
        assert technician_client.get(url).status_code == 200, url
    for url in pages["write"]:
        assert technician_client.get(url).status_code == 403, url


@pytest.mark.parametrize("persona", ["lead_client", "office_client"])
def test_lead_and_office_open_every_page(persona, request):
    client = request.getfixturevalue(persona)
    vehicle = make_vehicle()
    pages = _pages(vehicle.owner, vehicle)
    for url in pages["read"] + pages["write"]:
        assert client.get(url).status_code == 200, url


def test_office_creates_an_owner(office_client):
    response = office_client.post(
        reverse("owner_new"), {"name": "Nell Testperson", "email": "nell@test.example"}
    )
    owner = Owner.objects.get(name="Nell Testperson")
    assert response["Location"] == owner.get_absolute_url()


def test_bad_email_is_shown_beside_the_field(office_client):
    response = office_client.post(reverse("owner_new"), {"name": "X", "email": "not-an-email"})
    assert response.status_code == 200
    assert 'class="field-error"' in response.content.decode()
    assert not Owner.objects.exists()


def test_bad_vin_is_shown_beside_the_field_and_vehicle_unchanged(lead_client):
    vehicle = make_vehicle(identification="1M8GDM9AXKP042788", model="Before")
    response = lead_client.post(
        reverse("vehicle_edit", args=[vehicle.pk]),
        {
            "owner": vehicle.owner.pk,
            "kind": "van",
            "model": "After",
            "identification": "1M8GDM9A5KP042788",
            "dc_voltage": 12,
            "ac_system": "none",
        },
    )
    body = response.content.decode()
    assert response.status_code == 200
    assert 'id="id_identification_error"' in body
    vehicle.refresh_from_db()
    assert vehicle.model == "Before"


def test_owner_search(technician_client):
    make_owner(name="Findable Person")
    make_owner(name="Someone Else")
    body = technician_client.get(reverse("owner_list"), {"q": "findable"}).content.decode()
    assert "Findable Person" in body
    assert "Someone Else" not in body
