"""The reminder log is append-only like the evidence (the same triggers as
inspections/0002_append_only_guards; read its docstring), and leads and office see the
re-checks page (`reminders.view_rechecks`); technicians do not.

Frozen copies: the table and message below, and the reminders part of shop.roles."""

from django.contrib.auth.management import create_permissions
from django.db import migrations

GUARDED = {"reminders_remindersent": "re-check reminders sent are append-only"}
PG_FUNCTION = "inspections_refuse_change"
ROLE_PERMISSIONS = {"Lead": ["view_rechecks"], "Office": ["view_rechecks"]}


def install(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    for table, message in GUARDED.items():
        if vendor == "sqlite":
            for operation in ("UPDATE", "DELETE"):
                schema_editor.execute(
                    f'CREATE TRIGGER "{table}_no_{operation.lower()}" BEFORE {operation} '
                    f"ON \"{table}\" BEGIN SELECT RAISE(ABORT, '{message}: {operation} refused'); "
                    "END;",
                    None,
                )
        elif vendor == "postgresql":
            # The function is installed by inspections/0002 (and re-created by 0005).
            schema_editor.execute(
                f'CREATE TRIGGER "{table}_append_only" BEFORE UPDATE OR DELETE ON "{table}" '
                f"FOR EACH ROW EXECUTE FUNCTION {PG_FUNCTION}('{message}');",
                None,
            )
        else:
            raise RuntimeError(f"No append-only guard is written for the {vendor} database.")


def remove(apps, schema_editor):
    vendor = schema_editor.connection.vendor
    for table in GUARDED:
        if vendor == "sqlite":
            for operation in ("update", "delete"):
                schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_no_{operation}";', None)
        elif vendor == "postgresql":
            schema_editor.execute(f'DROP TRIGGER IF EXISTS "{table}_append_only" ON "{table}";')


def grant(apps, schema_editor):
    # Permissions are normally created after all migrations; make sure they exist now.
    for app_config in apps.get_app_configs():
        app_config.models_module = True
        create_permissions(app_config, apps=apps, verbosity=0)
        app_config.models_module = None
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    for role, codenames in ROLE_PERMISSIONS.items():
        group, _ = Group.objects.get_or_create(name=role)
        group.permissions.add(
            *Permission.objects.filter(content_type__app_label="reminders", codename__in=codenames)
        )


def revoke(apps, schema_editor):
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    perms = Permission.objects.filter(content_type__app_label="reminders")
    for group in Group.objects.filter(name__in=ROLE_PERMISSIONS):
        group.permissions.remove(*perms)


class Migration(migrations.Migration):
    dependencies = [
        ("reminders", "0001_reminder_log"),
        # The function the PostgreSQL trigger calls.
        ("inspections", "0002_append_only_guards"),
        # After the role review, which sets each group to exactly its table.
        ("shop", "0003_role_review"),
    ]

    operations = [migrations.RunPython(install, remove), migrations.RunPython(grant, revoke)]
