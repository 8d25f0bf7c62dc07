"""Addresses carrying a NUL character are refused with 400 before any query runs (on
PostgreSQL a NUL in a text parameter raised DataError, a 500), and a timed-out htmx request
loads the sign-in page as a whole page."""

from __future__ import annotations

import logging

import pytest
from django.urls import reverse

from tests.factories import make_job, make_owner

pytestmark = pytest.mark.django_db


def test_nul_in_owner_search_is_a_bad_request(office_client, caplog):
    make_owner(name="Ada Example")
    with caplog.at_level(logging.INFO, logger="security"):
        response = office_client.get(reverse("owner_list"), {"q": "Ada\x00"})
    assert response.status_code == 400
    assert "NUL" in response.content.decode()
    assert "event=bad_request" in caplog.text


def test_nul_in_job_number_in_the_path_is_a_bad_request(lead_client):
    make_job()
    assert lead_client.get("/jobs/JOB%00-1/").status_code == 400


def test_nul_in_a_query_key_is_a_bad_request(lead_client):
    assert lead_client.get("/jobs/?q%00=x").status_code == 400


def test_a_very_long_owner_search_still_answers(office_client):
    make_owner(name="Ada Example")
    response = office_client.get(reverse("owner_list"), {"q": "Ada" + "x" * 5000})
    assert response.status_code == 200


def test_timed_out_htmx_request_asks_for_a_full_page_sign_in(anon_client):
    job = make_job()
    response = anon_client.get(
        reverse("circuit_schedule", args=[job.number]), HTTP_HX_REQUEST="true"
    )
    assert response.headers["HX-Redirect"].startswith(reverse("login"))


def test_plain_request_still_gets_the_ordinary_redirect(anon_client):
    job = make_job()
    response = anon_client.get(reverse("circuit_schedule", args=[job.number]))
    assert response.status_code == 302
    assert response["Location"].startswith(reverse("login"))
