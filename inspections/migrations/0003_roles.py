"""Give the staff roles their permissions on the inspections records.

Technicians and leads record torque readings (a correction is a new reading too), log
the heat-cycle run and take temperature readings; the office manages the torque wrenches;
everyone views everything. Nobody is given change or delete on the evidence: the models
and the database refuse both anyway. Audit events are written by the services, never
added by hand, so no role holds add_auditevent.
"""

from django.contrib.auth.management import create_permissions
from django.db import migrations

VIEW = [
    "view_stage",
    "view_torquewrench",
    "view_torquerecord",
    "view_heatcyclerun",
    "view_thermalreading",
    "view_auditevent",
]
RECORD = ["add_torquerecord", "add_heatcyclerun", "add_thermalreading"]
WRENCHES = ["add_torquewrench", "change_torquewrench"]
# Frozen copy of the inspections part of shop.roles at the time of this migration.
ROLE_PERMISSIONS = {
    "Technician": VIEW + RECORD,
    "Lead": VIEW + RECORD,
    "Office": VIEW + WRENCHES,
}


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
            *Permission.objects.filter(content_type__app_label="inspections", codename__in=codenames)
        )


def revoke(apps, schema_editor):
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    perms = Permission.objects.filter(content_type__app_label="inspections")
    for group in Group.objects.filter(name__in=ROLE_PERMISSIONS):
        group.permissions.remove(*perms)


class Migration(migrations.Migration):
    dependencies = [
        ("inspections", "0002_append_only_guards"),
        # After the role review, which sets each group to exactly its table and so would
        # take these permissions away again if it ran later.
        ("shop", "0003_role_review"),
    ]

    operations = [migrations.RunPython(grant, revoke)]
