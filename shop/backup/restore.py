"""`check_backup(directory)` and `restore_backup(directory)`: every file of a backup is
checked against its manifest, and every refusal is decided, before anything is written.

"Empty" target: a database holding no staff account, owner, vehicle, job, torque wrench
or reading (common.RECORD_TABLES). A freshly migrated database is empty; one a shop has
used is not, and is replaced only with `force`. On PostgreSQL the dump recreates the
tables itself, so without `force` the target must also hold none of the app's tables
yet (a database just made with `createdb`); `force` drops and recreates them
(`pg_restore --clean --if-exists`).
"""

from __future__ import annotations

import hashlib
import json
import os
import sqlite3
import tempfile
from dataclasses import dataclass, field
from pathlib import Path

from django.core.files import File
from django.core.files.storage import default_storage
from django.db import connections

from shop.backup import postgres
from shop.backup.common import (
    FORMAT,
    FORMAT_VERSION,
    MANIFEST,
    MEDIA_DIR,
    PG_FILE,
    RECORD_TABLES,
    SIGNING_DIR,
    SQLITE_FILE,
    SUMMARY_TABLES,
    USAGE,
    BackupError,
    count_rows,
    counts_text,
    migration_state,
    missing_migrations,
    plural,
    private_dirs,
    read_only_uri,
    safe_relative,
    sha256_of,
    signing_dir,
    unknown_migrations,
)

VENDOR_WORDS = {"sqlite": "SQLite", "postgresql": "PostgreSQL"}


@dataclass(frozen=True)
class CheckedBackup:
    directory: Path
    manifest: dict
    files: dict[str, dict]  # path -> entry

    @property
    def vendor(self) -> str:
        return self.manifest["database"]["vendor"]

    @property
    def database_file(self) -> str:
        return self.manifest["database"]["file"]

    def under(self, folder: str) -> list[str]:
        return sorted(p for p in self.files if p.startswith(folder + "/"))


@dataclass
class RestoreResult:
    backup: CheckedBackup
    counts: dict[str, int]
    media_restored: int = 0
    media_already_there: int = 0
    signing: str = "not in the backup"
    notes: list[str] = field(default_factory=list)


def _damaged(reason: str) -> BackupError:
    return BackupError(f"{MANIFEST} is damaged: {reason}.")


def _load_manifest(directory: Path) -> dict:
    if not directory.is_dir():
        raise BackupError(f"{directory} is not a folder.", status=USAGE)
    path = directory / MANIFEST
    if not path.is_file():
        raise BackupError(f"{directory} is not a backup: it has no {MANIFEST}.", status=USAGE)
    try:
        manifest = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, UnicodeDecodeError, ValueError, RecursionError) as error:
        # RecursionError: arrays nested thousands deep exhaust the decoder's stack.
        raise _damaged(f"it is not readable JSON ({error})") from None
    if not isinstance(manifest, dict) or manifest.get("format") != FORMAT:
        raise _damaged("it is not an Ampwright backup manifest")
    version = manifest.get("format_version")
    if not isinstance(version, int):
        raise _damaged("it has no format version")
    if version > FORMAT_VERSION:
        raise BackupError(
            f"This backup's format (version {version}) is newer than this code reads"
            f" (version {FORMAT_VERSION}): restore it with the version that made it."
        )
    database = manifest.get("database")
    if not isinstance(database, dict) or not isinstance(database.get("vendor"), str):
        raise _damaged("it does not say which database it holds")
    if database["vendor"] not in VENDOR_WORDS:
        raise _damaged("it does not say which database it holds")
    expected = {"sqlite": SQLITE_FILE, "postgresql": PG_FILE}[database["vendor"]]
    if database.get("file") != expected:
        raise _damaged(f"its database file should be {expected}")
    applied = manifest.get("applied_migrations")
    if not isinstance(applied, dict) or not all(
        isinstance(names, list) and all(isinstance(n, str) for n in names)
        for names in applied.values()
    ):
        raise _damaged("its migration state is missing")
    if not all(isinstance(app, str) for app in applied):
        raise _damaged("its migration state is missing")
    counts = manifest.get("counts")
    if not isinstance(counts, dict) or not all(
        isinstance(word, str) and isinstance(n, int) for word, n in counts.items()
    ):
        raise _damaged("its record counts are missing")
    if not isinstance(manifest.get("created_at"), str):
        raise _damaged("it does not say when the backup was made")
    if not isinstance(manifest.get("signing_key_included"), bool):
        raise _damaged("it does not say whether the signing key is in it")
    if not isinstance(manifest.get("files"), list):
        raise _damaged("it lists no files")
    return manifest


def _check_entries(directory: Path, manifest: dict) -> dict[str, dict]:
    files: dict[str, dict] = {}
    for entry in manifest["files"]:
        if not isinstance(entry, dict):
            raise _damaged("a file entry is not an object")
        path = safe_relative(entry.get("path"))
        size, digest = entry.get("size"), entry.get("sha256")
        if path is None or path == MANIFEST or path in files:
            raise _damaged(f"it names an unusable file {entry.get('path')!r}")
        top = path.split("/", 1)[0]
        if path != manifest["database"]["file"] and top not in {MEDIA_DIR, SIGNING_DIR}:
            raise _damaged(f"it names a file outside the backup's layout: {path}")
        if not isinstance(size, int) or not isinstance(digest, str) or len(digest) != 64:
            raise _damaged(f"the entry for {path} has no size or SHA-256")
        files[path] = entry
    if manifest["database"]["file"] not in files:
        raise _damaged("it does not list the database file")
    for path, entry in files.items():
        on_disk = directory / path
        if on_disk.is_symlink() or not on_disk.is_file():
            raise BackupError(f"Backup file {path} is missing.")
        if on_disk.stat().st_size != entry["size"] or sha256_of(on_disk) != entry["sha256"]:
            raise BackupError(f"Backup file {path} has changed since the backup was made.")
    # A file the manifest does not list was added afterwards: nothing restores it, and
    # it says the folder was tampered with.
    for on_disk in sorted(directory.rglob("*")):
        relative = on_disk.relative_to(directory).as_posix()
        if on_disk.is_dir() and not on_disk.is_symlink():
            continue
        if relative != MANIFEST and relative not in files:
            raise BackupError(f"Backup file {relative} is not in the manifest.")
    return files


def check_backup(directory: Path) -> CheckedBackup:
    """The backup's manifest and every file in it (size and SHA-256), or a refusal."""
    directory = Path(directory)
    manifest = _load_manifest(directory)
    files = _check_entries(directory, manifest)
    newer = unknown_migrations(manifest["applied_migrations"])
    if newer:
        shown = ", ".join(newer[:3]) + (" ..." if len(newer) > 3 else "")
        raise BackupError(
            f"This backup's schema is newer than this code ({shown} unknown here):"
            " upgrade Ampwright to the version that made it first."
        )
    return CheckedBackup(directory=directory, manifest=manifest, files=files)


def _target_state(using: str) -> tuple[dict[str, int], list[str]]:
    """Record counts in the target database, and the app's tables it already holds."""
    connection = connections[using]
    with connection.cursor() as cursor:
        tables = connection.introspection.table_names(cursor)
        return count_rows(cursor, tables, RECORD_TABLES), tables


def _refuse_non_empty(backup: CheckedBackup, using: str, force: bool) -> None:
    connection = connections[using]
    if backup.vendor != connection.vendor:
        raise BackupError(
            f"This backup holds a {VENDOR_WORDS[backup.vendor]} database and this server uses"
            f" {VENDOR_WORDS.get(connection.vendor, connection.vendor)}: restore it on a"
            " server of the same kind."
        )
    if force:
        return
    counts, tables = _target_state(using)
    held = {word: n for word, n in counts.items() if n}
    if held:
        raise BackupError(
            f"The database already holds records ({counts_text(held)}): restore into an"
            " empty database, or pass --force to replace everything in it."
        )
    if connection.vendor == "postgresql" and "django_migrations" in tables:
        raise BackupError(
            "The database already has Ampwright's tables (no records): restore into a"
            " database just made with createdb, or pass --force to replace the tables."
        )


def _media_plan(backup: CheckedBackup, force: bool) -> tuple[list[str], int]:
    """Media files to write; a stored file of the same name and other contents is
    refused without `force` (it may be a shop's photo or record)."""
    storage, to_write, same = default_storage, [], 0
    for path in backup.under(MEDIA_DIR):
        name = path.split("/", 1)[1]
        if storage.exists(name):
            with storage.open(name, "rb") as handle:
                digest = _digest_stream(handle)
            if digest == backup.files[path]["sha256"]:
                same += 1
                continue
            if not force:
                raise BackupError(
                    f"The media store already holds {name} with other contents: pass"
                    " --force to replace it."
                )
        to_write.append(path)
    return to_write, same


def _digest_stream(handle) -> str:
    digest = hashlib.sha256()
    while chunk := handle.read(1024 * 1024):
        digest.update(chunk)
    return digest.hexdigest()


def _signing_plan(backup: CheckedBackup) -> list[str]:
    """Signing files to write. A restore never replaces a different key: records signed
    with it would stop verifying. Same files already there are left alone."""
    paths = backup.under(SIGNING_DIR)
    folder = signing_dir()
    to_write = []
    for path in paths:
        target = folder / path.split("/", 1)[1]
        if target.is_file():
            if sha256_of(target) == backup.files[path]["sha256"]:
                continue
            raise BackupError(
                f"{target} already holds a different signing key or certificate: a restore"
                " never replaces one; move the folder aside first if the backup's key is wanted."
            )
        to_write.append(path)
    return to_write


def _restore_sqlite(backup: CheckedBackup, using: str) -> None:
    connection = connections[using]
    target = Path(connection.settings_dict["NAME"])
    connection.close()  # Django's own connection must not hold the file during the copy
    target.parent.mkdir(parents=True, exist_ok=True)
    source = sqlite3.connect(read_only_uri(backup.directory / SQLITE_FILE), uri=True)
    destination = sqlite3.connect(target, timeout=20)
    try:
        # The backup API writes every page of the copy into the target under the target's
        # own lock, so a reader never sees half a database.
        source.backup(destination)
        destination.execute("PRAGMA journal_mode=WAL")  # the app's mode (shop.settings)
    except sqlite3.Error as error:
        raise BackupError(f"The database could not be restored into {target}: {error}") from None
    finally:
        destination.close()
        source.close()


def _restore_postgres(backup: CheckedBackup, using: str, force: bool) -> None:
    connection = connections[using]
    postgres.tool("pg_restore")
    settings_dict = dict(connection.settings_dict)
    connection.close()  # pg_restore --clean must not wait on our own locks
    postgres.restore(settings_dict, backup.directory / PG_FILE, clean=force)


def _write_media(backup: CheckedBackup, paths: list[str]) -> None:
    storage = default_storage
    for path in paths:
        name = path.split("/", 1)[1]
        if storage.exists(name):
            storage.delete(name)  # only with force (_media_plan), and only a different file
        with (backup.directory / path).open("rb") as handle:
            saved = storage.save(name, File(handle, name=name))
        if saved != name:
            raise BackupError(f"The media store saved {name} as {saved}: restore stopped.")


def _write_signing(backup: CheckedBackup, paths: list[str]) -> None:
    folder = signing_dir()
    for path in paths:
        target = folder / path.split("/", 1)[1]
        private_dirs(target.parent)
        folder.chmod(0o700)
        handle, temporary = tempfile.mkstemp(dir=target.parent, prefix=".new-")
        os.fchmod(handle, 0o600)
        with os.fdopen(handle, "wb") as out:
            out.write((backup.directory / path).read_bytes())
        os.replace(temporary, target)


def restore_backup(
    directory: Path, *, force: bool = False, using: str = "default"
) -> RestoreResult:
    backup = check_backup(directory)
    _refuse_non_empty(backup, using, force)
    media, same = _media_plan(backup, force)
    signing = _signing_plan(backup)
    if backup.vendor == "sqlite":
        _restore_sqlite(backup, using)
    else:
        _restore_postgres(backup, using, force)
    try:
        _write_media(backup, media)
        _write_signing(backup, signing)
    except OSError as error:
        raise BackupError(
            f"The database is restored but a file could not be written: {error}"
        ) from None
    connection = connections[using]
    with connection.cursor() as cursor:
        tables = connection.introspection.table_names(cursor)
        counts = count_rows(cursor, tables, SUMMARY_TABLES)
        applied_now = migration_state(cursor, tables)
    result = RestoreResult(
        backup=backup, counts=counts, media_restored=len(media), media_already_there=same
    )
    if backup.manifest.get("signing_key_included"):
        result.signing = "restored" if signing else "already in place"
    else:
        from wiring.signing import is_set_up

        if not is_set_up():
            result.notes.append(
                "There is no signing key on this server: restored records verify once the"
                " shop's key is back in SIGNING_DIR (or run signing_setup for new records)."
            )
    expected = backup.manifest["counts"]
    differ = [w for w in SUMMARY_TABLES if w in expected and expected[w] != counts.get(w)]
    if differ:
        raise BackupError(
            "The restored database does not hold what the manifest counted: "
            + ", ".join(f"{w} {counts.get(w)} not {expected[w]}" for w in differ)
        )
    pending = missing_migrations(applied_now)
    if pending:
        result.notes.append(
            f"The backup's schema is older than this code ({plural(len(pending), 'migrations')}"
            " to apply): run `python manage.py migrate` now."
        )
    return result
