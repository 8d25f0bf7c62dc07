"""Settings actually in force: SQLite journal mode, and a clean deploy check."""

from __future__ import annotations

import os
import subprocess
import sys
from pathlib import Path

import pytest
from django.conf import settings
from django.db import connection

ROOT = Path(__file__).resolve().parents[2]
sqlite_only = pytest.mark.skipif(
    settings.DATABASES["default"]["ENGINE"] != "django.db.backends.sqlite3",
    reason="SQLite settings apply only without DATABASE_URL",
)


@sqlite_only
@pytest.mark.django_db
def test_sqlite_runs_in_wal_mode_with_normal_sync_and_a_busy_timeout():
    with connection.cursor() as cursor:
        cursor.execute("PRAGMA journal_mode")
        assert cursor.fetchone()[0] == "wal"
        cursor.execute("PRAGMA synchronous")
        assert cursor.fetchone()[0] == 1  # SQLite docs: 0 OFF, 1 NORMAL, 2 FULL, 3 EXTRA
        cursor.execute("PRAGMA busy_timeout")
        assert cursor.fetchone()[0] == 20_000  # milliseconds: the 20 s timeout option
    assert settings.DATABASES["default"]["OPTIONS"]["transaction_mode"] == "IMMEDIATE"


def test_requests_are_not_wrapped_in_one_transaction():
    assert not settings.DATABASES["default"].get("ATOMIC_REQUESTS", False)


def _run(*args: str, **env: str) -> subprocess.CompletedProcess:
    # A production-like environment: no test database URL, no test-only async switch.
    dropped = {"DATABASE_URL", "DJANGO_ALLOW_ASYNC_UNSAFE"}
    full_env = {k: v for k, v in os.environ.items() if k not in dropped}
    full_env.update(env)
    return subprocess.run(
        [sys.executable, "manage.py", *args],
        cwd=ROOT,
        env=full_env,
        capture_output=True,
        text=True,
        timeout=120,
    )


def test_production_mode_passes_the_deploy_check(tmp_path):
    result = _run(
        "check",
        "--deploy",
        "--fail-level",
        "WARNING",
        DEBUG="0",
        SECRET_KEY="k" * 10 + "-production-secret-key-for-the-check-only-0123456789",
        ALLOWED_HOSTS="ampwright.shop.example",
        CSRF_TRUSTED_ORIGINS="https://ampwright.shop.example",
        AMPWRIGHT_VAR_DIR=str(tmp_path),
    )
    assert result.returncode == 0, result.stderr + result.stdout
    assert "no issues" in result.stdout


def test_secret_key_is_generated_once_into_the_var_folder(tmp_path):
    env = {"AMPWRIGHT_VAR_DIR": str(tmp_path), "SECRET_KEY": ""}
    code = "from django.conf import settings; print(settings.SECRET_KEY)"
    first = _run("shell", "--no-imports", "-c", code, **env).stdout.strip()
    second = _run("shell", "--no-imports", "-c", code, **env).stdout.strip()
    assert len(first) >= 50
    assert first == second == (tmp_path / "secret_key").read_text().strip()


@pytest.mark.skipif(not os.environ.get("DATABASE_URL"), reason="only with DATABASE_URL")
@pytest.mark.django_db
def test_database_url_selects_postgresql_through_psycopg3():
    assert connection.vendor == "postgresql"
    import psycopg

    assert connection.connection.__class__.__module__.startswith("psycopg")
    assert psycopg.__version__.startswith("3.")
