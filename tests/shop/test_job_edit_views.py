"""Creating and editing jobs: lead and office only; errors beside the field."""

from __future__ import annotations

import pytest
from django.urls import reverse

from shop.models import Job
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def test_anonymous_cannot_open_new_job(anon_client):
    assert anon_client.get(reverse("job_new")).status_code == 302


def test_technician_gets_403_on_new_and_edit(technician_client):
    job = make_job()
    assert technician_client.get(reverse("job_new")).status_code == 403
    assert technician_client.post(reverse("job_new"), {"title": "x"}).status_code == 403
    assert technician_client.get(reverse("job_edit", args=[job.number])).status_code == 403


@pytest.mark.parametrize("persona", ["lead_client", "office_client"])
def test_lead_and_office_create_a_job_with_a_number(persona, request, lead, technician):
    vehicle = make_vehicle()
    response = request.getfixturevalue(persona).post(
        reverse("job_new"),
        {
            "vehicle": vehicle.pk,
            "title": "House battery swap",
            "lead": lead.pk,
            "technicians": [technician.pk],
            "booked_in_on": "2026-11-20",
        },
    )
    job = Job.objects.get(title="House battery swap")
    assert response.status_code == 302
    assert response["Location"] == job.get_absolute_url()
    assert list(job.technicians.all()) == [technician]
    assert job.number


def test_handover_before_booking_is_refused_and_nothing_saved(lead_client):
    vehicle = make_vehicle()
    response = lead_client.post(
        reverse("job_new"),
        {
            "vehicle": vehicle.pk,
            "title": "Backwards dates",
            "booked_in_on": "2026-11-20",
            "target_handover_on": "2026-11-01",
        },
    )
    assert response.status_code == 200
    assert "cannot be before the booking date" in response.content.decode()
    assert not Job.objects.exists()


def test_edit_keeps_the_number(lead_client):
    job = make_job()
    response = lead_client.post(
        reverse("job_edit", args=[job.number]),
        {"vehicle": job.vehicle.pk, "title": "Renamed", "booked_in_on": "2026-11-20"},
    )
    assert response.status_code == 302
    job.refresh_from_db()
    assert job.title == "Renamed"
    assert Job.objects.filter(number=job.number).count() == 1


def test_failed_edit_leaves_saved_job_unchanged(lead_client):
    job = make_job(title="Original")
    response = lead_client.post(
        reverse("job_edit", args=[job.number]),
        {"vehicle": job.vehicle.pk, "title": "", "booked_in_on": "2026-11-20"},
    )
    assert response.status_code == 200
    job.refresh_from_db()
    assert job.title == "Original"


@pytest.mark.parametrize(
    "tampered",
    [
        {"technicians": [str(10**308)]},
        {"technicians": ["²"]},
        {"lead": str(10**308)},
        {"lead": "١"},
        {"vehicle": str(10**308)},
        {"vehicle": str(2**63)},
    ],
)
def test_a_huge_or_unicode_digit_id_is_a_field_error_not_a_500(lead_client, tampered):
    vehicle = make_vehicle()
    data = {"vehicle": vehicle.pk, "title": "Tampered", "booked_in_on": "2026-11-20", **tampered}
    response = lead_client.post(reverse("job_new"), data)
    assert response.status_code == 200
    (name,) = tampered
    body = response.content.decode()
    assert f'id="id_{name}_error"' in body
    assert "Select a valid choice" in body
    assert not Job.objects.exists()


def test_technicians_id_of_ten_to_the_308_is_refused_on_edit(lead_client):
    job = make_job(title="Original")
    response = lead_client.post(
        reverse("job_edit", args=[job.number]),
        {"vehicle": job.vehicle.pk, "title": "Renamed", "booked_in_on": "2026-11-20",
         "technicians": [str(10**308)]},
    )  # fmt: skip
    assert response.status_code == 200
    assert "Select a valid choice" in response.content.decode()
    job.refresh_from_db()
    assert job.title == "Original"
