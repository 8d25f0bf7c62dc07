"""Test-only helpers around the append-only guards (inspections/migrations/
0002_append_only_guards.py and 0005_append_only_guards_signoffs.py, and the wiring
record's wiring/migrations/0002_append_only_guards.py).

`clear_evidence()` is for transactional tests that leave evidence rows behind: on SQLite
the test runner empties tables with DELETE FROM, which the triggers refuse. It removes the
triggers, deletes the rows and puts the very same triggers back (read from the schema, so
nothing here can drift from the migrations), in one transaction. On PostgreSQL it
TRUNCATEs the guarded tables, as the runner's own flush does: row triggers do not see it.

`grant_inspection_roles()` gives the role groups their inspections permissions again after
a flush, from the migrations' frozen tables (0003_roles, 0006_gate_roles), until
shop.roles.ROLE_PERMISSIONS lists them (sync_role_groups() restores only what that table
lists).
"""

from __future__ import annotations

import importlib

from django.db import connection, transaction

# Dependants first, so the deletion below never leaves a row pointing at a deleted one.
GUARDED_TABLES = (
    # The wiring record's revisions point at the approval sign-off: they go first.
    "wiring_recordrevision",
    "wiring_ownerlinkvisit",
    # A return visit's last record (inspections 0009): its readings before it.
    "inspections_priorreading",
    "inspections_priorrecord",
    "inspections_signoff",
    "inspections_checklistmark",
    "inspections_thermalwaiver",
    "inspections_torquerecord",
    "inspections_thermalreading",
    "inspections_auditevent",
)
_IN = "(" + ", ".join(["%s"] * len(GUARDED_TABLES)) + ")"
ROLE_MIGRATIONS = ("inspections.migrations.0003_roles", "inspections.migrations.0006_gate_roles")


def guard_triggers() -> list[str]:
    """Names of the triggers installed on the guarded tables."""
    with connection.cursor() as cursor:
        if connection.vendor == "sqlite":
            cursor.execute(
                f"SELECT name FROM sqlite_master WHERE type = 'trigger' AND tbl_name IN {_IN}",
                GUARDED_TABLES,
            )
        else:
            cursor.execute(
                "SELECT t.tgname FROM pg_trigger t JOIN pg_class c ON c.oid = t.tgrelid"
                f" WHERE NOT t.tgisinternal AND c.relname IN {_IN}",
                GUARDED_TABLES,
            )
        return sorted(row[0] for row in cursor.fetchall())


def clear_evidence() -> None:
    if connection.vendor != "sqlite":
        with transaction.atomic(), connection.cursor() as cursor:
            cursor.execute("TRUNCATE " + ", ".join(f'"{table}"' for table in GUARDED_TABLES))
        return
    with transaction.atomic(), connection.cursor() as cursor:
        cursor.execute(
            f"SELECT name, sql FROM sqlite_master WHERE type = 'trigger' AND tbl_name IN {_IN}",
            GUARDED_TABLES,
        )
        triggers = cursor.fetchall()
        for name, _ in triggers:
            cursor.execute(f'DROP TRIGGER "{name}"')
        for table in GUARDED_TABLES:
            cursor.execute(f'DELETE FROM "{table}"')
        for _, sql in triggers:
            cursor.execute(sql)


def grant_inspection_roles() -> None:
    from django.contrib.auth.models import Group, Permission

    for module in ROLE_MIGRATIONS:
        table = importlib.import_module(module).ROLE_PERMISSIONS
        for role, codenames in table.items():
            group, _ = Group.objects.get_or_create(name=role)
            group.permissions.add(
                *Permission.objects.filter(
                    content_type__app_label="inspections", codename__in=codenames
                )
            )
