"""The owner's private link: the office makes it (token shown once, only its hash kept),
e-mails it and revokes it; the owner's page is read-only, reaches only its own job's
files, logs every opening, and says in words when the link has expired or was revoked."""

from __future__ import annotations

import datetime

import pytest
from django.core import mail
from django.urls import reverse
from django.utils import timezone

from tests.factories import make_job
from tests.inspections.factories import approved, make_wrench
from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring.models import OwnerLink, OwnerLinkVisit, token_hash
from wiring.services import owner_link_create, owner_link_revoke, record_issue

UA = "Mozilla/5.0 (test phone)"


@pytest.fixture
def link(issued, office):
    revision, _ = issued
    return owner_link_create(
        job=revision.job, by=office, expires_on=timezone.localdate() + datetime.timedelta(days=30)
    )


def _owner_get(client, url):
    return client.get(url, HTTP_USER_AGENT=UA, REMOTE_ADDR="192.0.2.15")


# ---- the office's pages ----


def test_only_the_office_manages_links(issued, anon_client, technician_client, lead_client,
                                       office_client):  # fmt: skip
    revision, _ = issued
    url = reverse("owner_links", args=[revision.job.number])
    assert anon_client.get(url).status_code == 302
    assert technician_client.get(url).status_code == 403
    assert lead_client.get(url).status_code == 403
    assert office_client.get(url).status_code == 200


def test_the_office_makes_a_link_shown_once_and_stores_only_its_hash(issued, office_client):
    revision, _ = issued
    job = revision.job
    expires = timezone.localdate() + datetime.timedelta(days=60)
    response = office_client.post(
        reverse("owner_links", args=[job.number]),
        {"expires_on": expires.isoformat(), "note": "For the owner", "send_to": ""},
    )
    assert response.status_code == 200
    link = OwnerLink.objects.get(job=job)
    token = response.context["created"]["token"]
    assert len(token) >= 43  # 32 random bytes
    assert link.token_sha256 == token_hash(token) and token not in link.token_sha256
    assert reverse("owner_record", args=[token]) in response.content.decode()
    # Shown once: the list page afterwards does not carry it.
    again = office_client.get(reverse("owner_links", args=[job.number]))
    assert token not in again.content.decode()


def test_a_past_expiry_is_refused_beside_the_field(issued, office_client):
    revision, _ = issued
    response = office_client.post(
        reverse("owner_links", args=[revision.job.number]),
        {"expires_on": "2001-01-01", "send_to": ""},
    )
    assert response.status_code == 200
    assert "cannot be in the past" in response.content.decode()
    assert not OwnerLink.objects.exists()


def test_the_office_e_mails_the_link(issued, office_client):
    revision, _ = issued
    expires = timezone.localdate() + datetime.timedelta(days=60)
    response = office_client.post(
        reverse("owner_links", args=[revision.job.number]),
        {"expires_on": expires.isoformat(), "send_to": "owner@test.example"},
    )
    token = response.context["created"]["token"]
    assert len(mail.outbox) == 1
    assert mail.outbox[0].to == ["owner@test.example"]
    assert reverse("owner_record", args=[token]) in mail.outbox[0].body
    assert OwnerLink.objects.get().last_sent_to == "owner@test.example"


def test_sending_needs_the_link_s_own_token(link, office_client):
    owner_link, token = link
    url = reverse("owner_link_send", args=[owner_link.job.number, owner_link.pk])
    response = office_client.post(url, {"token": "x" * 43, "to": "owner@test.example"})
    assert response.status_code == 200 and not mail.outbox
    assert office_client.post(url, {"token": token, "to": "owner@test.example"}).status_code == 302
    assert len(mail.outbox) == 1


def test_revoking_asks_first_then_revokes(link, office_client, office):
    owner_link, _ = link
    url = reverse("owner_link_revoke", args=[owner_link.job.number, owner_link.pk])
    assert office_client.post(url, {}).status_code == 200
    owner_link.refresh_from_db()
    assert owner_link.revoked_at is None
    assert office_client.post(url, {"confirm": "yes"}).status_code == 302
    owner_link.refresh_from_db()
    assert owner_link.revoked_at is not None and owner_link.revoked_by == office


def test_a_link_is_revoked_only_through_its_own_job(link, office_client, lead):
    owner_link, _ = link
    other = make_job(lead=lead)
    url = reverse("owner_link_revoke", args=[other.number, owner_link.pk])
    assert office_client.post(url, {"confirm": "yes"}).status_code == 404


# ---- the owner's page ----


def test_the_owner_reads_the_vehicle_record_and_receipt_without_signing_in(link, anon_client):
    owner_link, token = link
    job = owner_link.job
    response = _owner_get(anon_client, reverse("owner_record", args=[token]))
    assert response.status_code == 200
    text = response.content.decode()
    assert str(job.vehicle) in text and "Revision 1" in text
    assert reverse("owner_record_pdf", args=[token, 1]) in text
    assert response["Referrer-Policy"] == "no-referrer"
    assert "no-store" in response["Cache-Control"]
    # Nothing else of the shop is linked: no menu, no sign-in, no staff page.
    for address in (reverse("job_list"), reverse("login"), job.get_absolute_url()):
        assert f'href="{address}"' not in text


def test_every_opening_is_logged(link, anon_client):
    owner_link, token = link
    _owner_get(anon_client, reverse("owner_record", args=[token]))
    pdf = _owner_get(anon_client, reverse("owner_record_pdf", args=[token, 1]))
    assert pdf.status_code == 200 and pdf["Content-Type"] == "application/pdf"
    visits = list(OwnerLinkVisit.objects.filter(link=owner_link).order_by("pk"))
    assert [(v.outcome, v.revision) for v in visits] == [("page", None), ("pdf", 1)]
    assert {v.address for v in visits} == {"192.0.2.15"}  # RFC 5737 documentation address
    assert {v.user_agent for v in visits} == {UA}


def test_a_token_cannot_reach_another_job(link, anon_client, technician, lead, office):
    owner_link, token = link
    other = make_job(lead=lead)
    approved(other, technician=technician, lead=lead, wrench=make_wrench())
    record_issue(job=other, by=lead)  # the other job has a revision 1 of its own
    own = _owner_get(anon_client, reverse("owner_record_pdf", args=[token, 1]))
    with owner_link.job.record_revisions.get(number=1).file.open("rb") as handle:
        assert b"".join(own.streaming_content) == handle.read()
    assert _owner_get(anon_client, reverse("owner_record_pdf", args=[token, 2])).status_code == 404


def test_an_unknown_token_gets_a_page_in_words(db, anon_client):
    response = _owner_get(anon_client, reverse("owner_record", args=["z" * 43]))
    assert response.status_code == 404
    assert "does not open anything" in response.content.decode()


def test_an_expired_link_gets_a_clear_page(link, anon_client):
    owner_link, token = link
    OwnerLink.objects.filter(pk=owner_link.pk).update(
        expires_on=timezone.localdate() - datetime.timedelta(days=1)
    )
    for url in (
        reverse("owner_record", args=[token]),
        reverse("owner_record_pdf", args=[token, 1]),
    ):
        response = _owner_get(anon_client, url)
        assert response.status_code == 410
        assert "This link has expired" in response.content.decode()
    assert OwnerLinkVisit.objects.filter(link=owner_link, outcome="expired").count() == 2


def test_a_revoked_link_gets_a_clear_page(link, anon_client, office):
    owner_link, token = link
    owner_link_revoke(link=owner_link, by=office)
    response = _owner_get(anon_client, reverse("owner_record", args=[token]))
    assert response.status_code == 410
    assert "withdrew it" in response.content.decode()


def test_the_owner_s_pages_take_no_write(link, anon_client, office_client):
    _, token = link
    for client in (anon_client, office_client):
        for url in (
            reverse("owner_record", args=[token]),
            reverse("owner_record_pdf", args=[token, 1]),
        ):
            assert client.post(url, {"confirm": "yes"}).status_code == 405
            assert client.put(url).status_code == 405
            assert client.delete(url).status_code == 405


def test_visits_are_append_only(link, anon_client):
    from inspections.models.base import AppendOnlyError

    owner_link, token = link
    _owner_get(anon_client, reverse("owner_record", args=[token]))
    with pytest.raises(AppendOnlyError):
        OwnerLinkVisit.objects.filter(link=owner_link).delete()
