"""The append-only guard of migration 0002 extended to the evidence added in 0004:
checklist marks, sign-offs and thermal waivers. Same triggers, same reasoning, same
limits (read 0002's docstring); 0002 itself is unchanged.

SQLite: a BEFORE UPDATE and a BEFORE DELETE trigger per table, ``SELECT RAISE(ABORT, ...)``.
PostgreSQL: the function ``inspections_refuse_change`` installed by 0002 (re-created here
with the very same body, so this migration stands on its own), attached BEFORE UPDATE OR
DELETE FOR EACH ROW. Reversing drops only this migration's triggers; the function stays
for 0002's.
"""

from django.db import migrations

# Frozen: table -> message. A later migration adding a table adds its own triggers.
GUARDED = {
    "inspections_checklistmark": "checklist marks are append-only",
    "inspections_signoff": "sign-offs are append-only",
    "inspections_thermalwaiver": "thermal waivers are append-only",
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
    dependencies = [("inspections", "0004_checklists_signoffs")]

    operations = [migrations.RunPython(install, remove)]
