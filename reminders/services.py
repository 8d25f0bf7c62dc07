"""Sending the re-check reminders (`manage.py send_reminders` calls `reminders_send`).

Idempotent by the database, not by a check: each reminder is one ReminderSent row,
unique on (job, due date), inserted in the same transaction in which the e-mail is handed
to the mail server. Two runs at once: the second insert waits for the first (PostgreSQL's
unique index; SQLite runs one writer at a time) and then fails, and that owner is
counted as "already reminded". A mail server that refuses the message rolls the row back,
so the next run tries again. The mail connection is opened before any transaction, so a
transaction holds only the hand-over of one message.

The owner's private link: only its SHA-256 is stored (wiring.services), so an existing
link's address cannot be put into a mail, and a cron job must not make new links behind
the office's back. The mail therefore names the link the office already sent (to which
address, when, and until when it works), or, when the job has no usable link, asks the
owner to ask the shop for one. The office makes and sends links on the job's owner-links
page as before."""

from __future__ import annotations

import datetime
from dataclasses import dataclass, field

from django.conf import settings
from django.core.mail import EmailMessage, get_connection
from django.db import IntegrityError, transaction
from django.utils import timezone

from reminders.dates import long_date
from reminders.models import ReminderSent
from reminders.queries import Recheck, due_within, rechecks
from shop.models import ShopProfile
from wiring.models import OwnerLink

MAX_DAYS = 366


@dataclass
class Outcome:
    """What one run did, per due vehicle."""

    sent: list[Recheck] = field(default_factory=list)
    would_send: list[Recheck] = field(default_factory=list)  # --dry-run
    already: list[Recheck] = field(default_factory=list)
    no_email: list[Recheck] = field(default_factory=list)
    failed: list[tuple[Recheck, str]] = field(default_factory=list)


def usable_link(entry: Recheck) -> OwnerLink | None:
    """The job's newest link that still opens (not revoked, not expired)."""
    for link in OwnerLink.objects.filter(job=entry.job, revoked_at__isnull=True):
        if link.is_usable:
            return link
    return None


def _link_paragraph(entry: Recheck) -> str:
    link = usable_link(entry)
    if link is None:
        return (
            "If you would like the wiring record at hand for the visit, ask us"
            " for a private link to it: we make one for you on request."
        )
    sent = (
        f" we e-mailed to {link.last_sent_to} on {long_date(timezone.localdate(link.last_sent_at))}"
        if link.last_sent_at and link.last_sent_to
        else " we gave you"
    )
    return (
        f"Your wiring record is on the private link{sent}; it works until"
        f" {long_date(link.expires_on)}. For your safety this e-mail does not repeat it:"
        " if you cannot find it, ask us for a new one."
    )


def reminder_message(entry: Recheck, *, today: datetime.date, shop: ShopProfile) -> EmailMessage:
    vehicle = entry.vehicle
    owner = vehicle.owner
    when = (
        f"was due for its re-check on {entry.due_long}"
        if entry.due_on < today
        else f"is due for its re-check by {entry.due_long}"
    )
    contact = " or ".join(part for part in (shop.phone, shop.email) if part)
    book = f" or contact us on {contact}" if contact else ""
    body = (
        f"Hello {owner.name},\n\n"
        f"The electrical system we installed in your {vehicle} (job {entry.job.number},"
        f" approved on {long_date(entry.approved_on)}) {when}.\n\n"
        f"{entry.why}\n\n"
        "At the re-check we measure every bolted connection as we find it, before"
        " re-tightening anything, and look for heat and wear: connections work loose with"
        " vibration and temperature changes, and a loose one heats up and can start a fire.\n\n"
        f"{_link_paragraph(entry)}\n\n"
        f"To book the visit, reply to this e-mail{book}.\n\n"
        "The re-check supports, and never replaces, the applicable standards, local codes and"
        " the judgement of a qualified person.\n\n"
        f"{shop.name}\n"
    )
    return EmailMessage(
        subject=f"Your {vehicle} is due for its electrical re-check",
        body=body,
        from_email=settings.DEFAULT_FROM_EMAIL,
        to=[owner.email],
        reply_to=[shop.email] if shop.email else None,
    )


def reminders_send(
    *, days: int, today: datetime.date | None = None, dry_run: bool = False
) -> Outcome:
    """E-mail every owner whose vehicle is due within `days` days (or overdue) and who was
    not yet reminded of that due date; see the module docstring. `dry_run` writes and
    sends nothing and lists who would be mailed."""
    if isinstance(days, bool) or not isinstance(days, int) or not 0 <= days <= MAX_DAYS:
        raise ValueError(f"days must be a whole number from 0 to {MAX_DAYS}")
    today = today or timezone.localdate()
    shop = ShopProfile.load()
    outcome = Outcome()
    due = due_within(rechecks(profile=shop), days=days, today=today)
    pending = []
    for entry in due:
        if entry.reminded is not None:
            outcome.already.append(entry)
        elif not entry.vehicle.owner.email:
            outcome.no_email.append(entry)
        elif dry_run:
            outcome.would_send.append(entry)
        else:
            pending.append(entry)
    if not pending:
        return outcome
    connection = get_connection()
    try:
        connection.open()
    except Exception as error:  # SMTP failures are OSError or smtplib.SMTPException
        outcome.failed.extend((entry, f"mail server: {error}") for entry in pending)
        return outcome
    try:
        for entry in pending:
            _send_one(entry, today=today, shop=shop, connection=connection, outcome=outcome)
    finally:
        connection.close()
    return outcome


def _send_one(entry: Recheck, *, today, shop, connection, outcome: Outcome) -> None:
    message = reminder_message(entry, today=today, shop=shop)
    message.connection = connection
    try:
        with transaction.atomic():
            ReminderSent.objects.create(
                job=entry.job, due_on=entry.due_on, sent_to=entry.vehicle.owner.email
            )
            # Raises on refusal, which rolls the row back: the next run tries again.
            message.send(fail_silently=False)
    except IntegrityError:
        outcome.already.append(entry)  # another run reminded this owner meanwhile
    except Exception as error:
        outcome.failed.append((entry, str(error) or type(error).__name__))
    else:
        outcome.sent.append(entry)
