"""manage.py restore DIR: check a backup against its manifest (every file's SHA-256), then
put the database, the media files and (when the backup holds it) the signing key back.

Refuses a database that already holds records unless --force; refuses a backup made by a
newer version. Exit 0 after a restore (a summary on stdout); 1 when the backup or the
target was refused; 2 when DIR is not a backup. One line on stderr, never a traceback."""

from __future__ import annotations

import sys
from pathlib import Path

from django.core.management.base import BaseCommand
from django.db import DatabaseError

from shop.backup import REFUSED, BackupError, check_backup, counts_text, restore_backup
from shop.management.one_line import OneLineArgumentErrors


class Command(OneLineArgumentErrors, BaseCommand):
    help = (
        "Restore a backup made by `manage.py backup` into this server's database and media"
        " store. Every file is checked first; a database holding records is replaced only"
        " with --force. Stop the app servers before restoring."
    )

    def add_arguments(self, parser) -> None:
        parser.add_argument("directory", metavar="DIR", help="A folder made by `backup`.")
        parser.add_argument(
            "--force",
            action="store_true",
            help="Replace a database that already holds records (PostgreSQL: drop and"
            " recreate its tables) and media files of the same name.",
        )
        parser.add_argument(
            "--check",
            action="store_true",
            help="Only check the backup against its manifest; change nothing.",
        )

    def handle(self, *args, directory: str, force: bool, check: bool, **options) -> None:
        try:
            if check:
                backup = check_backup(Path(directory))
                counts = backup.manifest["counts"]
                self.stdout.write(
                    f"Backup of {backup.manifest['created_at']} is intact:"
                    f" {len(backup.files):,} files match the manifest; {counts_text(counts)}."
                )
                return
            result = restore_backup(Path(directory), force=force)
        except BackupError as error:
            self._fail(str(error), error.status)
        except (OSError, DatabaseError) as error:
            self._fail(f"The restore failed: {error}", REFUSED)
        manifest = result.backup.manifest
        self.stdout.write(
            f"Restored the backup of {manifest['created_at']}: {counts_text(result.counts)}."
        )
        self.stdout.write(
            f"Media files: {result.media_restored:,} restored,"
            f" {result.media_already_there:,} already in place. Signing key: {result.signing}."
        )
        for note in result.notes:
            self.stdout.write(note)

    def _fail(self, message: str, status: int) -> None:
        # One line, whatever the database driver's message spans.
        sys.stderr.write(f"restore: {' '.join(message.split())}\n")
        raise SystemExit(status)
