"""E-mail the owners whose vehicle is due for its re-check.

    python manage.py send_reminders [--days 30] [--dry-run]

Run it daily from cron. An owner is mailed once per due date (reminders.services): a
second run sends nothing new; a due date that moves (the job approved again, the shop's
interval changed) is reminded again. Owners without an e-mail address are listed as
skipped, for the office to call.

Exit status: 0 when every due reminder was sent (or there was none), 1 when the mail
server refused at least one (listed on stderr; the next run tries again), 2 for bad
arguments (one line on stderr)."""

from __future__ import annotations

import argparse
import sys
from typing import Any, NoReturn

from django.core.management.base import BaseCommand, CommandError, CommandParser
from django.utils import timezone

from reminders.queries import DEFAULT_WINDOW_DAYS, Recheck
from reminders.services import MAX_DAYS, reminders_send

EXIT_OK, EXIT_FAILED, EXIT_BAD_INPUT = 0, 1, 2


def _one_line(message: str) -> str:
    return "".join(ch if ch.isprintable() or ch == " " else ascii(ch)[1:-1] for ch in message)


def _days(text: str) -> int:
    if not text.strip().isdigit() or not 0 <= int(text) <= MAX_DAYS:
        raise argparse.ArgumentTypeError(
            f"--days takes a whole number of days from 0 to {MAX_DAYS}, not {text!r}"
        )
    return int(text)


def _line(entry: Recheck, today) -> str:
    owner = entry.vehicle.owner
    return (
        f"{entry.job.number} · {owner.name}{f' <{owner.email}>' if owner.email else ''}"
        f" · {entry.vehicle} · due {entry.due_on:%Y-%m-%d} ({entry.words(today)})"
    )


class Command(BaseCommand):
    help = (
        "E-mail owners whose vehicle is due for its re-check within --days days (or"
        " overdue) and who were not yet reminded of that due date."
    )

    def create_parser(self, prog_name: str, subcommand: str, **kwargs: Any) -> CommandParser:
        parser = super().create_parser(prog_name, subcommand, **kwargs)

        def error(message: str) -> NoReturn:
            # argparse would print its usage first; one line says what is wrong.
            if parser.called_from_command_line:
                self.stderr.write(f"send_reminders: {_one_line(message)}")
                sys.exit(EXIT_BAD_INPUT)
            raise CommandError(f"Error: {_one_line(message)}", returncode=EXIT_BAD_INPUT)

        parser.error = error  # type: ignore[method-assign]
        parser.epilog = (
            "Exit status: 0 all sent (or none due), 1 the mail server refused some (the next"
            " run tries again), 2 bad arguments."
        )
        return parser

    def add_arguments(self, parser: CommandParser) -> None:
        parser.add_argument(
            "--days",
            type=_days,
            default=DEFAULT_WINDOW_DAYS,
            help=f"lead time: remind this many days before the due date (default"
            f" {DEFAULT_WINDOW_DAYS}); overdue vehicles are always included",
        )
        parser.add_argument(
            "--dry-run", action="store_true", help="list who would be mailed; send nothing"
        )

    def handle(self, *args, days: int, dry_run: bool, **options) -> None:
        today = timezone.localdate()
        outcome = reminders_send(days=days, today=today, dry_run=dry_run)
        for entry in outcome.would_send:
            self.stdout.write(f"would send: {_line(entry, today)}")
        for entry in outcome.sent:
            self.stdout.write(f"sent: {_line(entry, today)}")
        for entry in outcome.no_email:
            self.stdout.write(f"skipped, no e-mail address: {_line(entry, today)}")
        for entry in outcome.already:
            self.stdout.write(f"already reminded: {_line(entry, today)}")
        for entry, why in outcome.failed:
            self.stderr.write(_one_line(f"not sent: {_line(entry, today)}: {why}"))
        verb = "would send" if dry_run else "sent"
        count = len(outcome.would_send) if dry_run else len(outcome.sent)
        self.stdout.write(
            f"{verb} {count}, skipped {len(outcome.no_email)} without e-mail,"
            f" {len(outcome.already)} already reminded, {len(outcome.failed)} failed"
            f" (due within {days} days or overdue)."
        )
        if outcome.failed:
            sys.exit(EXIT_FAILED)
