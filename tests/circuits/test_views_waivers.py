"""Leads waive a finding with a written reason (and may withdraw it); the waiver names the
lead and the time and is shown wherever the finding is."""

from __future__ import annotations

import re

import pytest
from django.urls import reverse

from circuits.models import Waiver
from circuits.services import circuit_update
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


def _schedule(job) -> str:
    # The findings, with their waivers and forms, are listed on the schedule page (the job
    # page shows their counts).
    return reverse("circuit_schedule", args=[job.number])


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


def test_a_lead_waives_a_finding_and_the_schedule_shows_who_when_and_why(lead_client, lead, job):
    response = lead_client.post(reverse("waiver_new", args=[job.number]), _post(job))
    assert response.status_code == 302
    assert response["Location"] == job.get_absolute_url()
    waiver = Waiver.objects.get(job=job)
    assert (waiver.code, waiver.subject, waiver.lead) == ("CONSTRUCTION_SOLID", "D-01", lead)
    body = lead_client.get(_schedule(job)).content.decode()
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


def _waive(client, job, **fields):
    return client.post(reverse("waiver_new", args=[job.number]), _post(job, **fields))


def _withdraw_url(waiver) -> str:
    return reverse("waiver_delete", args=[waiver.job.number, waiver.pk])


def test_a_lead_withdraws_a_waiver(anon_client, lead_client, lead, technician_client, job):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    url = _withdraw_url(waiver)
    assert anon_client.post(url, {"confirm": "yes"}).status_code == 302
    assert technician_client.post(url, {"confirm": "yes"}).status_code == 403
    waiver.refresh_from_db()
    assert waiver.is_active
    response = lead_client.post(url, {"confirm": "yes", "next": job.get_absolute_url()})
    assert response.status_code == 302
    assert response["Location"] == job.get_absolute_url()
    waiver.refresh_from_db()
    assert waiver.withdrawn_by == lead and not waiver.is_active


def test_withdraw_needs_confirmation(lead_client, job):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    url = _withdraw_url(waiver)
    # A plain page asks first, on a GET and on an empty POST alike.
    for response in (lead_client.get(url), lead_client.post(url)):
        body = response.content.decode()
        assert response.status_code == 200
        assert "Withdraw this waiver?" in body
        assert 'name="confirm" value="yes"' in body
    waiver.refresh_from_db()
    assert waiver.is_active
    # Through htmx the question replaces the finding's withdraw button.
    body = lead_client.post(url, headers={"HX-Request": "true"}).content.decode()
    assert body.lstrip().startswith('<li class="finding finding-blocking is-waived"')
    assert "Withdraw this waiver?" in body and "Yes, withdraw it" in body
    waiver.refresh_from_db()
    assert waiver.is_active
    # Confirmed, with a reason: withdrawn, and the row stays.
    lead_client.post(url, {"confirm": "yes", "reason": "Owner replacing the lamp lead."})
    waiver.refresh_from_db()
    assert not waiver.is_active and waiver.withdrawal_reason == "Owner replacing the lamp lead."
    assert Waiver.objects.count() == 1


def test_a_too_long_withdrawal_reason_is_an_error_beside_it(lead_client, job):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    response = lead_client.post(_withdraw_url(waiver), {"confirm": "yes", "reason": "x" * 5000})
    body = response.content.decode()
    assert response.status_code == 200
    assert "1000 characters or fewer" in body and 'class="field-error"' in body
    waiver.refresh_from_db()
    assert waiver.is_active


def test_withdrawing_is_logged(lead_client, job, caplog):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    with caplog.at_level("WARNING", logger="security"):
        lead_client.post(_withdraw_url(waiver), {"confirm": "yes"})
    [record] = [r for r in caplog.records if "waiver_withdrawn" in r.getMessage()]
    assert "CONSTRUCTION_SOLID" in record.getMessage() and "D-01" in record.getMessage()


def test_withdrawing_through_htmx_shows_the_open_finding_again(lead_client, job):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    response = lead_client.post(
        _withdraw_url(waiver), {"confirm": "yes"}, headers={"HX-Request": "true"}
    )
    body = response.content.decode()
    assert "is-waived" not in body
    assert "Waive this finding" in body


def test_a_withdrawn_waiver_cannot_be_withdrawn_again(lead_client, job):
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    lead_client.post(_withdraw_url(waiver), {"confirm": "yes"})
    waiver.refresh_from_db()
    stamp = waiver.withdrawn_at
    response = lead_client.post(_withdraw_url(waiver), {"confirm": "yes"})
    assert response.status_code == 302
    waiver.refresh_from_db()
    assert waiver.withdrawn_at == stamp


def test_technician_cannot_waive_or_withdraw(technician_client, lead_client, job):
    assert _waive(technician_client, job).status_code == 403
    assert not Waiver.objects.exists()
    _waive(lead_client, job)
    waiver = Waiver.objects.get()
    assert technician_client.get(_withdraw_url(waiver)).status_code == 403
    assert technician_client.post(_withdraw_url(waiver), {"confirm": "yes"}).status_code == 403
    waiver.refresh_from_db()
    assert waiver.is_active
    # The technician sees the waiver but is offered neither form.
    body = technician_client.get(_schedule(job)).content.decode()
    assert "Waived by Test Lead" in body
    assert "Withdraw waiver" not in body and "Waive this finding" not in body


def test_waiver_next_that_is_not_a_path_falls_back(lead_client, job):
    """A `next` of "NaN" was once taken for a view name (NoReverseMatch, a 500)."""
    for bad in ("NaN", "job_list", "//elsewhere.example/", "javascript:alert(1)"):
        response = _waive(lead_client, job, next=bad)
        assert response.status_code == 302, bad
        assert response["Location"] == job.get_absolute_url()
        waiver = Waiver.objects.get()
        response = lead_client.post(_withdraw_url(waiver), {"confirm": "yes", "next": bad})
        assert response.status_code == 302, bad
        assert response["Location"] == job.get_absolute_url()
        Waiver.objects.all().delete()


def _lapse(job) -> None:
    """A technician makes the solid-conductor run three times as long."""
    circuit_update(circuit=job.circuits.get(tag="D-01"), length_m=6.0)


def test_a_lapsed_waiver_shows_the_finding_open_with_what_changed(lead_client, job):
    _waive(lead_client, job)
    _lapse(job)
    body = lead_client.get(_schedule(job)).content.decode()
    assert "is-lapsed" in body and "Waiver lapsed" in body
    assert "waived for an earlier version of this circuit: length 2 m → 6 m" in body
    assert REASON in body  # the lapsed waiver's reason, kept for reference
    assert "Renew waiver" in body
    assert "1 blocking open" in body and "1 waiver lapsed" in body


def test_the_editor_panel_counts_a_lapsed_blocking_finding_as_open(lead_client, job):
    circuit = job.circuits.get(tag="D-01")
    _waive(lead_client, job)
    body = lead_client.get(circuit.get_absolute_url()).content.decode()
    assert "No open blocking" in body
    _lapse(job)
    body = lead_client.get(circuit.get_absolute_url()).content.decode()
    assert "No open blocking" not in body
    assert "waived for an earlier version of this circuit" in body


def test_a_lead_renews_a_lapsed_waiver_from_the_finding(lead_client, job):
    _waive(lead_client, job)
    _lapse(job)
    reason = "Longer lamp lead checked; still accepted until the next service."
    response = lead_client.post(
        reverse("waiver_new", args=[job.number]),
        _post(job, reason=reason),
        headers={"HX-Request": "true"},
    )
    body = response.content.decode()
    assert body.lstrip().startswith('<li class="finding finding-blocking is-waived"')
    assert reason in body and "Renews the waiver Test Lead gave on" in body
    old, new = Waiver.objects.order_by("pk")
    assert new.renews == old and new.is_active and not old.is_active


def test_a_technician_sees_the_lapse_but_cannot_renew(technician_client, lead_client, job):
    _waive(lead_client, job)
    _lapse(job)
    body = technician_client.get(_schedule(job)).content.decode()
    assert "waived for an earlier version of this circuit" in body
    assert "Renew waiver" not in body


def test_every_htmx_form_in_a_finding_has_a_plain_action(lead_client, job):
    _waive(lead_client, job)
    _lapse(job)
    pages = [
        lead_client.get(_schedule(job)).content.decode(),
        lead_client.post(
            _withdraw_url(Waiver.objects.get()), headers={"HX-Request": "true"}
        ).content.decode(),
    ]
    tags = []
    for body in pages:
        tags += re.findall(r"<(?:form|a|button)\b[^>]*\bhx-(?:get|post)=[^>]*>", body)
        assert "style=" not in body and "<script" not in body.split("<main", 1)[-1]
    # The renew form, the withdraw button and the withdraw question at least.
    assert len(tags) >= 3
    for tag in tags:
        assert re.search(r'\b(action|href)="/', tag), tag


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
