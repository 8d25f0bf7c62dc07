"""Write a job's wiring record to a file.

    python manage.py render_record JOB-2026-0001 -o record.pdf [--base-url https://shop.example]

An approved job gets its signed record: the stored revision of its current approval,
issued now (and stored, like the approval would) if there is none yet. Any other job
gets a draft, watermarked "DRAFT — not a signed record", which is not stored. A job
that does not exist, or a failure, is one line on stderr and exit status 1."""

from __future__ import annotations

from pathlib import Path

from django.core.exceptions import ValidationError
from django.core.management.base import BaseCommand, CommandError
from django.utils import timezone

from inspections.services import job_is_locked
from shop.management.one_line import OneLineArgumentErrors
from shop.models import Job
from wiring import signing
from wiring.services import record_issue, verify_url_for


class Command(OneLineArgumentErrors, BaseCommand):
    help = "Write a job's wiring record (signed when approved, a draft otherwise) to a PDF."

    def add_arguments(self, parser) -> None:
        parser.add_argument("number", metavar="JOB-NUMBER")
        parser.add_argument("-o", "--output", required=True, metavar="FILE.pdf")
        parser.add_argument("--base-url", default="", help="Printed before the verify address.")

    def handle(self, *args, number: str, output: str, base_url: str = "", **options) -> None:
        job = Job.objects.select_related("vehicle__owner").filter(number=number).first()
        if job is None:
            raise CommandError(f"There is no job {number}.")
        try:
            if job_is_locked(job):
                revision = record_issue(job=job, by=None, base_url=base_url)
                with revision.file.open("rb") as handle:
                    data = handle.read()
                what = f"signed revision {revision.number}"
            else:
                from wiring.render import render_record_pdf

                data = render_record_pdf(
                    job,
                    revision=None,
                    draft=True,
                    verify_url=verify_url_for(job.number, None, base_url),
                    issued_at=timezone.now(),
                )
                what = "draft (the job is not approved)"
        except ValidationError as error:
            raise CommandError(" ".join(error.messages)) from None
        except signing.SigningError as error:
            raise CommandError(str(error)) from None
        try:
            Path(output).write_bytes(data)
        except OSError as error:
            raise CommandError(f"Cannot write {output}: {error.strerror}") from None
        self.stdout.write(f"{job.number}: {what} written to {output}")
