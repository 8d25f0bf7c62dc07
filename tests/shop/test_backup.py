"""`manage.py backup DIR` on SQLite: a consistent copy made while tablets keep writing
readings, which restores into a fresh server holding every reading committed before the
backup began and a signed record that still verifies there.

The restore runs as the shop would run it, as `manage.py restore` in a process of its own
pointed at a new var folder (AMPWRIGHT_VAR_DIR, MEDIA_ROOT, SIGNING_DIR), so the test's
own database is never the target."""

from __future__ import annotations

import hashlib
import json
import os
import sqlite3
import stat
import subprocess
import sys
import threading
from pathlib import Path

import pytest
from django.core.management import call_command
from django.db import connection

from inspections.models import AuditEvent, Stage, TorqueRecord
from shop import roles
from shop.roles import sync_role_groups
from tests.factories import make_job, make_user
from tests.inspections.factories import approved, make_spec_circuit, make_wrench, read
from tests.inspections.guards import GUARDED_TABLES, clear_evidence, grant_inspection_roles
from tests.wiring.record_jobs import photo_upload
from tests.wiring.signing_fixtures import media, signing_key  # noqa: F401 (fixtures)
from wiring.services import record_issue

ROOT = Path(__file__).resolve().parents[2]
on_sqlite = pytest.mark.skipif(
    connection.vendor != "sqlite", reason="the SQLite backup (PostgreSQL: test_backup_postgres)"
)


def manage(*arguments: str, env: dict[str, str]) -> subprocess.CompletedProcess:
    """`manage.py` in a process of its own, as the shop runs it."""
    return subprocess.run(
        [sys.executable, "manage.py", *arguments],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=300,
    )


def server_env(folder: Path, *, signing_dir: Path | None = None, **extra: str) -> dict[str, str]:
    """The environment of a second server whose files all live in `folder`."""
    env = {k: v for k, v in os.environ.items() if k != "DATABASE_URL"}
    env.update(
        AMPWRIGHT_VAR_DIR=str(folder),
        MEDIA_ROOT=str(folder / "media"),
        SIGNING_DIR=str(signing_dir or folder / "signing"),
        **extra,
    )
    return env


def run_backup(directory: Path, *arguments: str, capsys) -> tuple[int, str, str]:
    """The backup command in this process; (exit status, stdout, stderr)."""
    try:
        call_command("backup", str(directory), *arguments)
        status = 0
    except SystemExit as exit_:
        status = int(exit_.code)
    out, err = capsys.readouterr()
    return status, out, err


@pytest.fixture
def roles_granted(transactional_db):
    """Role groups as the migrations made them (an earlier transactional test flushed
    them); evidence rows cleared afterwards, before the runner's flush (which the
    append-only triggers refuse), as `evidence_cleared` does in tests/inspections."""
    sync_role_groups()
    grant_inspection_roles()
    yield
    clear_evidence()


@pytest.fixture
def shop_with_record(roles_granted, signing_key, media):  # noqa: F811 (fixtures)
    """An approved job with its signed record, and a photo on one reading."""
    technician = make_user(roles.TECHNICIAN)
    lead = make_user(roles.LEAD)
    job = make_job(lead=lead, technicians=[technician])
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    revision = record_issue(job=job, by=lead)
    return {"technician": technician, "lead": lead, "job": job, "revision": revision}


def sha256_of(path: Path) -> str:
    """SHA-256 (FIPS 180-4) by Python's hashlib, not by the code under test."""
    return hashlib.sha256(path.read_bytes()).hexdigest()


def sqlite_rows(path: Path, sql: str, *params) -> list[tuple]:
    with sqlite3.connect(path) as db:
        return db.execute(sql, params).fetchall()


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_backup_while_readings_are_written_restores_every_committed_reading_and_the_record(
    shop_with_record, settings, tmp_path, capsys
):
    technician = shop_with_record["technician"]
    revision = shop_with_record["revision"]
    job = make_job(technicians=[technician])
    install = Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL)
    ends = [t for _ in range(5) for t in make_spec_circuit(job).terminations.order_by("pk")]
    wrench = make_wrench()
    read(ends[0], install, "10", technician=technician, wrench=wrench, photo=photo_upload())
    # A tablet keeps sending readings, through the same service as the torque page, while
    # the backup runs; the main thread starts the backup once ten are in.
    started, failures, written = threading.Event(), [], []

    def tablet() -> None:
        try:
            for number in range(60):
                end = ends[number % len(ends)]
                record = read(end, install, "10", technician=technician, wrench=wrench)
                written.append(record.pk)
                if number == 9:
                    started.set()
        except BaseException as error:  # reported by the assertion below
            failures.append(error)
        finally:
            started.set()
            connection.close()

    writer = threading.Thread(target=tablet)
    writer.start()
    assert started.wait(timeout=120)
    committed = set(TorqueRecord.objects.values_list("pk", flat=True))
    status, out, err = run_backup(tmp_path / "backup", capsys=capsys)
    writer.join(timeout=120)

    assert (status, err) == (0, ""), err
    assert failures == []  # the tablet was never told "database is locked"
    assert len(written) == 60 and len(committed) >= 11
    assert "SQLite database" in out and "not in this backup" in out
    manifest = json.loads((tmp_path / "backup" / "manifest.json").read_text())
    copy = tmp_path / "backup" / "database.sqlite3"
    # The copy is one consistent moment: each reading's audit event was written in the
    # same transaction as the reading, and the copy holds exactly as many of each.
    readings = {pk for (pk,) in sqlite_rows(copy, "SELECT id FROM inspections_torquerecord")}
    events = sqlite_rows(
        copy,
        "SELECT COUNT(*) FROM inspections_auditevent WHERE kind = ?",
        AuditEvent.Kind.READING.value,
    )[0][0]
    assert committed <= readings and events == len(readings) == manifest["counts"]["readings"]

    site = tmp_path / "restored-server"
    restored = manage("restore", str(tmp_path / "backup"), env=server_env(site))
    assert restored.returncode == 0, restored.stderr
    assert f"{len(readings):,} readings" in restored.stdout
    assert "1 record revision" in restored.stdout
    database = site / "ampwright.sqlite3"
    in_restored = {pk for (pk,) in sqlite_rows(database, "SELECT id FROM inspections_torquerecord")}
    assert committed <= in_restored and in_restored == readings
    # The append-only guards came back with the tables (triggers live in the schema).
    triggers = sqlite_rows(
        database,
        "SELECT COUNT(*) FROM sqlite_master WHERE type = 'trigger' AND tbl_name IN"
        f" ({', '.join('?' * len(GUARDED_TABLES))})",
        *GUARDED_TABLES,
    )[0][0]
    assert triggers > 0
    with pytest.raises(sqlite3.DatabaseError):
        sqlite_rows(database, "DELETE FROM inspections_torquerecord")
    # The restored record verifies against the restored server's own list of revisions,
    # with the shop's key (kept outside the backup) at SIGNING_DIR.
    pdf = site / "media" / revision.file.name
    assert sha256_of(pdf) == revision.sha256
    verify_env = server_env(site, signing_dir=Path(settings.SIGNING_DIR))
    verified = manage("verify_record", str(pdf), env=verify_env)
    assert verified.returncode == 0, verified.stderr
    assert f"job {shop_with_record['job'].number}, revision 1" in verified.stdout
    photo = TorqueRecord.objects.exclude(photo="").get().photo.name
    assert (site / "media" / photo).is_file()


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_manifest_names_every_file_with_its_size_and_sha256_and_the_schema(
    shop_with_record, tmp_path, capsys
):
    status, _, err = run_backup(tmp_path / "backup", capsys=capsys)
    assert status == 0, err
    folder = tmp_path / "backup"
    manifest = json.loads((folder / "manifest.json").read_text())
    assert manifest["format"] == "ampwright-backup" and manifest["format_version"] == 1
    assert manifest["database"] == {
        "vendor": "sqlite",
        "version": sqlite3.sqlite_version,
        "file": "database.sqlite3",
    }
    assert manifest["signing_key_included"] is False
    on_disk = sorted(
        p.relative_to(folder).as_posix()
        for p in folder.rglob("*")
        if p.is_file() and p.name != "manifest.json"
    )
    assert sorted(entry["path"] for entry in manifest["files"]) == on_disk
    for entry in manifest["files"]:
        path = folder / entry["path"]
        assert (entry["size"], entry["sha256"]) == (path.stat().st_size, sha256_of(path))
    assert f"media/{shop_with_record['revision'].file.name}" in on_disk
    assert not (folder / "signing").exists()
    with connection.cursor() as cursor:
        cursor.execute("SELECT app, MAX(name) FROM django_migrations GROUP BY app")
        assert manifest["migrations"] == dict(cursor.fetchall())
    assert manifest["counts"]["jobs"] == 1 and manifest["counts"]["record revisions"] == 1
    # A backup holds password hashes and owners' names: this user alone reads it.
    assert stat.S_IMODE(folder.stat().st_mode) == 0o700
    assert stat.S_IMODE((folder / "database.sqlite3").stat().st_mode) == 0o600


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_signing_key_is_copied_only_when_asked_and_kept_private(shop_with_record, tmp_path, capsys):
    status, _, err = run_backup(tmp_path / "with-key", "--include-signing-key", capsys=capsys)
    assert status == 0
    assert "holds the shop's signing key" in err  # the warning, on stderr
    folder = tmp_path / "with-key"
    manifest = json.loads((folder / "manifest.json").read_text())
    assert manifest["signing_key_included"] is True
    assert {"signing/key.pem", "signing/cert.pem"} <= {e["path"] for e in manifest["files"]}
    assert stat.S_IMODE((folder / "signing").stat().st_mode) == 0o700
    assert stat.S_IMODE((folder / "signing" / "key.pem").stat().st_mode) == 0o600

    # Restored on a server with no key, the key comes back private, and the record
    # verifies there with it.
    site = tmp_path / "restored-server"
    restored = manage("restore", str(folder), env=server_env(site))
    assert restored.returncode == 0, restored.stderr
    assert "Signing key: restored." in restored.stdout
    assert stat.S_IMODE((site / "signing").stat().st_mode) == 0o700
    assert stat.S_IMODE((site / "signing" / "key.pem").stat().st_mode) == 0o600
    pdf = site / "media" / shop_with_record["revision"].file.name
    assert manage("verify_record", str(pdf), env=server_env(site)).returncode == 0


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_include_signing_key_without_a_key_is_refused_and_leaves_nothing(
    roles_granted, settings, tmp_path, capsys
):
    settings.SIGNING_DIR = tmp_path / "no-key-here"
    status, out, err = run_backup(tmp_path / "backup", "--include-signing-key", capsys=capsys)
    assert status == 1 and out == ""
    assert err.count("\n") == 1 and "there is no signing key" in err
    assert not (tmp_path / "backup").exists()  # the half-made backup was removed


@pytest.mark.django_db
def test_a_folder_that_is_not_empty_is_refused(tmp_path, capsys):
    folder = tmp_path / "used"
    folder.mkdir()
    (folder / "notes.txt").write_text("last week's")
    status, out, err = run_backup(folder, capsys=capsys)
    assert status == 2 and out == ""
    assert err == f"backup: {folder} is not empty: back up into a new or empty folder.\n"
    assert sorted(p.name for p in folder.iterdir()) == ["notes.txt"]  # untouched


@pytest.mark.django_db
def test_a_file_in_place_of_the_folder_is_refused(tmp_path, capsys):
    target = tmp_path / "backup"
    target.write_text("")
    status, _, err = run_backup(target, capsys=capsys)
    assert status == 2 and err == f"backup: {target} exists and is not a folder.\n"


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_an_empty_existing_folder_is_used(roles_granted, tmp_path, capsys):
    folder = tmp_path / "empty"
    folder.mkdir()
    status, out, err = run_backup(folder, capsys=capsys)
    assert status == 0, err
    assert (folder / "manifest.json").is_file() and "0 jobs" in out


@pytest.mark.django_db
def test_a_folder_inside_the_media_store_is_refused(media, capsys):  # noqa: F811 (fixture)
    target = media / "backups" / "tonight"
    status, _, err = run_backup(target, capsys=capsys)
    assert status == 2
    assert err == f"backup: {target} is inside the media store: back up elsewhere.\n"
    assert not target.exists()
