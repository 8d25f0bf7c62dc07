"""`manage.py restore DIR` checks a backup against its manifest before it writes anything:
a changed, missing or added file, a damaged manifest, a newer schema or format, a
database that holds records, a media file or signing key of the same name with other
contents are each refused with one line on stderr, and nothing is changed."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from django.core.files.base import ContentFile
from django.core.files.storage import default_storage
from django.core.management import call_command
from django.db import connection

from shop.models import Job
from tests.factories import make_job
from tests.shop.test_backup import manage, on_sqlite, roles_granted, server_env  # noqa: F401
from tests.wiring.signing_fixtures import media, signing_key  # noqa: F401 (fixtures)

PHOTO = "inspections/torque/2026/12/lug-face.jpg"


def run(command: str, *arguments: str, capsys) -> tuple[int, str, str]:
    try:
        call_command(command, *map(str, arguments))
        status = 0
    except SystemExit as exit_:
        status = int(exit_.code)
    out, err = capsys.readouterr()
    return status, out, err


@pytest.fixture
def backup(roles_granted, media, tmp_path, capsys) -> Path:  # noqa: F811 (fixtures)
    """A backup of this test's database with one photo in the media store (a
    transactional test: pg_dump sees committed rows only)."""
    default_storage.save(PHOTO, ContentFile(b"\xff\xd8 a photo of a lug face \xff\xd9"))
    folder = tmp_path / "backup"
    status, _, err = run("backup", folder, capsys=capsys)
    assert status == 0, err
    return folder


def manifest_of(folder: Path) -> dict:
    return json.loads((folder / "manifest.json").read_text())


def rewrite_manifest(folder: Path, change) -> None:
    manifest = manifest_of(folder)
    change(manifest)
    (folder / "manifest.json").write_text(json.dumps(manifest))


def refused(folder: Path, capsys, *arguments: str) -> tuple[int, str]:
    """The restore's exit status and its one line on stderr; the database is unchanged."""
    jobs = Job.objects.count()
    status, out, err = run("restore", folder, *arguments, capsys=capsys)
    assert out == "" and err.count("\n") == 1 and err.startswith("restore: "), err
    assert Job.objects.count() == jobs
    return status, err.removeprefix("restore: ").strip()


def test_a_changed_media_file_is_refused_by_name(backup, capsys):
    (backup / "media" / PHOTO).write_bytes(b"another picture")
    assert refused(backup, capsys) == (
        1,
        f"Backup file media/{PHOTO} has changed since the backup was made.",
    )


def test_a_changed_database_file_is_refused(backup, capsys):
    copy = backup / "database.sqlite3"
    if not copy.exists():
        copy = backup / "database.pgdump"
    data = bytearray(copy.read_bytes())
    data[len(data) // 2] ^= 0xFF  # one flipped byte, same size
    copy.write_bytes(bytes(data))
    status, message = refused(backup, capsys)
    assert (
        status == 1 and message == f"Backup file {copy.name} has changed since the backup was made."
    )


def test_a_missing_file_is_refused_by_name(backup, capsys):
    (backup / "media" / PHOTO).unlink()
    assert refused(backup, capsys) == (1, f"Backup file media/{PHOTO} is missing.")


def test_a_file_added_after_the_backup_is_refused(backup, capsys):
    (backup / "media" / "added.pdf").write_bytes(b"%PDF-1.7 not from the backup")
    assert refused(backup, capsys) == (1, "Backup file media/added.pdf is not in the manifest.")


def test_an_edited_checksum_in_the_manifest_is_refused(backup, capsys):
    def edit(manifest):
        entry = next(e for e in manifest["files"] if e["path"] == f"media/{PHOTO}")
        entry["sha256"] = "0" * 64

    rewrite_manifest(backup, edit)
    status, message = refused(backup, capsys)
    assert status == 1 and message.startswith(f"Backup file media/{PHOTO} has changed")


def test_a_manifest_that_is_not_json_is_refused(backup, capsys):
    (backup / "manifest.json").write_text('{"format": "ampwright-backup", ')
    status, message = refused(backup, capsys)
    assert status == 1 and message.startswith("manifest.json is damaged: it is not readable JSON")


def test_a_manifest_naming_a_file_outside_the_folder_is_refused(backup, capsys):
    rewrite_manifest(
        backup,
        lambda m: m["files"].append({"path": "../outside.txt", "size": 1, "sha256": "0" * 64}),
    )
    assert refused(backup, capsys) == (
        1,
        "manifest.json is damaged: it names an unusable file '../outside.txt'.",
    )


def test_a_backup_from_a_newer_schema_is_refused(backup, capsys):
    rewrite_manifest(
        backup, lambda m: m["applied_migrations"]["shop"].append("9999_from_a_later_version")
    )
    status, message = refused(backup, capsys)
    assert status == 1
    assert message == (
        "This backup's schema is newer than this code (shop.9999_from_a_later_version unknown"
        " here): upgrade Ampwright to the version that made it first."
    )


def test_a_backup_in_a_newer_format_is_refused(backup, capsys):
    rewrite_manifest(backup, lambda m: m.update(format_version=2))
    status, message = refused(backup, capsys)
    assert status == 1 and message.startswith("This backup's format (version 2) is newer")


def test_a_folder_that_is_not_a_backup_is_a_usage_error(db, tmp_path, capsys):
    assert refused(tmp_path, capsys) == (
        2,
        f"{tmp_path} is not a backup: it has no manifest.json.",
    )
    assert refused(tmp_path / "nowhere", capsys) == (2, f"{tmp_path / 'nowhere'} is not a folder.")


def test_a_database_holding_records_is_refused_without_force(backup, capsys):
    make_job()
    status, message = refused(backup, capsys)
    assert status == 1
    assert message.startswith("The database already holds records (")
    assert "1 job" in message and message.endswith("pass --force to replace everything in it.")


@pytest.mark.skipif(
    connection.vendor != "sqlite",
    reason="the test database has the app's tables, which PostgreSQL refuses first",
)
def test_a_media_file_of_the_same_name_and_other_contents_is_refused(backup, capsys):
    default_storage.delete(PHOTO)
    default_storage.save(PHOTO, ContentFile(b"a newer photo taken since"))
    status, message = refused(backup, capsys)
    assert status == 1 and message == (
        f"The media store already holds {PHOTO} with other contents: pass --force to replace it."
    )
    with default_storage.open(PHOTO) as handle:
        assert handle.read() == b"a newer photo taken since"


def test_check_reports_an_intact_backup_and_changes_nothing(backup, capsys):
    make_job()  # a database in use: --check never touches it
    status, out, err = run("restore", backup, "--check", capsys=capsys)
    assert (status, err) == (0, "")
    assert out.startswith("Backup of ") and "is intact" in out
    assert f"{len(manifest_of(backup)['files'])} files match the manifest" in out
    assert Job.objects.count() == 1


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_a_different_signing_key_is_never_replaced(roles_granted, signing_key, tmp_path, capsys):  # noqa: F811
    folder = tmp_path / "with-key"
    status, _, _ = run("backup", folder, "--include-signing-key", capsys=capsys)
    assert status == 0
    site = tmp_path / "other-server"
    (site / "signing").mkdir(parents=True)
    (site / "signing" / "key.pem").write_text("another shop's key")
    for arguments in ((), ("--force",)):
        done = manage("restore", str(folder), *arguments, env=server_env(site))
        assert done.returncode == 1 and done.stderr.count("\n") == 1
        assert "already holds a different signing key or certificate" in done.stderr
        assert (site / "signing" / "key.pem").read_text() == "another shop's key"
    assert not (site / "media").exists()  # refused before anything was written


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_force_replaces_a_database_in_use(roles_granted, tmp_path, capsys):  # noqa: F811
    make_job()
    folder = tmp_path / "backup"
    assert run("backup", folder, capsys=capsys)[0] == 0
    site = tmp_path / "server"
    env = server_env(site)
    first = manage("restore", str(folder), env=env)
    assert first.returncode == 0, first.stderr
    assert "1 job," in first.stdout
    again = manage("restore", str(folder), env=env)
    assert again.returncode == 1 and "already holds records (" in again.stderr
    forced = manage("restore", str(folder), "--force", env=env)
    assert forced.returncode == 0, forced.stderr
    assert "1 job," in forced.stdout


def test_a_backup_of_another_kind_of_database_is_refused(backup, capsys):
    other = {"sqlite": "postgresql", "postgresql": "sqlite"}[connection.vendor]
    copy = next(p for p in backup.iterdir() if p.name.startswith("database."))
    renamed = {"sqlite": "database.sqlite3", "postgresql": "database.pgdump"}[other]
    copy.rename(backup / renamed)

    def edit(manifest):
        manifest["database"] = {"vendor": other, "file": renamed}
        next(e for e in manifest["files"] if e["path"] == copy.name)["path"] = renamed

    rewrite_manifest(backup, edit)
    status, message = refused(backup, capsys)
    assert status == 1 and message.endswith("restore it on a server of the same kind.")


@on_sqlite
@pytest.mark.django_db(transaction=True)
def test_a_backup_from_an_older_schema_is_restored_and_asks_for_migrate(
    roles_granted,  # noqa: F811
    tmp_path,
    capsys,
):
    import sqlite3

    from shop.backup.common import file_entry

    folder = tmp_path / "backup"
    assert run("backup", folder, capsys=capsys)[0] == 0
    # An older version's backup: its database had not applied this code's last shop
    # migration yet (the copy's row removed, the manifest made to match, as that version
    # would have written it).
    manifest = manifest_of(folder)
    latest = manifest["migrations"]["shop"]
    with sqlite3.connect(folder / "database.sqlite3") as copy:
        copy.execute("DELETE FROM django_migrations WHERE app = 'shop' AND name = ?", (latest,))
    copy.close()
    manifest["applied_migrations"]["shop"].remove(latest)
    manifest["migrations"]["shop"] = max(manifest["applied_migrations"]["shop"])
    manifest["files"] = [
        file_entry(folder, e["path"]) if e["path"] == "database.sqlite3" else e
        for e in manifest["files"]
    ]
    (folder / "manifest.json").write_text(json.dumps(manifest))

    done = manage("restore", str(folder), env=server_env(tmp_path / "server"))
    assert done.returncode == 0, done.stderr
    # The shop's latest migration and any that depend on it are still to apply.
    assert re.search(
        r"The backup's schema is older than this code \(\d+ migrations? to apply\):"
        r" run `python manage\.py migrate` now\.",
        done.stdout,
    )


def test_a_manifest_with_its_counts_replaced_is_refused(backup, capsys):
    rewrite_manifest(backup, lambda m: m.update(counts=["jobs"]))
    assert refused(backup, capsys) == (
        1,
        "manifest.json is damaged: its record counts are missing.",
    )
