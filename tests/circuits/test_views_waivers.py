"""Leads waive a finding with a written reason (and may withdraw it); the waiver names the
lead and the time and is shown wherever the finding is."""

from __future__ import annotations

import pytest
from django.urls import reverse

from circuits.models import Waiver
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = pytest.mark.django_db

REASON = "Owner supplied solid lead to a removable lamp; replaced at next service."


@pytest.fixture
def job():
    """One branch circuit in solid conductor: a blocking CONSTRUCTION_SOLID finding."""
    job = make_job()
    make_circuit(job, make_device(job), make_device(job), tag="D-01", construction="solid")
    return job


def _post(job, **fields) -> dict:
    data = {
        "code": "CONSTRUCTION_SOLID",
        "subject": "D-01",
        "reason": REASON,
        "next": job.get_absolute_url(),
    }
    data.update(fields)
    return data


def test_anonymous_is_sent_to_sign_in(anon_client, job):
    response = anon_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    assert response.status_code == 302
    assert "/login/" in response["Location"]
    assert not Waiver.objects.exists()


@pytest.mark.parametrize("client_name", ["technician_client", "office_client"])
def test_only_leads_waive(request, client_name, job):
    client = request.getfixturevalue(client_name)
    response = client.post(reverse("waiver_new", args=[job.number]), _post(job))
    assert response.status_code == 403
    assert not Waiver.objects.exists()


def test_a_lead_waives_a_finding_and_the_job_page_shows_who_when_and_why(lead_client, lead, job):
    response = lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    assert response.status_code == 302
    assert response["Location"] == job.get_absolute_url()
    waiver = Waiver.objects.get(job=job)
    assert (waiver.code, waiver.subject, waiver.lead) == ("CONSTRUCTION_SOLID", "D-01", lead)
    body = lead_client.get(job.get_absolute_url()).content.decode()
    stamp = waiver.created_at.astimezone().strftime("%Y-%m-%d")
    assert f"Waived by Test Lead on {stamp}" in body
    assert REASON in body


def test_the_waiver_is_shown_with_the_finding_on_the_circuit_editor(lead_client, job):
    lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    circuit = job.circuits.get(tag="D-01")
    body = lead_client.get(circuit.get_absolute_url()).content.decode()
    assert "Waived by Test Lead" in body
    assert REASON in body


def test_htmx_swaps_the_finding_in_place(lead_client, job):
    response = lead_client.post(
        reverse("waiver_new", args=[job.number]), _post(job), headers={"HX-Request": "true"}
    )
    body = response.content.decode()
    assert response.status_code == 200
    assert body.lstrip().startswith('<li class="finding finding-blocking is-waived"')
    assert "Waived by Test Lead" in body
    assert "Withdraw waiver" in body


def test_a_short_reason_is_an_error_beside_the_reason_and_nothing_is_saved(lead_client, job):
    url = reverse("waiver_new", args=[job.number])
    response = lead_client.post(url, _post(job, reason="fine"), headers={"HX-Request": "true"})
    body = response.content.decode()
    assert response.status_code == 200
    assert "at least 15 characters" in body
    assert 'class="field-error" id="reason-' in body
    assert '<details class="waive" open>' in body
    assert not Waiver.objects.exists()
    # Without JavaScript the same error comes on a page of its own.
    page = lead_client.post(url, _post(job, reason="")).content.decode()
    assert "Write why this finding is accepted." in page
    assert not Waiver.objects.exists()


def test_a_finding_no_longer_raised_cannot_be_waived(lead_client, job):
    url = reverse("waiver_new", args=[job.number])
    response = lead_client.post(url, _post(job, subject="D-99"))
    body = response.content.decode()
    assert response.status_code == 200
    assert "no longer raised" in body
    assert not Waiver.objects.exists()


def test_waiving_twice_is_refused(lead_client, job):
    url = reverse("waiver_new", args=[job.number])
    lead_client.post(url, _post(job))
    body = lead_client.post(url, _post(job)).content.decode()
    assert "already waived" in body
    assert Waiver.objects.count() == 1


def test_a_lead_withdraws_a_waiver(anon_client, lead_client, technician_client, job):
    lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    waiver = Waiver.objects.get()
    url = reverse("waiver_delete", args=[job.number, waiver.pk])
    assert anon_client.post(url).status_code == 302
    assert technician_client.post(url).status_code == 403
    assert Waiver.objects.exists()
    response = lead_client.post(url, {"next": job.get_absolute_url()})
    assert response.status_code == 302
    assert not Waiver.objects.exists()


def test_withdrawing_through_htmx_shows_the_open_finding_again(lead_client, job):
    lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    waiver = Waiver.objects.get()
    url = reverse("waiver_delete", args=[job.number, waiver.pk])
    body = lead_client.post(url, headers={"HX-Request": "true"}).content.decode()
    assert "is-waived" not in body
    assert "Waive this finding" in body


def test_an_outside_next_address_is_ignored(lead_client, job):
    url = reverse("waiver_new", args=[job.number])
    response = lead_client.post(url, _post(job, next="https://elsewhere.example/"))
    assert response["Location"] == job.get_absolute_url()


def test_waivers_of_another_job_are_not_found(lead_client, job):
    lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    waiver = Waiver.objects.get()
    other = make_job()
    assert (
        lead_client.post(reverse("waiver_delete", args=[other.number, waiver.pk])).status_code
        == 404
    )
