"""Give the staff roles the insight pages.

* Leads: all of them (loosening and wrenches, the per-technician page, and making and
  retiring shop rules).
* Office: the loosening and wrench pages and the list of shop rules (view_insights); not
  the per-technician page, which is for coaching by the leads.
* Technicians: none: the per-technician figures are never shown to other technicians.

Frozen copy of the insights part of shop.roles at the time of this migration.
"""

from django.contrib.auth.management import create_permissions
from django.db import migrations

ROLE_PERMISSIONS = {
    "Lead": ["view_insights", "view_technician_insights", "manage_shop_rules"],
    "Office": ["view_insights"],
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
            *Permission.objects.filter(content_type__app_label="insights", codename__in=codenames)
        )


def revoke(apps, schema_editor):
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    perms = Permission.objects.filter(content_type__app_label="insights")
    for group in Group.objects.filter(name__in=ROLE_PERMISSIONS):
        group.permissions.remove(*perms)


class Migration(migrations.Migration):
    dependencies = [
        ("insights", "0001_initial"),
        # After the role review, which sets each group to exactly its table and would take
        # these permissions away again if it ran later.
        ("shop", "0003_role_review"),
    ]

    operations = [migrations.RunPython(grant, revoke)]
