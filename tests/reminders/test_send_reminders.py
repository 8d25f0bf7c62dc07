"""`manage.py send_reminders`: one e-mail per owner and due date however often it runs, a
new one when the due date moves; owners without e-mail listed as skipped; --dry-run sends
and writes nothing; bad arguments exit 2 with one line on stderr."""

from __future__ import annotations

import datetime
import io

import pytest
from django.core import mail
from django.core.management import call_command
from django.core.management.base import CommandError
from django.db import IntegrityError, connection, transaction
from django.utils import timezone

from inspections.models import AppendOnlyError
from reminders.management.commands.send_reminders import Command
from reminders.models import ReminderSent
from shop.models import ShopProfile
from tests.factories import make_owner, make_vehicle
from tests.reminders.factories import approval_due_in as due_in
from tests.reminders.factories import approved_job
from wiring.services import owner_link_create

pytestmark = pytest.mark.django_db


@pytest.fixture
def people(technician, lead, wrench):
    return {"technician": technician, "lead": lead, "wrench": wrench}


def run(*args: str) -> str:
    out = io.StringIO()
    call_command("send_reminders", *args, stdout=out, stderr=io.StringIO())
    return out.getvalue()


def test_running_twice_sends_one_mail(people):
    owner = make_owner(name="Wren Halloway", email="wren@test.example")
    job = approved_job(**people, vehicle=make_vehicle(owner), approved_at=due_in(10))
    first = run()
    assert len(mail.outbox) == 1
    assert mail.outbox[0].to == ["wren@test.example"]
    assert job.number in mail.outbox[0].body
    assert f"sent: {job.number}" in first
    second = run()
    assert len(mail.outbox) == 1
    assert f"already reminded: {job.number}" in second
    assert ReminderSent.objects.filter(job=job).count() == 1


def test_a_new_due_date_is_reminded_again(people):
    job = approved_job(**people, approved_at=due_in(10))
    run()
    # The shop shortens its interval: the due date moves a month earlier (overdue now).
    profile = ShopProfile.load()
    profile.recheck_months = 11
    profile.save()
    run()
    assert len(mail.outbox) == 2
    assert ReminderSent.objects.filter(job=job).count() == 2
    assert "was due for its re-check on" in mail.outbox[1].body


def test_only_vehicles_due_within_the_lead_time_are_mailed(people):
    near = approved_job(**people, approved_at=due_in(20))
    far = approved_job(**people, approved_at=due_in(45))
    overdue = approved_job(**people, approved_at=due_in(-3))
    run("--days", "30")
    mailed = {m.body.split("(job ")[1].split(",")[0] for m in mail.outbox}
    assert mailed == {near.number, overdue.number}
    run("--days", "60")
    assert ReminderSent.objects.filter(job=far).exists()


def test_owners_without_e_mail_are_listed_as_skipped(people):
    owner = make_owner(name="Ivo Brack", email="", phone="555 0100")
    job = approved_job(**people, vehicle=make_vehicle(owner), approved_at=due_in(5))
    out = run()
    assert mail.outbox == []
    assert f"skipped, no e-mail address: {job.number} · Ivo Brack" in out
    assert not ReminderSent.objects.exists()  # mailed once an address is added


def test_a_dry_run_sends_and_writes_nothing(people):
    job = approved_job(**people, approved_at=due_in(5))
    out = run("--dry-run")
    assert f"would send: {job.number}" in out
    assert mail.outbox == []
    assert not ReminderSent.objects.exists()


def test_the_mail_says_when_why_and_names_no_private_address(people):
    job = approved_job(**people, loose=1, approved_at=due_in(-200))
    run()
    body = mail.outbox[0].body
    assert "1 connection was found loose" in body
    assert "after 6 months" in body
    assert "ask us for a private link" in body
    assert "never replaces, the applicable standards" in body
    assert "/o/" not in body
    assert job.number in mail.outbox[0].body


def test_an_existing_link_is_named_but_its_address_is_not_repeated(people, office):
    job = approved_job(**people, approved_at=due_in(5))
    expires = timezone.localdate() + datetime.timedelta(days=300)
    link, token = owner_link_create(job=job, by=office, expires_on=expires)
    run()
    body = mail.outbox[0].body
    assert token not in body
    assert f"works until {expires.day} {expires:%B %Y}" in body


def test_a_refused_mail_is_not_logged_and_is_tried_again(people, settings):
    job = approved_job(**people, approved_at=due_in(5))
    settings.EMAIL_BACKEND = "tests.reminders.refusing_backend.RefusingBackend"
    err = io.StringIO()
    with pytest.raises(SystemExit) as exit_:
        call_command("send_reminders", stdout=io.StringIO(), stderr=err)
    assert exit_.value.code == 1
    assert f"not sent: {job.number}" in err.getvalue()
    assert not ReminderSent.objects.exists()
    settings.EMAIL_BACKEND = "django.core.mail.backends.locmem.EmailBackend"
    run()
    assert len(mail.outbox) == 1


@pytest.mark.parametrize("argv", [["--days", "x"], ["--days", "-3"], ["--days", "999"], ["--now"]])
def test_bad_arguments_exit_2_with_one_line_on_stderr(argv, capsys):
    with pytest.raises(SystemExit) as exit_:
        Command().run_from_argv(["manage.py", "send_reminders", *argv])
    assert exit_.value.code == 2
    err = capsys.readouterr().err
    assert err.startswith("send_reminders: ")
    assert err.count("\n") == 1


def test_bad_arguments_from_code_raise_a_command_error():
    with pytest.raises(CommandError):
        call_command("send_reminders", "--days", "soon")


def test_the_log_holds_one_row_per_job_and_due_date(people):
    job = approved_job(**people, approved_at=due_in(5))
    due = timezone.localdate()
    ReminderSent.objects.create(job=job, due_on=due, sent_to="a@test.example")
    with pytest.raises(IntegrityError), transaction.atomic():
        ReminderSent.objects.create(job=job, due_on=due, sent_to="b@test.example")


def test_the_log_is_append_only_in_python_and_in_the_database(people):
    job = approved_job(**people, approved_at=due_in(5))
    row = ReminderSent.objects.create(job=job, due_on=timezone.localdate(), sent_to="a@t.example")
    with pytest.raises(AppendOnlyError):
        row.save()
    with pytest.raises(AppendOnlyError):
        ReminderSent.objects.filter(pk=row.pk).delete()
    table = ReminderSent._meta.db_table
    for sql in (f'UPDATE "{table}" SET sent_to = %s', f'DELETE FROM "{table}"'):
        params = ["x@t.example"] if sql.startswith("UPDATE") else []
        with (
            pytest.raises(Exception, match="append-only"),
            transaction.atomic(),
            connection.cursor() as cursor,
        ):
            cursor.execute(sql, params)
    assert ReminderSent.objects.get(pk=row.pk).sent_to == "a@t.example"
