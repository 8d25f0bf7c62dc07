"""Job page: header with owner, vehicle and people; places for later sections."""

from __future__ import annotations

import pytest

from tests.factories import make_job, make_owner, make_vehicle

pytestmark = pytest.mark.django_db


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(make_job().get_absolute_url())
    assert response.status_code == 302


def test_unknown_job_is_404(technician_client):
    assert technician_client.get("/jobs/NOPE-2026-9999/").status_code == 404


def test_technician_sees_header_and_sections(technician_client, technician, lead):
    owner = make_owner(name="Hollis Testowner")
    job = make_job(make_vehicle(owner, identification="1M8GDM9AXKP042788"), lead=lead)
    job.technicians.add(technician)
    body = technician_client.get(job.get_absolute_url()).content.decode()
    for text in [
        job.number,
        "Hollis Testowner",
        "1M8GDM9AXKP042788",
        "Test Lead",
        "Test Technician",
        'id="circuits"',
        'id="checklist"',
        'id="records"',
    ]:
        assert text in body, text
    # Technicians cannot edit jobs, so no edit link is offered.
    assert "Edit job" not in body


def test_lead_is_offered_the_edit_link(lead_client):
    job = make_job()
    assert "Edit job" in lead_client.get(job.get_absolute_url()).content.decode()
