"""`make_backup(directory)`: a consistent copy of the database while the app runs, the
media store's files, optionally the signing key, and a manifest with each file's SHA-256.

Order matters: the database is copied first and the media store after, so every file a
copied row names (a photo, a signed record) is already in the store when it is copied;
files stored later are copied too, harmlessly. Stored files are never changed in place
(a revision or a photo gets a new name), so a file copied while the app runs is whole.
"""

from __future__ import annotations

import hashlib
import json
import shutil
import sqlite3
from dataclasses import dataclass
from pathlib import Path

from django.core.files.storage import FileSystemStorage, default_storage
from django.db import connections, transaction

from shop.backup import postgres
from shop.backup.common import (
    CHUNK,
    MANIFEST,
    MEDIA_DIR,
    PG_FILE,
    SIGNING_DIR,
    SQLITE_FILE,
    SUMMARY_TABLES,
    USAGE,
    BackupError,
    Manifest,
    count_rows,
    file_entry,
    latest_per_app,
    migration_state,
    now_text,
    private_dirs,
    read_only_uri,
    safe_relative,
    signing_dir,
    write_private,
)


@dataclass(frozen=True)
class BackupResult:
    directory: Path
    manifest: Manifest
    media_files: int
    media_bytes: int
    database_bytes: int


def _inside(directory: Path, folder: object) -> bool:
    if not folder:
        return False
    root = Path(str(folder)).resolve()
    return directory.resolve() == root or root in directory.resolve().parents


def _prepare(directory: Path) -> bool:
    """The folder, new or empty; True when this call created it (so a failure removes it)."""
    # A backup inside the media store would copy itself into itself, and so would one
    # inside the signing folder with --include-signing-key.
    for folder, what in (
        (
            default_storage.location if isinstance(default_storage, FileSystemStorage) else None,
            "the media store",
        ),
        (signing_dir(), "the signing key's folder"),
    ):
        if _inside(directory, folder):
            raise BackupError(f"{directory} is inside {what}: back up elsewhere.", status=USAGE)
    if directory.exists() or directory.is_symlink():
        if not directory.is_dir():
            raise BackupError(f"{directory} exists and is not a folder.", status=USAGE)
        if any(directory.iterdir()):
            raise BackupError(
                f"{directory} is not empty: back up into a new or empty folder.", status=USAGE
            )
        return False
    try:
        directory.mkdir(mode=0o700, parents=True)
    except OSError as error:
        raise BackupError(
            f"Cannot create {directory}: {error.strerror or error}.", status=USAGE
        ) from None
    return True


def _clear(directory: Path, created: bool) -> None:
    if created:
        shutil.rmtree(directory, ignore_errors=True)
        return
    for child in directory.iterdir():
        if child.is_dir() and not child.is_symlink():
            shutil.rmtree(child, ignore_errors=True)
        else:
            child.unlink(missing_ok=True)


def _sqlite_copy(settings_dict: dict, target: Path) -> tuple[dict, dict]:
    source_path = Path(settings_dict["NAME"])
    if not source_path.is_file():
        raise BackupError(f"There is no database at {source_path} to back up.")
    # Read-only, and never through Django's connection, so only committed rows are
    # copied. One backup step (pages=-1) copies every page inside one read transaction:
    # a consistent snapshot, while the app's writers carry on (WAL lets them).
    source = sqlite3.connect(read_only_uri(source_path), uri=True, timeout=20)
    copy = sqlite3.connect(target)
    try:
        source.backup(copy)
        # One self-contained file: no -wal or -shm beside the copy.
        copy.execute("PRAGMA journal_mode=DELETE")
        check = copy.execute("PRAGMA quick_check").fetchone()[0]
        if check != "ok":
            raise BackupError(f"The copied database fails SQLite's check: {check}")
        cursor = copy.cursor()
        tables = [row[0] for row in cursor.execute("SELECT name FROM sqlite_master")]
        return migration_state(cursor, tables), count_rows(cursor, tables, SUMMARY_TABLES)
    except sqlite3.Error as error:
        raise BackupError(f"The database could not be copied: {error}") from None
    finally:
        copy.close()
        source.close()
        if target.exists():
            target.chmod(0o600)


def _postgres_dump(alias: str, target: Path) -> tuple[dict, dict]:
    connection = connections[alias]
    postgres.tool("pg_dump")  # before any work: a missing tool is a one-line refusal
    if connection.in_atomic_block:
        # The isolation level is set by a transaction's first statement.
        raise BackupError("A backup cannot run inside another transaction.")
    # The counts and migration state are read in the very snapshot pg_dump then dumps.
    with transaction.atomic(using=alias), connection.cursor() as cursor:
        cursor.execute("SET TRANSACTION ISOLATION LEVEL REPEATABLE READ")
        cursor.execute("SELECT pg_export_snapshot()")
        snapshot = cursor.fetchone()[0]
        tables = connection.introspection.table_names(cursor)
        applied = migration_state(cursor, tables)
        counts = count_rows(cursor, tables, SUMMARY_TABLES)
        postgres.dump(connection.settings_dict, target, snapshot=snapshot)
    target.chmod(0o600)
    return applied, counts


def _storage_names(storage, folder: str = "") -> list[str]:
    """Every file name in the store, walked through the storage API (local folder or an
    S3-compatible bucket alike)."""
    try:
        folders, files = storage.listdir(folder)
    except FileNotFoundError:  # nothing was ever stored
        return []
    names = [f"{folder}/{name}" if folder else name for name in files]
    for sub in folders:
        names += _storage_names(storage, f"{folder}/{sub}" if folder else sub)
    return sorted(names)


def _copy_media(directory: Path) -> list[str]:
    storage = default_storage
    copied: list[str] = []
    for name in _storage_names(storage):
        relative = safe_relative(name)
        if relative is None:
            raise BackupError(f"The media store holds a file with an unusable name: {name!r}")
        target = directory / MEDIA_DIR / relative
        private_dirs(target.parent)
        try:
            with storage.open(name, "rb") as source, target.open("wb") as out:
                target.chmod(0o600)
                while chunk := source.read(CHUNK):
                    out.write(chunk)
        except FileNotFoundError:  # removed between the listing and the copy
            target.unlink(missing_ok=True)
            continue
        copied.append(f"{MEDIA_DIR}/{relative}")
    return copied


def _require_signing_key() -> None:
    from wiring.signing import is_set_up

    if not is_set_up():
        raise BackupError(f"--include-signing-key: there is no signing key in {signing_dir()}.")


def _copy_signing_key(directory: Path) -> list[str]:
    folder = signing_dir()
    copied: list[str] = []
    for path in sorted(p for p in folder.rglob("*") if p.is_file()):
        relative = path.relative_to(folder).as_posix()
        if relative.startswith(".new-") or "/.new-" in relative:  # a write in progress
            continue
        write_private(directory / SIGNING_DIR / relative, path.read_bytes())
        copied.append(f"{SIGNING_DIR}/{relative}")
    return copied


def make_backup(
    directory: Path, *, include_signing_key: bool = False, using: str = "default"
) -> BackupResult:
    directory = Path(directory)
    if include_signing_key:
        _require_signing_key()  # refused before anything is copied
    created = _prepare(directory)
    connection = connections[using]
    try:
        created_at = now_text()
        if connection.vendor == "sqlite":
            database_file = SQLITE_FILE
            applied, counts = _sqlite_copy(connection.settings_dict, directory / database_file)
            version = sqlite3.sqlite_version
        elif connection.vendor == "postgresql":
            database_file = PG_FILE
            applied, counts = _postgres_dump(using, directory / database_file)
            with connection.cursor() as cursor:
                cursor.execute("SHOW server_version")  # pg_restore must be as new
                version = cursor.fetchone()[0]
        else:
            raise BackupError(f"Backups of a {connection.vendor} database are not supported.")
        media = _copy_media(directory)
        signing = _copy_signing_key(directory) if include_signing_key else []
        manifest = Manifest(
            created_at=created_at,
            vendor=connection.vendor,
            database_file=database_file,
            migrations=latest_per_app(applied),
            applied_migrations=applied,
            counts=counts,
            signing_key_included=bool(signing),
            engine_version=version,
            files=[file_entry(directory, name) for name in [database_file, *media, *signing]],
        )
        text = json.dumps(manifest.to_json(), indent=2, sort_keys=False) + "\n"
        write_private(directory / MANIFEST, text.encode())
    except BaseException as error:
        # Whatever stopped it (a refusal, a full disk, a lost database connection, ^C),
        # no half-made backup is left to be mistaken for a whole one.
        _clear(directory, created)
        if isinstance(error, OSError):
            raise BackupError(f"The backup could not be written: {error}") from None
        raise
    sizes = {entry["path"]: entry["size"] for entry in manifest.files}
    return BackupResult(
        directory=directory,
        manifest=manifest,
        media_files=len(media),
        media_bytes=sum(sizes[name] for name in media),
        database_bytes=sizes[database_file],
    )


def manifest_digest(directory: Path) -> str:
    """The manifest's own SHA-256, printed after a backup so it can be noted elsewhere."""
    return hashlib.sha256((Path(directory) / MANIFEST).read_bytes()).hexdigest()
