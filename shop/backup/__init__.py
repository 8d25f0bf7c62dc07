"""Backup and restore of a shop's server: `manage.py backup DIR` and `manage.py restore DIR`
(README, "Backup and restore"). The commands are thin; the work is here, split by side:
`make` (the copy), `restore` (the checks and the put-back), `postgres` (pg_dump and
pg_restore), `common` (the folder's layout and the manifest)."""

from __future__ import annotations

from shop.backup.common import REFUSED, USAGE, BackupError, counts_text, megabytes
from shop.backup.make import BackupResult, make_backup, manifest_digest
from shop.backup.restore import CheckedBackup, RestoreResult, check_backup, restore_backup

__all__ = [
    "REFUSED",
    "USAGE",
    "BackupError",
    "BackupResult",
    "CheckedBackup",
    "RestoreResult",
    "check_backup",
    "counts_text",
    "make_backup",
    "manifest_digest",
    "megabytes",
    "restore_backup",
]
