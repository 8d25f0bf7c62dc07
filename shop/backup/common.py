"""What the backup and the restore share: the folder's layout, the manifest, hashing, the
record counts, the migration state and the one error they raise.

A backup folder holds:

    manifest.json        written last, so a folder without it is not a finished backup
    database.sqlite3     SQLite: a copy made with SQLite's online backup API
    database.pgdump      PostgreSQL: `pg_dump --format=custom`
    media/<name>         every file of the media store (photos, logos, signed records)
    signing/<name>       the signing key and certificates, only with --include-signing-key
"""

from __future__ import annotations

import datetime
import hashlib
import os
from collections.abc import Iterable
from dataclasses import dataclass, field
from pathlib import Path, PurePosixPath

from django.apps import apps
from django.conf import settings

FORMAT = "ampwright-backup"
FORMAT_VERSION = 1
MANIFEST = "manifest.json"
SQLITE_FILE = "database.sqlite3"
PG_FILE = "database.pgdump"
MEDIA_DIR = "media"
SIGNING_DIR = "signing"
CHUNK = 1024 * 1024

# Exit statuses of the two commands: 2 for a folder that cannot be used at all (a usage
# error), 1 for a backup or a database that was checked and refused.
USAGE = 2
REFUSED = 1

# The rows people enter. A database holding any of them is "not empty": a restore would
# replace a shop's work. Rows that migrations write themselves (content types,
# permissions, role groups, the shop profile, torque defaults) do not count, so a freshly
# migrated database is still empty.
RECORD_TABLES = {
    "staff accounts": "auth.User",
    "owners": "shop.Owner",
    "vehicles": "shop.Vehicle",
    "jobs": "shop.Job",
    "torque wrenches": "inspections.TorqueWrench",
    "readings": "inspections.TorqueRecord",
}
# What the summary after a backup or a restore reports (and the manifest keeps).
SUMMARY_TABLES = {
    "jobs": "shop.Job",
    "readings": "inspections.TorqueRecord",
    "thermal readings": "inspections.ThermalReading",
    "sign-offs": "inspections.SignOff",
    "record revisions": "wiring.RecordRevision",
    "staff accounts": "auth.User",
}


class BackupError(Exception):
    """A refusal in plain words, one line, with the exit status the command gives."""

    def __init__(self, message: str, *, status: int = REFUSED) -> None:
        super().__init__(message)
        self.status = status


@dataclass
class Manifest:
    created_at: str
    vendor: str
    database_file: str
    migrations: dict[str, str]
    applied_migrations: dict[str, list[str]]
    counts: dict[str, int]
    signing_key_included: bool
    engine_version: str = ""
    files: list[dict] = field(default_factory=list)

    def to_json(self) -> dict:
        return {
            "format": FORMAT,
            "format_version": FORMAT_VERSION,
            "created_at": self.created_at,
            "database": {
                "vendor": self.vendor,
                "version": self.engine_version,
                "file": self.database_file,
            },
            "migrations": self.migrations,
            "applied_migrations": self.applied_migrations,
            "counts": self.counts,
            "signing_key_included": self.signing_key_included,
            "files": self.files,
            "note": (
                "Ampwright backup. Restore with `python manage.py restore DIR`; every file's"
                " SHA-256 is checked first. Keep this folder as private as the database."
            ),
        }


def now_text() -> str:
    return datetime.datetime.now(datetime.UTC).strftime("%Y-%m-%dT%H:%M:%SZ")


def sha256_of(path: Path) -> str:
    digest = hashlib.sha256()
    with path.open("rb") as handle:
        while chunk := handle.read(CHUNK):
            digest.update(chunk)
    return digest.hexdigest()


def file_entry(root: Path, relative: str) -> dict:
    path = root / relative
    return {"path": relative, "size": path.stat().st_size, "sha256": sha256_of(path)}


def safe_relative(name: object) -> str | None:
    """`name` as a plain relative POSIX path inside the folder, or None: a manifest or a
    storage name that climbs out (`..`), is absolute or is empty is never followed."""
    if not isinstance(name, str) or not name or "\\" in name or "\x00" in name:
        return None
    path = PurePosixPath(name)
    if path.is_absolute() or any(part in {"", ".", ".."} for part in path.parts):
        return None
    return path.as_posix()


def private_dirs(folder: Path) -> None:
    """`folder` and any missing parent, each 0700 (mkdir's mode reaches the last alone)."""
    missing = []
    while not folder.exists():
        missing.append(folder)
        folder = folder.parent
    for path in reversed(missing):
        path.mkdir(mode=0o700)
        path.chmod(0o700)


def write_private(path: Path, data: bytes) -> None:
    """A file readable by this user alone: a backup holds password hashes and owners'
    names, and may hold the signing key."""
    private_dirs(path.parent)
    handle = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
    with os.fdopen(handle, "wb") as out:
        out.write(data)


def read_only_uri(path: Path) -> str:
    """A SQLite URI that opens `path` read-only and never creates it (as_uri escapes `?`,
    `#` and `%` in folder names)."""
    return Path(path).resolve().as_uri() + "?mode=ro"


def table_of(label: str) -> str:
    return apps.get_model(label)._meta.db_table


def count_rows(cursor, tables: Iterable[str], labels: dict[str, str]) -> dict[str, int]:
    """Rows in each of `labels`' tables (0 for a table the database does not have yet);
    any DB-API cursor, so it reads a SQLite copy as well as Django's connection."""
    present = set(tables)
    counts: dict[str, int] = {}
    for word, label in labels.items():
        table = table_of(label)
        if table not in present:
            counts[word] = 0
            continue
        cursor.execute(f'SELECT COUNT(*) FROM "{table}"')
        counts[word] = int(cursor.fetchone()[0])
    return counts


def migration_state(cursor, tables: Iterable[str]) -> dict[str, list[str]]:
    """Applied migrations per app, in name order (the numbered prefix orders them)."""
    if "django_migrations" not in set(tables):
        return {}
    cursor.execute("SELECT app, name FROM django_migrations ORDER BY app, name")
    applied: dict[str, list[str]] = {}
    for app, name in cursor.fetchall():
        applied.setdefault(app, []).append(name)
    return applied


def latest_per_app(applied: dict[str, list[str]]) -> dict[str, str]:
    return {app: max(names) for app, names in applied.items() if names}


def unknown_migrations(applied: dict[str, list[str]]) -> list[str]:
    """Migrations the backup's database had applied that this code does not have: the
    backup was made by a newer version (or another project)."""
    from django.db.migrations.loader import MigrationLoader

    known = set(MigrationLoader(None, ignore_no_migrations=True).disk_migrations)
    return [
        f"{app}.{name}"
        for app, names in applied.items()
        for name in names
        if (app, name) not in known
    ]


def missing_migrations(applied: dict[str, list[str]]) -> list[str]:
    """This code's migrations the backup had not applied: run `migrate` after the restore."""
    from django.db.migrations.loader import MigrationLoader

    loader = MigrationLoader(None, ignore_no_migrations=True)
    have = {(app, name) for app, names in applied.items() for name in names}
    return sorted(f"{a}.{n}" for a, n in loader.disk_migrations if (a, n) not in have)


def plural(count: int, word: str) -> str:
    """`1 job`, `3 jobs`; the words here are already plural ("jobs", "staff accounts")."""
    if count == 1 and word.endswith("s"):
        word = word[:-1]
    return f"{count:,} {word}"


def counts_text(counts: dict[str, int]) -> str:
    return ", ".join(plural(counts.get(word, 0), word) for word in counts)


def signing_dir() -> Path:
    return Path(settings.SIGNING_DIR)


def megabytes(size: int) -> str:
    return f"{size / 1_000_000:.1f} MB"
