"""Each approved job's re-check due date: the approval's date plus the shop's interval,
sooner after connections found loose at retorque; one per vehicle, from its newest
approval; cleared once a return visit has re-checked it."""

from __future__ import annotations

import datetime

import pytest
from django.utils import timezone

from inspections.models import Stage
from inspections.services import job_reopen
from reminders.queries import due_within, recheck_for_vehicle, rechecks
from shop.models import Job, ShopProfile
from tests.factories import make_job, make_vehicle
from tests.reminders.factories import approved_job

pytestmark = pytest.mark.django_db


def at(year: int, month: int, day: int, hour: int = 12) -> datetime.datetime:
    return timezone.make_aware(datetime.datetime(year, month, day, hour))


@pytest.fixture
def people(technician, lead, wrench):
    return {"technician": technician, "lead": lead, "wrench": wrench}


def test_a_clean_job_is_due_the_shops_interval_after_its_approval(people):
    job = approved_job(**people, approved_at=at(2026, 3, 14))
    [entry] = rechecks()
    assert entry.job == job
    assert entry.months == 12  # the shop profile's default
    assert entry.due_on == datetime.date(2027, 3, 14)
    assert entry.due_long == "14 March 2027"
    assert not entry.sooner
    assert entry.why == "The shop re-checks every system 12 months after its approval."


def test_a_month_end_approval_is_due_at_the_end_of_the_shorter_month(people):
    profile = ShopProfile.load()
    profile.recheck_months = 1
    profile.save()
    approved_job(**people, approved_at=at(2026, 1, 31))
    # Gregorian calendar: February 2026 has 28 days (ISO 8601); end-of-month clamping,
    # common practice.
    assert rechecks()[0].due_on == datetime.date(2026, 2, 28)


def test_connections_found_loose_at_retorque_bring_the_due_date_forward(people):
    approved_job(**people, loose=2, approved_at=at(2026, 8, 31))
    [entry] = rechecks()
    assert entry.found_loose == 2
    assert entry.months == 6  # recheck_months_after_loose's default
    assert entry.due_on == datetime.date(2027, 2, 28)
    assert entry.sooner
    assert entry.why.startswith("2 connections were found loose at the retorque")


def test_a_found_loose_reading_corrected_away_no_longer_counts(people):
    approved_job(**people, loose=2, loose_withdrawn=1, approved_at=at(2026, 3, 14))
    assert rechecks()[0].found_loose == 1
    approved_job(**people, loose=1, loose_withdrawn=1, approved_at=at(2026, 3, 14))
    assert sorted(e.found_loose for e in rechecks()) == [0, 1]


def test_a_job_not_yet_approved_has_no_due_date(people):
    job = make_job()
    assert job.status != Job.Status.APPROVED
    assert rechecks() == []


def test_a_reopened_job_has_no_due_date_until_approved_again(people):
    job = approved_job(**people, approved_at=at(2026, 3, 14))
    job_reopen(job=job, lead=people["lead"], reason="Customer asked for a second outlet")
    assert rechecks() == []


def test_the_vehicles_newest_approval_sets_its_one_due_date(people):
    vehicle = make_vehicle()
    approved_job(**people, vehicle=vehicle, approved_at=at(2025, 5, 1))
    newer = approved_job(**people, vehicle=vehicle, approved_at=at(2026, 2, 10))
    other = approved_job(**people, approved_at=at(2026, 1, 5))
    entries = rechecks()
    assert [e.job for e in entries] == [newer, other][::-1]  # soonest first
    assert recheck_for_vehicle(vehicle).job == newer
    assert recheck_for_vehicle(vehicle).due_on == datetime.date(2027, 2, 10)


def _return_visit(job, *, recheck_state: str) -> Job:
    visit = make_job(vehicle=job.vehicle)
    Job.objects.filter(pk=visit.pk).update(kind=Job.Kind.RETURN_VISIT, follows=job)
    Stage.objects.create(job=visit, kind=Stage.Kind.RECHECK, state=recheck_state)
    return Job.objects.get(pk=visit.pk)


def test_a_return_visit_that_signed_its_recheck_clears_the_due_date(people):
    job = approved_job(**people, approved_at=at(2026, 3, 14))
    _return_visit(job, recheck_state=Stage.State.SIGNED)
    assert rechecks() == []
    assert recheck_for_vehicle(job.vehicle) is None


def test_a_return_visit_still_at_its_recheck_leaves_the_vehicle_due_and_shows_it_in_the_shop(
    people,
):
    job = approved_job(**people, approved_at=at(2026, 3, 14))
    visit = _return_visit(job, recheck_state=Stage.State.OPEN)
    [entry] = rechecks()
    assert entry.job == job
    assert entry.in_shop == visit


def test_a_return_visit_of_another_job_does_not_clear_the_newer_one(people):
    vehicle = make_vehicle()
    older = approved_job(**people, vehicle=vehicle, approved_at=at(2025, 5, 1))
    newer = approved_job(**people, vehicle=vehicle, approved_at=at(2026, 2, 10))
    _return_visit(older, recheck_state=Stage.State.SIGNED)
    assert [e.job for e in rechecks()] == [newer]


def test_the_window_takes_the_overdue_and_those_due_within_it(people):
    overdue = approved_job(**people, approved_at=at(2025, 1, 10))  # due 10 Jan 2026
    soon = approved_job(**people, approved_at=at(2025, 3, 1))  # due 1 Mar 2026
    later = approved_job(**people, approved_at=at(2025, 6, 1))  # due 1 Jun 2026
    today = datetime.date(2026, 2, 14)
    entries = rechecks()
    assert [e.job for e in due_within(entries, days=30, today=today)] == [overdue, soon]
    assert [e.job for e in due_within(entries, days=120, today=today)] == [overdue, soon, later]
    assert entries[0].words(today) == "overdue by 35 days"
    assert entries[1].words(today) == "due in 15 days"
