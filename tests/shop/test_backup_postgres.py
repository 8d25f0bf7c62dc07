"""`backup` and `restore` on PostgreSQL: pg_dump in custom format while a tablet keeps
writing readings, restored with pg_restore into a scratch database of its own, which then
holds every reading committed before the backup began and a record that verifies there.
Runs in CI's PostgreSQL pass (DATABASE_URL=postgres://...); skipped on SQLite."""

from __future__ import annotations

import json
import threading
import uuid
from urllib.parse import quote

import pytest
from django.db import connection

from inspections.models import Stage, TorqueRecord
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import make_spec_circuit, make_wrench, read
from tests.shop.test_backup import (  # noqa: F401 (fixtures)
    manage,
    media,
    roles_granted,
    run_backup,
    server_env,
    shop_with_record,
    signing_key,
)

pytestmark = pytest.mark.skipif(
    connection.vendor != "postgresql",
    reason="PostgreSQL only: run with DATABASE_URL=postgres://... (SQLite: test_backup)",
)


def url_for(name: str) -> str:
    settings = connection.settings_dict
    user = quote(settings.get("USER") or "", safe="")
    password = settings.get("PASSWORD") or ""
    auth = f"{user}:{quote(password, safe='')}@" if password else (f"{user}@" if user else "")
    host = settings.get("HOST") or "127.0.0.1"
    port = settings.get("PORT") or 5432
    return f"postgres://{auth}{host}:{port}/{name}"


@pytest.fixture
def scratch_database():
    """A new, empty database beside the test database, dropped afterwards."""
    import psycopg

    name = f"{connection.settings_dict['NAME']}_restore_{uuid.uuid4().hex[:8]}"
    admin = psycopg.connect(url_for("postgres"), autocommit=True)
    admin.execute(f'CREATE DATABASE "{name}"')
    try:
        yield name
    finally:
        admin.execute(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
        admin.close()


def rows(name: str, sql: str, *params) -> list[tuple]:
    import psycopg

    with psycopg.connect(url_for(name)) as db:
        return db.execute(sql, params).fetchall()


@pytest.mark.django_db(transaction=True)
def test_pg_dump_while_readings_are_written_restores_into_a_scratch_database(
    shop_with_record,  # noqa: F811
    scratch_database,
    settings,
    tmp_path,
    capsys,
):
    technician = make_user(roles.TECHNICIAN)
    job = make_job(technicians=[technician])
    install = Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL)
    ends = [t for _ in range(5) for t in make_spec_circuit(job).terminations.order_by("pk")]
    wrench = make_wrench()
    started, failures = threading.Event(), []

    def tablet() -> None:
        try:
            for number in range(60):
                read(ends[number % len(ends)], install, "10", technician=technician, wrench=wrench)
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
    assert failures == []
    assert "PostgreSQL database" in out
    manifest = json.loads((tmp_path / "backup" / "manifest.json").read_text())
    assert manifest["database"]["vendor"] == "postgresql" and manifest["database"]["version"]
    assert manifest["counts"]["readings"] >= len(committed)
    # pg_dump's custom-format archive begins with the magic "PGDMP" (PostgreSQL source,
    # src/bin/pg_dump/pg_backup_archiver.c, WriteHead).
    assert (tmp_path / "backup" / "database.pgdump").read_bytes()[:5] == b"PGDMP"

    site = tmp_path / "restored-server"
    env = server_env(site, DATABASE_URL=url_for(scratch_database))
    restored = manage("restore", str(tmp_path / "backup"), env=env)
    assert restored.returncode == 0, restored.stderr
    assert "1 record revision" in restored.stdout
    in_restored = {
        pk for (pk,) in rows(scratch_database, "SELECT id FROM inspections_torquerecord")
    }
    assert committed <= in_restored
    audit = rows(
        scratch_database, "SELECT COUNT(*) FROM inspections_auditevent WHERE kind = 'reading'"
    )[0][0]
    assert audit == len(in_restored)  # one consistent snapshot: each reading with its event
    # The append-only guards came back with the tables.
    triggers = rows(
        scratch_database,
        "SELECT COUNT(*) FROM pg_trigger t JOIN pg_class c ON c.oid = t.tgrelid"
        " WHERE NOT t.tgisinternal AND c.relname = 'inspections_torquerecord'",
    )[0][0]
    assert triggers > 0
    revision = shop_with_record["revision"]
    verify_env = dict(env, SIGNING_DIR=str(settings.SIGNING_DIR))
    verified = manage("verify_record", str(site / "media" / revision.file.name), env=verify_env)
    assert verified.returncode == 0, verified.stderr

    # The scratch database now holds records: a second restore needs --force, which
    # drops and recreates the tables (pg_restore --clean --if-exists).
    again = manage("restore", str(tmp_path / "backup"), env=env)
    assert again.returncode == 1 and "already holds records (" in again.stderr
    forced = manage("restore", str(tmp_path / "backup"), "--force", env=env)
    assert forced.returncode == 0, forced.stderr
    assert rows(scratch_database, "SELECT COUNT(*) FROM inspections_torquerecord")[0][0] == len(
        in_restored
    )


@pytest.mark.django_db(transaction=True)
def test_a_migrated_but_empty_database_needs_force(roles_granted, tmp_path, capsys):  # noqa: F811
    # The test database itself has Ampwright's tables and no records.
    status, _, err = run_backup(tmp_path / "backup", capsys=capsys)
    assert status == 0, err
    env = server_env(tmp_path / "server", DATABASE_URL=url_for(connection.settings_dict["NAME"]))
    done = manage("restore", str(tmp_path / "backup"), env=env)
    assert done.returncode == 1 and done.stderr.count("\n") == 1
    assert "already has Ampwright's tables (no records)" in done.stderr


@pytest.mark.django_db(transaction=True)
def test_pg_dump_missing_from_path_is_one_clear_line(roles_granted, tmp_path, monkeypatch, capsys):  # noqa: F811
    monkeypatch.setenv("PATH", str(tmp_path / "empty-bin"))
    status, out, err = run_backup(tmp_path / "backup", capsys=capsys)
    assert status == 1 and out == ""
    assert err == (
        "backup: pg_dump was not found on PATH: install the PostgreSQL client tools"
        " (Debian: postgresql-client) of the server's version or newer.\n"
    )
    assert not (tmp_path / "backup").exists()
