"""manage.py import_record FILE.pdf: a new job from a wiring record's embedded data."""

from __future__ import annotations

import sys

from django.core.management.base import BaseCommand

from wiring.importing import RecordImportError, import_record_file


class Command(BaseCommand):
    help = (
        "Create a new job from a wiring record PDF (its embedded record.json and "
        "schedule.csv): the owner and vehicle (matched by identification, else created), "
        "devices, terminals, circuits and terminations. Prints the new job number. "
        "Exit 0 on success; 1 with one line on stderr when the file cannot be imported."
    )

    def add_arguments(self, parser):
        parser.add_argument("file", help="The wiring record PDF.")

    def handle(self, *args, **options):
        try:
            with open(options["file"], "rb") as handle:
                data = handle.read()
            job = import_record_file(data)
        except OSError as exc:
            self._fail(f"Cannot read {options['file']}: {exc.strerror or exc}.")
        except RecordImportError as exc:
            self._fail(str(exc))
        self.stdout.write(job.number)

    def _fail(self, message: str) -> None:
        sys.stderr.write(f"import_record: {message}\n")
        raise SystemExit(1)
