"""The role review: shop-wide permissions (manage staff, work on any job, update circuits
by import) and each role's permissions set to the reviewed table.

Torque specs move from office to lead; delete_terminal leaves the technician set; office
loses auth.add_user/change_user/view_user (staff are managed in the app through
shop.manage_staff). Permissions no longer listed are removed, as sync_role_groups() does.
"""

from django.contrib.auth.management import create_permissions
from django.db import migrations

_VIEW_SHOP = ["shop.view_owner", "shop.view_vehicle", "shop.view_job", "shop.view_shopprofile"]
_EDIT_RECORDS = [
    "shop.add_owner",
    "shop.change_owner",
    "shop.add_vehicle",
    "shop.change_vehicle",
    "shop.add_job",
    "shop.change_job",
]
_VIEW_SYSTEM = [
    "circuits.view_device",
    "circuits.view_terminal",
    "circuits.view_circuit",
    "circuits.view_termination",
    "circuits.view_torquedefault",
    "circuits.view_waiver",
]
_EDIT_SYSTEM = [
    "circuits.add_device",
    "circuits.change_device",
    "circuits.add_terminal",
    "circuits.change_terminal",
    "circuits.add_circuit",
    "circuits.change_circuit",
    "circuits.change_termination",
]
_REMOVE_SYSTEM = ["circuits.delete_device", "circuits.delete_terminal", "circuits.delete_circuit"]
_TORQUE_SPECS = [
    "circuits.add_torquedefault",
    "circuits.change_torquedefault",
    "circuits.delete_torquedefault",
]

# Frozen copy of shop.roles.ROLE_PERMISSIONS at the time of this migration.
ROLE_PERMISSIONS = {
    "Technician": _VIEW_SHOP + _VIEW_SYSTEM + _EDIT_SYSTEM,
    "Lead": _VIEW_SHOP
    + _EDIT_RECORDS
    + _VIEW_SYSTEM
    + _EDIT_SYSTEM
    + _REMOVE_SYSTEM
    + ["shop.work_on_any_job"]
    + _TORQUE_SPECS
    + ["shop.import_circuit_updates", "circuits.add_waiver", "circuits.delete_waiver"],
    "Office": _VIEW_SHOP
    + _EDIT_RECORDS
    + _VIEW_SYSTEM
    + _EDIT_SYSTEM
    + _REMOVE_SYSTEM
    + [
        "shop.work_on_any_job",
        "shop.delete_owner",
        "shop.delete_vehicle",
        "shop.delete_job",
        "shop.change_shopprofile",
        "shop.manage_staff",
    ],
}

# The table before this migration (shop/0002_staff_roles plus circuits/0002_roles), for
# going back.
_OLD_EDIT_SYSTEM = [*_EDIT_SYSTEM, "circuits.delete_terminal"]
_OLD_REMOVE = ["circuits.delete_device", "circuits.delete_circuit"]
PREVIOUS_ROLE_PERMISSIONS = {
    "Technician": _VIEW_SHOP + _VIEW_SYSTEM + _OLD_EDIT_SYSTEM,
    "Lead": _VIEW_SHOP
    + _EDIT_RECORDS
    + _VIEW_SYSTEM
    + _OLD_EDIT_SYSTEM
    + _OLD_REMOVE
    + ["circuits.add_waiver", "circuits.delete_waiver"],
    "Office": _VIEW_SHOP
    + _EDIT_RECORDS
    + _VIEW_SYSTEM
    + _OLD_EDIT_SYSTEM
    + _OLD_REMOVE
    + _TORQUE_SPECS
    + [
        "shop.delete_owner",
        "shop.delete_vehicle",
        "shop.delete_job",
        "shop.change_shopprofile",
        "auth.view_user",
        "auth.add_user",
        "auth.change_user",
    ],
}


def _set_roles(apps, table):
    # Permissions are normally created after all migrations; make sure they exist now
    # (the three new shop permissions included).
    for app_config in apps.get_app_configs():
        app_config.models_module = True
        create_permissions(app_config, apps=apps, verbosity=0)
        app_config.models_module = None
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    for role, perms in table.items():
        group, _ = Group.objects.get_or_create(name=role)
        wanted = []
        for perm in perms:
            app_label, codename = perm.split(".")
            wanted.append(
                Permission.objects.get(content_type__app_label=app_label, codename=codename)
            )
        group.permissions.set(wanted)


def review_roles(apps, schema_editor):
    _set_roles(apps, ROLE_PERMISSIONS)


def restore_roles(apps, schema_editor):
    _set_roles(apps, PREVIOUS_ROLE_PERMISSIONS)


class Migration(migrations.Migration):
    dependencies = [
        ("shop", "0002_staff_roles"),
        ("circuits", "0002_roles"),
    ]

    operations = [
        migrations.AlterModelOptions(
            name="shopprofile",
            options={
                "permissions": [
                    (
                        "manage_staff",
                        "Can add staff, change their role, deactivate them and send password "
                        "links",
                    ),
                    (
                        "work_on_any_job",
                        "Can write to any job, not only the jobs they are assigned to",
                    ),
                    ("import_circuit_updates", "Can update existing circuits by CSV import"),
                ],
                "verbose_name": "shop profile",
            },
        ),
        migrations.RunPython(review_roles, restore_roles),
    ]
