"""Check a wiring record PDF: was it issued by this shop, and is it unchanged since?

    python manage.py verify_record record.pdf

Exit status 0 only for an unchanged record issued by this shop (the verdict on stdout);
otherwise exit status 1 and one line on stderr saying why, in plain words."""

from __future__ import annotations

import sys
from pathlib import Path

from django.core.management.base import BaseCommand

from shop.management.one_line import OneLineArgumentErrors
from wiring.verify import MAX_BYTES, too_large, verify_pdf


class Command(OneLineArgumentErrors, BaseCommand):
    help = "Check that a wiring record PDF was issued by this shop and is unchanged."

    def add_arguments(self, parser) -> None:
        parser.add_argument("file", metavar="FILE.pdf")

    def handle(self, *args, file: str, **options) -> None:
        path = Path(file)
        try:
            size = path.stat().st_size
            verdict = too_large() if size > MAX_BYTES else verify_pdf(path.read_bytes())
        except OSError as error:
            name = " ".join(file.split())  # one line, even for a name with line breaks
            self.stderr.write(f"Cannot read {name}: {error.strerror or error}")
            sys.exit(1)
        if not verdict.ok:
            self.stderr.write(verdict.headline)
            sys.exit(1)
        self.stdout.write(verdict.headline)
