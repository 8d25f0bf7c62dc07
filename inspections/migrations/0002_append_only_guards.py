"""Database triggers that refuse UPDATE and DELETE on the append-only evidence tables
(torque records, thermal readings, audit events) from any path: the ORM, raw SQL, a
database shell. The models and querysets refuse too (inspections.models.base); this is
the layer that holds when code or a person goes around them.

SQLite: one BEFORE UPDATE and one BEFORE DELETE trigger per table, each
``SELECT RAISE(ABORT, ...)`` (the statement fails with a constraint error, which Django
raises as IntegrityError, and the transaction's earlier work is kept for rollback).

PostgreSQL: one plpgsql function raising restrict_violation (SQLSTATE 23001, also an
IntegrityError), attached BEFORE UPDATE OR DELETE FOR EACH ROW to each table.

What the guard does not cover, on purpose:

* Schema changes. Whoever may DROP TRIGGER may remove the guard; a trigger guards data,
  not the schema. Keep the application's database role away from DDL in production.
* PostgreSQL TRUNCATE fires no row triggers. Django's test runner empties tables between
  transactional tests with TRUNCATE on PostgreSQL, so that keeps working untouched.
* On SQLite the test runner empties tables with DELETE FROM, which these triggers refuse
  (they are real). A transactional test that leaves evidence rows behind must therefore
  clear them first, through tests/inspections/guards.py::clear_evidence(), which drops the
  triggers, deletes the rows and re-creates the triggers from their stored definition,
  all in one transaction. No table or setting lifts the guard for the application: an
  "unlock" row that ordinary DML could set would be a guard in name only. Tests that run
  inside a transaction (the default) roll back and need nothing.
* On SQLite, Django alters a table by building a new one and dropping the old, which
  drops its triggers. A later migration that alters one of these three models must
  install the triggers again; tests/inspections/test_db_guards.py fails when any of them
  is missing after all migrations.
"""

from django.db import migrations

# Frozen: table -> message. A later migration adding a table adds its own triggers.
GUARDED = {
    "inspections_torquerecord": "torque records are append-only",
    "inspections_thermalreading": "thermal readings are append-only",
    "inspections_auditevent": "audit events are append-only",
}
PG_FUNCTION = "inspections_refuse_change"


def _sqlite_trigger(table: str, operation: str, message: str) -> str:
    return (
        f'CREATE TRIGGER "{table}_no_{operation.lower()}" BEFORE {operation} ON "{table}" '
        f"BEGIN SELECT RAISE(ABORT, '{message}: {operation} refused'); END;"
    )


def install(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    # params=None: no placeholder parsing, so the SQL is sent exactly as written.
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
        # Refuse to migrate rather than run without the guard the records rely on.
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
        schema_editor.execute(f"DROP FUNCTION IF EXISTS {PG_FUNCTION}();", None)


class Migration(migrations.Migration):
    dependencies = [("inspections", "0001_initial")]

    operations = [migrations.RunPython(install, remove)]
