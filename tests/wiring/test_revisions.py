"""Issued revisions of the wiring record: only an approved job's record is issued; one
revision per approval, stored with the SHA-256 of the signed file; a new approval after a
reopen makes the next revision and never replaces a file; revisions are append-only; the
list and downloads are for staff who read the job."""

from __future__ import annotations

import hashlib

import pytest
from django.core.exceptions import ValidationError
from django.db import IntegrityError, connection, transaction
from django.urls import reverse

from inspections.models.base import AppendOnlyError
from inspections.services import job_approve, job_reopen
from tests.factories import make_job
from tests.inspections.factories import PASSWORD, signature
from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring.models import RecordRevision
from wiring.services import record_issue


def test_a_job_that_is_not_approved_gets_no_record(db, signing_key, media, lead):
    with pytest.raises(ValidationError, match="not approved"):
        record_issue(job=make_job(lead=lead), by=lead)
    assert not RecordRevision.objects.exists()


def test_the_issued_revision_stores_the_signed_file_and_its_hash(issued, lead):
    revision, data = issued
    assert revision.number == 1 and revision.created_by == lead
    assert revision.sha256 == hashlib.sha256(data).hexdigest() and revision.size == len(data)
    assert data.startswith(b"%PDF-")
    assert revision.approval.kind == "approval"


def test_issuing_again_for_the_same_approval_returns_the_same_revision(issued):
    revision, _ = issued
    assert record_issue(job=revision.job, by=None) == revision
    assert RecordRevision.objects.filter(job=revision.job).count() == 1


def test_a_new_approval_after_a_reopen_makes_the_next_revision(issued, lead):
    first, data = issued
    job = first.job
    job_reopen(job=job, lead=lead, reason="Owner asked for a second USB outlet.")
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    second = record_issue(job=job, by=lead)
    assert second.number == 2 and second.file.name != first.file.name
    with first.file.open("rb") as handle:
        assert handle.read() == data  # the first revision's file is untouched


def test_revisions_are_append_only(issued):
    revision, _ = issued
    with pytest.raises(AppendOnlyError):
        revision.save()
    with pytest.raises(AppendOnlyError):
        RecordRevision.objects.filter(pk=revision.pk).update(number=7)
    with pytest.raises(IntegrityError), transaction.atomic(), connection.cursor() as cursor:
        cursor.execute("UPDATE wiring_recordrevision SET sha256 = 'x' WHERE id = %s", [revision.pk])
    with pytest.raises(IntegrityError), transaction.atomic(), connection.cursor() as cursor:
        cursor.execute("DELETE FROM wiring_recordrevision WHERE id = %s", [revision.pk])


# ---- pages ----


def test_anonymous_is_sent_to_sign_in(issued, anon_client):
    revision, _ = issued
    for url in (
        reverse("revision_list", args=[revision.job.number]),
        reverse("revision_download", args=[revision.job.number, 1]),
    ):
        response = anon_client.get(url)
        assert response.status_code == 302 and reverse("login") in response["Location"]


def test_staff_who_read_the_job_list_and_download(issued, technician_client, office_client):
    revision, data = issued
    for client in (technician_client, office_client):
        page = client.get(reverse("revision_list", args=[revision.job.number]))
        assert page.status_code == 200
        assert revision.sha256 in page.content.decode()
        download = client.get(reverse("revision_download", args=[revision.job.number, 1]))
        assert download.status_code == 200
        assert download["Content-Type"] == "application/pdf"
        assert b"".join(download.streaming_content) == data
        assert f"{revision.job.number}-record-r1.pdf" in download["Content-Disposition"]


def test_a_revision_is_reached_only_through_its_own_job(issued, lead_client, lead):
    other = make_job(lead=lead)
    response = lead_client.get(reverse("revision_download", args=[other.number, 1]))
    assert response.status_code == 404


def test_a_user_without_the_job_permission_is_refused(issued, db):
    from django.test import Client

    from tests.factories import make_user

    revision, _ = issued
    client = Client()
    client.force_login(make_user())  # an account with no role
    assert client.get(reverse("revision_list", args=[revision.job.number])).status_code == 403


def test_downloads_take_no_post(issued, lead_client):
    revision, _ = issued
    url = reverse("revision_download", args=[revision.job.number, 1])
    assert lead_client.post(url).status_code == 405


# Issuing the record from its page (the approval leads there; the page posts at once).


def test_issuing_from_the_page_signs_the_record_of_the_approval(
    approved_job, signing_key, media, lead_client
):
    url = reverse("record_issue_now", args=[approved_job.number])
    page = lead_client.get(reverse("revision_list", args=[approved_job.number])).content.decode()
    assert 'hx-trigger="load, submit"' in page and f'action="{url}"' in page
    response = lead_client.post(url, HTTP_HX_REQUEST="true")
    assert response.status_code == 200
    [revision] = RecordRevision.objects.filter(job=approved_job)
    assert revision.number == 1 and "Download PDF" in response.content.decode()
    lead_client.post(url)  # again, as a second tab would: the same revision
    assert RecordRevision.objects.filter(job=approved_job).count() == 1


def test_a_technician_cannot_issue_the_record(approved_job, signing_key, media, technician_client):
    url = reverse("record_issue_now", args=[approved_job.number])
    assert technician_client.post(url).status_code == 403
    assert not RecordRevision.objects.exists()


def test_issuing_before_approval_says_why_and_stores_nothing(db, signing_key, media, lead):
    from django.test import Client

    job = make_job(lead=lead)
    client = Client()
    client.force_login(lead)
    response = client.post(reverse("record_issue_now", args=[job.number]), follow=True)
    assert "could not be issued" in response.content.decode() or "not approved" in (
        response.content.decode()
    )
    assert not RecordRevision.objects.exists()
