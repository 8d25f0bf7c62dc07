"""PostgreSQL's side of the backup: pg_dump and pg_restore, found on PATH and given the
connection through libpq's environment variables (the password never appears on a
command line, where `ps` would show it)."""

from __future__ import annotations

import os
import shutil
import subprocess
from pathlib import Path

from shop.backup.common import BackupError

# A dump or a restore of a shop's database takes seconds to minutes; an hour means it hangs.
TIMEOUT_S = 3600


def tool(name: str) -> str:
    found = shutil.which(name)
    if not found:
        raise BackupError(
            f"{name} was not found on PATH: install the PostgreSQL client tools"
            " (Debian: postgresql-client) of the server's version or newer."
        )
    return found


def libpq_env(settings_dict: dict) -> dict[str, str]:
    env = dict(os.environ)
    options = settings_dict.get("OPTIONS") or {}
    for variable, value in (
        ("PGHOST", settings_dict.get("HOST")),
        ("PGPORT", settings_dict.get("PORT")),
        ("PGUSER", settings_dict.get("USER")),
        ("PGPASSWORD", settings_dict.get("PASSWORD")),
        ("PGDATABASE", settings_dict.get("NAME")),
        ("PGSSLMODE", options.get("sslmode")),
    ):
        if value not in (None, ""):
            env[variable] = str(value)
    return env


def _run(arguments: list[str], env: dict[str, str], what: str) -> None:
    try:
        done = subprocess.run(
            arguments, env=env, capture_output=True, text=True, timeout=TIMEOUT_S, check=False
        )
    except subprocess.TimeoutExpired:
        raise BackupError(f"{what} did not finish within {TIMEOUT_S // 60} minutes.") from None
    except OSError as error:
        raise BackupError(f"{what} could not be started: {error.strerror or error}.") from None
    if done.returncode != 0:
        lines = [line.strip() for line in done.stderr.splitlines() if line.strip()]
        # pg_restore ends with a count of errors; the first line says what went wrong.
        reason = lines[0] if lines else f"exit status {done.returncode}"
        raise BackupError(f"{what} failed: {reason}")


def dump(settings_dict: dict, target: Path, *, snapshot: str) -> None:
    """The database as of `snapshot` (exported by the transaction that counted the rows
    and read the migration state, so the manifest and the dump agree)."""
    arguments = [
        tool("pg_dump"),
        "--format=custom",
        "--no-password",
        f"--snapshot={snapshot}",
        f"--file={target}",
    ]
    _run(arguments, libpq_env(settings_dict), "pg_dump")


def restore(settings_dict: dict, source: Path, *, clean: bool) -> None:
    """All or nothing (one transaction). Objects are owned by the user the app connects
    as, whoever owned them where the dump was made."""
    env = libpq_env(settings_dict)
    arguments = [
        tool("pg_restore"),
        "--no-password",
        "--no-owner",
        "--no-privileges",
        "--single-transaction",
        "--exit-on-error",
        f"--dbname={env.get('PGDATABASE', '')}",
    ]
    if clean:
        arguments += ["--clean", "--if-exists"]
    _run([*arguments, str(source)], env, "pg_restore")
