"""The append-only guard of inspections/0002_append_only_guards extended to the wiring
record's issued revisions and the owner links' visit log: the same triggers, reasoning
and limits (read that migration's docstring).

SQLite: a BEFORE UPDATE and a BEFORE DELETE trigger per table, ``SELECT RAISE(ABORT, ...)``.
PostgreSQL: the function ``inspections_refuse_change`` (re-created here with the very same
body as inspections/0002, so this migration stands on its own), attached BEFORE UPDATE OR
DELETE FOR EACH ROW. Reversing drops only this migration's triggers.

A transactional test on SQLite that leaves rows in these tables must clear them the way
tests/inspections/guards.py::clear_evidence() clears the inspections evidence.
"""

from django.db import migrations

# Frozen: table -> message.
GUARDED = {
    "wiring_recordrevision": "record revisions are append-only",
    "wiring_ownerlinkvisit": "owner link visits are append-only",
}
PG_FUNCTION = "inspections_refuse_change"


def _sqlite_trigger(table: str, operation: str, message: str) -> str:
    return (
        f'CREATE TRIGGER "{table}_no_{operation.lower()}" BEFORE {operation} ON "{table}" '
        f"BEGIN SELECT RAISE(ABORT, '{message}: {operation} refused'); END;"
    )


def install(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    if vendor == "sqlite":
        for table, message in GUARDED.items():
            for operation in ("UPDATE", "DELETE"):
                schema_editor.execute(_sqlite_trigger(table, operation, message), None)
    elif vendor == "postgresql":
        schema_editor.execute(
            f"CREATE OR REPLACE FUNCTION {PG_FUNCTION}() RETURNS trigger LANGUAGE plpgsql AS $$\n"
            "BEGIN\n"
            "  RAISE EXCEPTION USING\n"
            "    MESSAGE = TG_ARGV[0] || ': ' || TG_OP || ' refused',\n"
            "    ERRCODE = 'restrict_violation';\n"
            "END;\n"
            "$$;",
            None,
        )
        for table, message in GUARDED.items():
            schema_editor.execute(
                f'CREATE TRIGGER "{table}_append_only" BEFORE UPDATE OR DELETE ON "{table}" '
                f"FOR EACH ROW EXECUTE FUNCTION {PG_FUNCTION}('{message}');",
                None,
            )
    else:
        raise RuntimeError(
            f"No append-only guard is written for the {vendor} database; "
            "Ampwright supports SQLite and PostgreSQL."
        )


def remove(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    if vendor == "sqlite":
        for table in GUARDED:
            for operation in ("update", "delete"):
                schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_no_{operation}";', None)
    elif vendor == "postgresql":
        for table in GUARDED:
            schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_append_only" ON "{table}";', None)


class Migration(migrations.Migration):
    dependencies = [("wiring", "0001_initial"), ("inspections", "0005_append_only_guards_signoffs")]

    operations = [migrations.RunPython(install, remove)]
