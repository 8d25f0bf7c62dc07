"""The lead's review: the queue lists jobs waiting for review oldest first with their
counts; a job's review page is read by everyone who reads the job and acted on only by
leads; a hot connection is waived by a lead with a reason; the timeline lists the job's
trail newest first, filterable by kind."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from inspections.models import AuditEvent, Stage, ThermalWaiver
from inspections.services import thermal_reading_create
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    approved,
    latest_stage,
    log_soaked_run,
    make_spec_circuit,
    mark_all,
    new_key,
    read,
    read_all,
    sign,
    through_install,
    through_retorque,
)

pytestmark = pytest.mark.django_db


def text(response) -> str:
    return response.content.decode()


@pytest.fixture
def on_job(job, technician, circuit):
    job.technicians.add(technician)
    return job


def hot_connection(job, technician, wrench):
    """Through the first install, a run logged and soaked, and one connection read at
    70 °C against 20 °C ambient: 50 °C over ambient, a major discrepancy (ANSI/NETA
    thermographic criteria, over ambient above 40 °C; from memory, as in
    tests/inspections/test_thermal.py)."""
    through_install(job, technician=technician, wrench=wrench)
    run = log_soaked_run(job, technician)
    termination = job.circuits.first().terminations.order_by("pk").first()
    return thermal_reading_create(
        run=run, termination=termination, temperature_c="70", by=technician, client_key=new_key()
    )


# ---- the queue --------------------------------------------------------------------------


def test_the_queue_is_the_leads(anon_client, technician_client, office_client, lead_client):
    url = reverse("review_queue")
    assert anon_client.get(url)["Location"].startswith(reverse("login"))
    assert technician_client.get(url).status_code == 403
    assert office_client.get(url).status_code == 403
    assert lead_client.get(url).status_code == 200
    assert lead_client.post(url).status_code == 405


def test_the_queue_lists_jobs_waiting_oldest_first_with_their_counts(
    lead_client, technician, wrench
):
    first, second, busy = (
        make_job(title="Waiting longest"),
        make_job(title="Waiting less"),
        make_job(title="Still in install"),
    )
    for job in (first, second, busy):
        make_spec_circuit(job)
    # The first job: one connection found loose at retorque, then re-torqued and read again.
    through_install(first, technician=technician, wrench=wrench)
    log_soaked_run(first, technician)
    retorque = latest_stage(first, Stage.Kind.RETORQUE)
    loose = first.circuits.first().terminations.order_by("pk").first()
    read(loose, retorque, "10", technician=technician, wrench=wrench, found_loose=True)
    read_all(retorque, technician=technician, wrench=wrench)
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    # The second: one reading out of tolerance at first install, then put right.
    second.technicians.add(technician)
    install = latest_stage(second, Stage.Kind.FIRST_INSTALL)
    low = second.circuits.first().terminations.order_by("pk").first()
    read(low, install, "6", technician=technician, wrench=wrench)  # 10 N·m ±10 %: low
    through_install(second, technician=technician, wrench=wrench)
    through_retorque(second, technician=technician, wrench=wrench)

    response = lead_client.get(reverse("review_queue"))
    page = text(response)
    assert page.index(first.number) < page.index(second.number)
    assert busy.number not in page
    rows = {row.job.pk: row for row in response.context["rows"]}
    assert (rows[first.pk].found_loose, rows[first.pk].out_of_tolerance) == (1, 0)
    assert (rows[second.pk].found_loose, rows[second.pk].out_of_tolerance) == (0, 1)


def test_an_approved_job_leaves_the_queue(lead_client, lead, on_job, technician, wrench):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    assert on_job.number not in text(lead_client.get(reverse("review_queue")))


# ---- the job's review page --------------------------------------------------------------


def test_the_review_page_is_read_only_for_a_technician(
    technician_client, on_job, technician, wrench
):
    through_install(on_job, technician=technician, wrench=wrench)
    response = technician_client.get(reverse("job_review", args=[on_job.number]))
    assert response.status_code == 200
    page = text(response)
    assert "Read only" in page
    assert reverse("job_approve", args=[on_job.number]) not in page
    assert reverse("stage_send_back", args=[on_job.number, 1]) not in page


def test_the_review_page_gives_a_lead_approve_and_send_back(
    lead_client, on_job, technician, wrench
):
    through_install(on_job, technician=technician, wrench=wrench)
    page = text(lead_client.get(reverse("job_review", args=[on_job.number])))
    assert reverse("job_approve", args=[on_job.number]) in page
    assert reverse("stage_send_back", args=[on_job.number, 1]) in page
    assert reverse("job_timeline", args=[on_job.number]) in page
    assert "Unchanged since signed" in page


def test_the_review_page_lists_out_of_tolerance_readings(office_client, on_job, technician, wrench):
    install = latest_stage(on_job, Stage.Kind.FIRST_INSTALL)
    termination = on_job.circuits.first().terminations.order_by("pk").first()
    read(termination, install, "12", technician=technician, wrench=wrench)  # 10 N·m +10 %: high
    response = office_client.get(reverse("job_review", args=[on_job.number]))
    assert response.status_code == 200
    page = text(response)
    assert str(termination) in page
    assert "Still the current reading" in page


def test_the_review_page_offers_a_lead_the_waiver_of_a_hot_connection(
    lead_client, on_job, technician, wrench
):
    reading = hot_connection(on_job, technician, wrench)
    page = text(lead_client.get(reverse("job_review", args=[on_job.number])))
    assert "Major discrepancy" in page or "major discrepancy" in page.lower()
    assert reverse("thermal_waive", args=[on_job.number, reading.pk]) in page


def test_the_review_page_for_anonymous_visitors_is_sign_in(anon_client, on_job):
    response = anon_client.get(reverse("job_review", args=[on_job.number]))
    assert response["Location"].startswith(reverse("login"))


# ---- waiving a hot connection -----------------------------------------------------------


def test_a_technician_cannot_waive_a_hot_connection(technician_client, on_job, technician, wrench):
    reading = hot_connection(on_job, technician, wrench)
    url = reverse("thermal_waive", args=[on_job.number, reading.pk])
    assert technician_client.get(url).status_code == 403
    assert technician_client.post(url, {"reason": "Looks fine to me, honestly."}).status_code == 403
    assert not ThermalWaiver.objects.exists()


def test_a_waiver_needs_a_reason(lead_client, on_job, technician, wrench):
    reading = hot_connection(on_job, technician, wrench)
    url = reverse("thermal_waive", args=[on_job.number, reading.pk])
    assert lead_client.get(url).status_code == 200
    response = lead_client.post(url, {"reason": ""})
    assert response.status_code == 200
    assert 'id="reason_error"' in text(response)
    assert not ThermalWaiver.objects.exists()


def test_the_lead_waives_a_hot_connection_with_a_reason(
    lead_client, lead, on_job, technician, wrench
):
    reading = hot_connection(on_job, technician, wrench)
    url = reverse("thermal_waive", args=[on_job.number, reading.pk])
    reason = "Shunt lug reads hot from the shunt body itself; checked with a contact probe."
    response = lead_client.post(url, {"reason": reason})
    assert response.status_code == 302
    waiver = ThermalWaiver.objects.get(reading=reading)
    assert waiver.lead == lead and waiver.reason == reason


def test_a_reading_of_another_job_is_not_found(lead_client, on_job, technician, wrench):
    reading = hot_connection(on_job, technician, wrench)
    other = make_job()
    url = reverse("thermal_waive", args=[other.number, reading.pk])
    assert lead_client.get(url).status_code == 404
    assert lead_client.post(url, {"reason": "Accepted on the other job."}).status_code == 404
    assert not ThermalWaiver.objects.exists()


# ---- the timeline -----------------------------------------------------------------------


def test_the_timeline_is_for_everyone_who_reads_the_job(
    anon_client, technician_client, office_client, on_job
):
    url = reverse("job_timeline", args=[on_job.number])
    assert anon_client.get(url)["Location"].startswith(reverse("login"))
    assert technician_client.get(url).status_code == 200
    assert office_client.get(url).status_code == 200
    assert technician_client.post(url).status_code == 405


def test_the_timeline_lists_events_newest_first(technician_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    response = technician_client.get(reverse("job_timeline", args=[on_job.number]))
    events = list(response.context["page"].object_list)
    moments = [event.at for event in events]
    assert moments == sorted(moments, reverse=True)
    assert events[-1].kind == AuditEvent.Kind.READING  # the first thing done on the job


def test_the_timeline_filters_by_kind(technician_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    response = technician_client.get(
        reverse("job_timeline", args=[on_job.number]), {"kind": AuditEvent.Kind.STAGE_SIGNED}
    )
    kinds = {event.kind for event in response.context["page"].object_list}
    assert kinds == {AuditEvent.Kind.STAGE_SIGNED}


def test_an_unknown_kind_is_ignored_with_a_note(technician_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    response = technician_client.get(
        reverse("job_timeline", args=[on_job.number]), {"kind": "<b>nonsense</b>"}
    )
    assert response.status_code == 200
    page = text(response)
    assert "is not a kind of event" in page
    assert "<b>nonsense</b>" not in page  # escaped
    assert len(response.context["page"].object_list) > 1


def test_the_timeline_is_paginated(technician_client, on_job, technician, wrench):
    install = latest_stage(on_job, Stage.Kind.FIRST_INSTALL)
    termination = on_job.circuits.first().terminations.order_by("pk").first()
    for _ in range(30):  # one event per reading
        read(termination, install, "10", technician=technician, wrench=wrench)
    total = AuditEvent.objects.filter(job=on_job).count()
    assert total == 30
    url = reverse("job_timeline", args=[on_job.number])
    second = technician_client.get(url, {"page": 2})
    assert len(second.context["page"].object_list) == total - 25
    assert technician_client.get(url, {"page": "NaN"}).status_code == 200


def test_a_timeline_page_asked_for_by_htmx_is_the_events_region(technician_client, on_job):
    response = technician_client.get(
        reverse("job_timeline", args=[on_job.number]), HTTP_HX_REQUEST="true"
    )
    page = text(response)
    assert 'id="timeline-events"' in page and "<html" not in page


def test_nothing_in_the_timeline_for_another_persona_changes(on_job):
    # Reading a page writes nothing: the trail is as long after as before.
    before = AuditEvent.objects.count()
    client = Client()
    client.force_login(make_user(roles.OFFICE))
    client.get(reverse("job_timeline", args=[on_job.number]))
    client.get(reverse("job_review", args=[on_job.number]))
    assert AuditEvent.objects.count() == before
