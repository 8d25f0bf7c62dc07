"""manage.py import_record FILE.pdf: a new job from a wiring record's embedded data."""

from __future__ import annotations

import sys

from django.core.management.base import BaseCommand

from shop.management.one_line import OneLineArgumentErrors
from wiring.importing import RecordImportError, import_record_file


class Command(OneLineArgumentErrors, BaseCommand):
    help = (
        "Create a new job from a wiring record PDF (its embedded record.json and "
        "schedule.csv): the owner and vehicle (matched by identification, else created), "
        "devices, terminals, circuits and terminations. With --return-visit the job is a "
        "return visit (its re-check open first) with the record's final torque readings "
        "kept beside each termination; without it, a rework job as before (the choice is "
        "the shop's: a vehicle already known here is not made a return visit silently). "
        "Prints the new job number. "
        "Exit 0 on success; 1 with one line on stderr when the file cannot be imported."
    )

    def add_arguments(self, parser):
        parser.add_argument("file", help="The wiring record PDF.")
        parser.add_argument(
            "--return-visit",
            action="store_true",
            help="Make the job a return visit: re-check first, the record's last readings kept.",
        )

    def handle(self, *args, **options):
        try:
            with open(options["file"], "rb") as handle:
                data = handle.read()
            job = import_record_file(data, return_visit=options["return_visit"])
        except OSError as exc:
            self._fail(f"Cannot read {options['file']}: {exc.strerror or exc}.")
        except RecordImportError as exc:
            self._fail(str(exc))
        self.stdout.write(job.number)

    def _fail(self, message: str) -> None:
        # One line whatever the record held (its names may carry line breaks).
        sys.stderr.write(f"import_record: {' '.join(message.split())}\n")
        raise SystemExit(1)
