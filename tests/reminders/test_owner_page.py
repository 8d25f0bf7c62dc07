"""The owner's private link page shows the vehicle's next re-check and why it is sooner
after connections were found loose."""

from __future__ import annotations

import datetime

import pytest
from django.utils import timezone

from reminders.dates import add_months, long_date
from tests.factories import make_job
from tests.reminders.factories import approved_job
from wiring.services import owner_link_create, owner_link_url

pytestmark = pytest.mark.django_db


def _open(client, job, office) -> str:
    expires = timezone.localdate() + datetime.timedelta(days=30)
    _, token = owner_link_create(job=job, by=office, expires_on=expires)
    response = client.get(owner_link_url(token))
    assert response.status_code == 200
    return response.content.decode()


def test_the_owner_sees_the_next_due_date(anon_client, technician, lead, wrench, office):
    moment = timezone.make_aware(datetime.datetime(2026, 3, 14, 12))
    job = approved_job(technician=technician, lead=lead, wrench=wrench, approved_at=moment)
    html = _open(anon_client, job, office)
    # 14 March 2026 + 12 months (the shop's default interval).
    due = add_months(datetime.date(2026, 3, 14), 12)
    if due >= timezone.localdate():
        assert f"Next re-check due by {long_date(due)}." in html
    else:
        assert f"The re-check was due by {long_date(due)}: please book it" in html
    assert "re-checks every system 12 months after its approval" in html


def test_found_loose_connections_are_the_reason_for_a_sooner_date(
    anon_client, technician, lead, wrench, office
):
    job = approved_job(technician=technician, lead=lead, wrench=wrench, loose=3)
    html = _open(anon_client, job, office)
    due = add_months(timezone.localdate(), 6)  # approved today, 6 months after found loose
    assert f"Next re-check due by {long_date(due)}." in html
    assert "3 connections were found loose at the retorque" in html
    assert "after 6 months" in html


def test_no_due_date_before_approval(anon_client, office):
    job = make_job()
    html = _open(anon_client, job, office)
    assert "re-check due by" not in html
