"""Job list: who may see it, search, status filter, order, pagination, htmx fragment."""

from __future__ import annotations

import pytest
from django.urls import reverse

from inspections.models import Stage
from inspections.services import job_status_sync
from shop.models import Job
from shop.views.jobs import PAGE_SIZE
from tests.factories import make_job, make_owner, make_vehicle

pytestmark = pytest.mark.django_db
URL = reverse("job_list")


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(URL)
    assert response.status_code == 302
    assert response["Location"].startswith(reverse("login"))


def test_user_without_a_role_is_refused(client, django_user_model):
    client.force_login(django_user_model.objects.create_user("norole", password="x-pass-123"))
    assert client.get(URL).status_code == 403


@pytest.mark.parametrize("persona", ["technician_client", "lead_client", "office_client"])
def test_every_role_sees_the_list(persona, request):
    job = make_job()
    response = request.getfixturevalue(persona).get(URL)
    assert response.status_code == 200
    assert job.number in response.content.decode()


def test_search_finds_by_number_owner_vehicle_and_vin(technician_client):
    owner = make_owner(name="Ingrid Searchable")
    vehicle = make_vehicle(owner, make="Uniquemake", identification="1M8GDM9AXKP042788")
    wanted = make_job(vehicle)
    other = make_job()
    for text in [wanted.number, "searchable", "uniquemake", "KP042788"]:
        body = technician_client.get(URL, {"q": text}).content.decode()
        assert wanted.number in body, text
        assert other.number not in body, text


def test_status_filter_keeps_only_that_status(technician_client):
    # A new job stands in its first install (its stages set the status); a job whose
    # stages are gone (as before stages existed) is booked in.
    installing = make_job()
    booked = make_job()
    Stage.objects.filter(job=booked).delete()
    job_status_sync(job=booked)
    body = technician_client.get(URL, {"status": "install"}).content.decode()
    assert installing.number in body
    assert booked.number not in body
    body = technician_client.get(URL, {"status": "booked"}).content.decode()
    assert booked.number in body and installing.number not in body


def test_the_list_shows_each_jobs_status_in_words(technician_client):
    job = make_job()
    body = technician_client.get(URL).content.decode()
    assert f'<span class="status status-{Job.Status.INSTALL}">First install</span>' in body
    assert job.number in body


def test_newest_first_and_paginated(technician_client):
    jobs = [make_job() for _ in range(PAGE_SIZE + 2)]
    first_page = technician_client.get(URL).content.decode()
    assert first_page.index(jobs[-1].number) < first_page.index(jobs[-2].number)
    assert jobs[0].number not in first_page
    second_page = technician_client.get(URL, {"page": 2}).content.decode()
    assert jobs[0].number in second_page
    assert jobs[-1].number not in second_page


def test_htmx_request_gets_only_the_results_fragment(technician_client):
    job = make_job()
    response = technician_client.get(URL, {"q": job.number}, headers={"HX-Request": "true"})
    body = response.content.decode()
    assert body.lstrip().startswith('<div id="job-results">')
    assert "<html" not in body
    assert job.number in body
