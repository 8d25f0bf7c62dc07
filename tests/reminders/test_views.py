"""The office's "Re-checks due" page: leads and office read it, technicians are refused;
each due vehicle with its owner, last approved job, due date in words and reminder."""

from __future__ import annotations

import csv
import io

import pytest
from django.urls import reverse
from django.utils import timezone

from reminders.models import ReminderSent
from reminders.queries import recheck_for_vehicle
from tests.factories import make_owner, make_vehicle
from tests.reminders.factories import approval_due_in, approved_job

pytestmark = pytest.mark.django_db
URL = reverse("rechecks_due")


@pytest.fixture
def due(technician, lead, wrench):
    """Three vehicles: one 12 days overdue (reminded), one due in about a week
    (owner without e-mail), one not due for half a year."""
    people = {"technician": technician, "lead": lead, "wrench": wrench}
    overdue = approved_job(
        **people,
        vehicle=make_vehicle(make_owner(name="Marla Quint", email="marla@test.example")),
        approved_at=approval_due_in(-12),
    )
    soon = approved_job(
        **people,
        vehicle=make_vehicle(make_owner(name="Per Osgood", email="", phone="555 0199")),
        approved_at=approval_due_in(7),
    )
    later = approved_job(**people, approved_at=approval_due_in(180))
    due_on = recheck_for_vehicle(overdue.vehicle).due_on
    ReminderSent.objects.create(job=overdue, due_on=due_on, sent_to="marla@test.example")
    return {"overdue": overdue, "soon": soon, "later": later}


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(URL)
    assert response.status_code == 302
    assert reverse("login") in response["Location"]


def test_technicians_are_refused(technician_client):
    assert technician_client.get(URL).status_code == 403


def test_office_sees_the_due_and_overdue_vehicles_soonest_first(office_client, due):
    response = office_client.get(URL)
    assert response.status_code == 200
    html = response.content.decode()
    assert due["overdue"].number in html and due["soon"].number in html
    assert due["later"].number not in html  # outside the 30 days
    assert html.index(due["overdue"].number) < html.index(due["soon"].number)
    assert "Overdue by 12 days" in html
    assert "Marla Quint" in html and "Per Osgood" in html
    sent = ReminderSent.objects.get(job=due["overdue"])
    assert f"Sent {timezone.localtime(sent.sent_at):%-d %b %Y}" in html
    assert "No e-mail address: call the owner" in html
    assert 'href="' + reverse("rechecks_due") + '"' in html  # the navigation link


def test_leads_read_it_too_and_can_widen_the_window(lead_client, due):
    html = lead_client.get(URL, {"window": "all"}).content.decode()
    assert due["later"].number in html


def test_filters_overdue_not_reminded_and_search(office_client, due):
    html = office_client.get(URL, {"window": "overdue"}).content.decode()
    assert due["overdue"].number in html and due["soon"].number not in html
    html = office_client.get(URL, {"reminded": "no"}).content.decode()
    assert due["soon"].number in html and due["overdue"].number not in html
    html = office_client.get(URL, {"q": "osgood"}).content.decode()
    assert due["soon"].number in html and due["overdue"].number not in html


def test_unknown_filter_values_fall_back_to_the_default_window(office_client, due):
    response = office_client.get(URL, {"window": "<script>", "reminded": "maybe"})
    assert response.status_code == 200
    assert due["overdue"].number in response.content.decode()


def test_htmx_gets_only_the_results(office_client, due):
    response = office_client.get(URL, {"window": "all"}, HTTP_HX_REQUEST="true")
    html = response.content.decode()
    assert html.lstrip().startswith('<div id="rc-results">')
    assert "<html" not in html


def test_the_csv_holds_what_the_page_shows(office_client, due):
    response = office_client.get(URL, {"format": "csv"})
    assert response["Content-Type"].startswith("text/csv")
    rows = list(csv.DictReader(io.StringIO(response.content.decode())))
    assert [r["job"] for r in rows] == [due["overdue"].number, due["soon"].number]
    assert rows[0]["due"] == "overdue by 12 days"
    assert rows[0]["reminded at address"] == "marla@test.example"
    assert rows[1]["owner phone"] == "555 0199"


def test_technicians_have_no_navigation_link(technician_client):
    html = technician_client.get(reverse("job_list")).content.decode()
    assert 'href="' + reverse("rechecks_due") + '"' not in html


@pytest.mark.parametrize(
    "query",
    [
        {"q": '<script>alert("x")</script>'},
        {"q": "x" * 500},
        {"window": "9" * 40},
        {"reminded": "\u202e"},
        {"format": "pdf"},
    ],
)
def test_hostile_filters_never_fail_and_come_back_escaped(office_client, query):
    response = office_client.get(URL, query)
    assert response.status_code == 200
    assert "<script>alert" not in response.content.decode()
