"""manage.py backup DIR: a consistent copy of the database (SQLite's online backup API, or
pg_dump with DATABASE_URL), the media store and a manifest, while the app keeps running.

Exit 0 when the backup is complete; 2 when DIR cannot be used (not new or empty), 1 when
the backup failed (one line on stderr; a half-made backup is removed)."""

from __future__ import annotations

import sys
from pathlib import Path

from django.core.management.base import BaseCommand
from django.db import DatabaseError

from shop.backup import REFUSED, BackupError, counts_text, make_backup, manifest_digest, megabytes
from shop.management.one_line import OneLineArgumentErrors


class Command(OneLineArgumentErrors, BaseCommand):
    help = (
        "Back up the database, the media files (photos, signed records) and a manifest with"
        " each file's SHA-256 into DIR, which must be new or empty. The signing key is left"
        " out unless --include-signing-key. Safe while the app is in use."
    )

    def add_arguments(self, parser) -> None:
        parser.add_argument("directory", metavar="DIR", help="A new or empty folder.")
        parser.add_argument(
            "--include-signing-key",
            action="store_true",
            help="Also copy the record-signing key (secret: keep the backup as safe as the key).",
        )

    def handle(self, *args, directory: str, include_signing_key: bool, **options) -> None:
        try:
            result = make_backup(Path(directory), include_signing_key=include_signing_key)
        except BackupError as error:
            self._fail(str(error), error.status)
        except (OSError, DatabaseError) as error:
            self._fail(f"The backup failed: {error}", REFUSED)
        manifest = result.manifest
        vendor = {"sqlite": "SQLite", "postgresql": "PostgreSQL"}[manifest.vendor]
        self.stdout.write(
            f"Backed up to {result.directory}: {vendor} database"
            f" ({megabytes(result.database_bytes)}), {result.media_files:,} media files"
            f" ({megabytes(result.media_bytes)}); {counts_text(manifest.counts)}."
        )
        self.stdout.write(f"Manifest SHA-256: {manifest_digest(result.directory)}")
        if manifest.signing_key_included:
            sys.stderr.write(
                "backup: this backup holds the shop's signing key: anyone with it can sign"
                " records in the shop's name; keep it as safe as the key itself.\n"
            )
        else:
            self.stdout.write(
                "The signing key is not in this backup: keep a copy of SIGNING_DIR"
                " somewhere safe (or use --include-signing-key)."
            )

    def _fail(self, message: str, status: int) -> None:
        # One line, whatever the database driver's message spans.
        sys.stderr.write(f"backup: {' '.join(message.split())}\n")
        raise SystemExit(status)
