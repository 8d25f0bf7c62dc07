"""Error pages in plain words, on the app's own layout: a 403 says why (and is logged), a
404 names no URL patterns, a 400 says nothing was saved."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from shop import roles
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


def test_a_refusal_says_why_in_plain_words(technician_client):
    response = technician_client.get(reverse("job_new"))
    body = response.content.decode()
    assert response.status_code == 403
    assert "Not allowed" in body
    assert "Your role does not let you open this page" in body
    assert "Ampwright supports, and never replaces" in body  # the app's own layout


def test_an_unassigned_technician_is_told_to_ask_a_lead():
    job = make_job()
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    response = client.get(reverse("device_new", args=[job.number]))
    assert response.status_code == 403
    assert f"You are not assigned to job {job.number}" in response.content.decode()
    assert "ask a lead to add you to this job" in response.content.decode()


def test_a_refusal_is_logged_with_who_and_why(technician_client, technician, caplog):
    with caplog.at_level("WARNING", logger="security"):
        technician_client.get(reverse("job_new"))
    logged = [r.getMessage() for r in caplog.records if r.name == "security"]
    assert any(
        "event=forbidden" in m and technician.username in m and "path='/jobs/new/'" in m
        for m in logged
    ), logged


def test_not_found_is_plain(technician_client):
    response = technician_client.get("/jobs/NO-SUCH-JOB/")
    body = response.content.decode()
    assert response.status_code == 404
    assert "Not found" in body
    assert "/jobs/NO-SUCH-JOB/" in body
    assert "URLconf" not in body and "urlpatterns" not in body


def test_an_unknown_address_is_plain_too(anon_client):
    response = anon_client.get("/no/such/page/")
    assert response.status_code == 404
    assert "Not found" in response.content.decode()


def test_a_bad_request_page_says_nothing_was_saved(office_client, technician):
    response = office_client.post(reverse("staff_active", args=[technician.pk]), {"active": "x"})
    body = response.content.decode()
    assert response.status_code == 400
    assert "Nothing was saved" in body
