"""The record preview and the stage sheet: read by anyone who may read the job (the
record as it would print now, a draft), GET only; a stage sheet only for first install
and retorque; another job's number is a 404."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from inspections.models import Stage
from tests.factories import make_user
from tests.wiring.pdf_helpers import text_of
from tests.wiring.record_jobs import known_job


@pytest.fixture
def job(db, settings, tmp_path, technician, lead):
    settings.MEDIA_ROOT = tmp_path
    return known_job(technician=technician, lead=lead, approve=False)


def preview(job) -> str:
    return reverse("record_preview", args=[job.number])


def sheet(job, kind) -> str:
    return reverse("stage_sheet", args=[job.number, kind])


def test_anonymous_is_sent_to_sign_in(job, anon_client):
    for url in (preview(job), sheet(job, Stage.Kind.FIRST_INSTALL)):
        response = anon_client.get(url)
        assert response.status_code == 302 and "/login" in response["Location"]


def test_a_user_without_a_role_is_refused(job):
    client = Client()
    client.force_login(make_user(None))
    assert client.get(preview(job)).status_code == 403
    assert client.get(sheet(job, Stage.Kind.RETORQUE)).status_code == 403


def test_the_preview_shows_the_record_as_a_draft(job, technician_client):
    response = technician_client.get(preview(job))
    assert response.status_code == 200
    page = response.content.decode()
    assert "DRAFT — not a signed record" in page
    assert "Ilse Marrow" in page and "4 AWG" in page and "FOUND LOOSE" in page
    assert 'href="/static/css/record.css"' in page
    assert f'href="{job.get_absolute_url()}"' in page  # the way back to the job
    # The drawn signatures are data: images; only this page allows them.
    assert "data:" in response["Content-Security-Policy"].split("img-src", 1)[1].split(";")[0]
    assert "style=" not in page and "<script" not in page


@pytest.mark.parametrize("client_name", ["office_client", "lead_client"])
def test_office_and_lead_read_it_too(job, request, client_name):
    assert request.getfixturevalue(client_name).get(preview(job)).status_code == 200


@pytest.mark.parametrize("kind", [Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE])
def test_the_stage_sheet_is_a_pdf_of_that_stage(job, technician_client, kind):
    response = technician_client.get(sheet(job, kind))
    assert response.status_code == 200
    assert response["Content-Type"] == "application/pdf"
    assert response["Content-Disposition"].startswith("inline; filename=")
    text = text_of(response.content)
    assert Stage.Kind(kind).label in text and job.number in text
    assert "Test Technician" in text  # by whom
    if kind == Stage.Kind.RETORQUE:
        assert "FOUND LOOSE" in text


@pytest.mark.parametrize("kind", [Stage.Kind.HEAT_CYCLE, Stage.Kind.HANDOVER, 9])
def test_no_sheet_for_other_stages(job, technician_client, kind):
    assert technician_client.get(sheet(job, kind)).status_code == 404


def test_no_such_job_is_404(db, technician_client):
    assert technician_client.get(reverse("record_preview", args=["NOPE-1"])).status_code == 404
    assert technician_client.get(reverse("stage_sheet", args=["NOPE-1", 1])).status_code == 404


def test_both_are_get_only(job, technician_client):
    assert technician_client.post(preview(job)).status_code == 405
    assert technician_client.post(sheet(job, Stage.Kind.FIRST_INSTALL)).status_code == 405
