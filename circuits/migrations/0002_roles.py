"""Give the staff roles their permissions on the electrical system."""

from django.contrib.auth.management import create_permissions
from django.db import migrations

VIEW = [
    "view_device",
    "view_terminal",
    "view_circuit",
    "view_termination",
    "view_torquedefault",
    "view_waiver",
]
EDIT = [
    "add_device",
    "change_device",
    "add_terminal",
    "change_terminal",
    "delete_terminal",
    "add_circuit",
    "change_circuit",
    "change_termination",
]
REMOVE = ["delete_device", "delete_circuit"]
# Frozen copy of shop.roles at the time of this migration.
ROLE_PERMISSIONS = {
    "Technician": VIEW + EDIT,
    "Lead": VIEW + EDIT + REMOVE + ["add_waiver", "delete_waiver"],
    "Office": VIEW
    + EDIT
    + REMOVE
    + ["add_torquedefault", "change_torquedefault", "delete_torquedefault"],
}


def grant(apps, schema_editor):
    for app_config in apps.get_app_configs():
        app_config.models_module = True
        create_permissions(app_config, apps=apps, verbosity=0)
        app_config.models_module = None
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    for role, codenames in ROLE_PERMISSIONS.items():
        group, _ = Group.objects.get_or_create(name=role)
        group.permissions.add(
            *Permission.objects.filter(content_type__app_label="circuits", codename__in=codenames)
        )


def revoke(apps, schema_editor):
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    perms = Permission.objects.filter(content_type__app_label="circuits")
    for group in Group.objects.filter(name__in=ROLE_PERMISSIONS):
        group.permissions.remove(*perms)


class Migration(migrations.Migration):
    dependencies = [
        ("circuits", "0001_initial"),
        ("shop", "0002_staff_roles"),
    ]

    operations = [migrations.RunPython(grant, revoke)]
