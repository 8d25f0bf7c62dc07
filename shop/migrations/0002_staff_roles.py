"""Create the staff roles (technician, lead, office) as groups with their permissions."""

from django.contrib.auth.management import create_permissions
from django.db import migrations

# Frozen copy: a migration must not change when shop.roles changes later.
ROLE_PERMISSIONS = {
    "Technician": [
        "shop.view_owner",
        "shop.view_vehicle",
        "shop.view_job",
        "shop.view_shopprofile",
    ],
    "Lead": [
        "shop.view_owner",
        "shop.view_vehicle",
        "shop.view_job",
        "shop.view_shopprofile",
        "shop.add_owner",
        "shop.change_owner",
        "shop.add_vehicle",
        "shop.change_vehicle",
        "shop.add_job",
        "shop.change_job",
    ],
    "Office": [
        "shop.view_owner",
        "shop.view_vehicle",
        "shop.view_job",
        "shop.view_shopprofile",
        "shop.add_owner",
        "shop.change_owner",
        "shop.add_vehicle",
        "shop.change_vehicle",
        "shop.add_job",
        "shop.change_job",
        "shop.delete_owner",
        "shop.delete_vehicle",
        "shop.delete_job",
        "shop.change_shopprofile",
        "auth.view_user",
        "auth.add_user",
        "auth.change_user",
    ],
}


def create_roles(apps, schema_editor):
    # Permissions are normally created after all migrations; make sure they exist now.
    for app_config in apps.get_app_configs():
        app_config.models_module = True
        create_permissions(app_config, apps=apps, verbosity=0)
        app_config.models_module = None
    Group = apps.get_model("auth", "Group")
    Permission = apps.get_model("auth", "Permission")
    for role, perms in ROLE_PERMISSIONS.items():
        group, _ = Group.objects.get_or_create(name=role)
        for perm in perms:
            app_label, codename = perm.split(".")
            group.permissions.add(
                Permission.objects.get(content_type__app_label=app_label, codename=codename)
            )


def remove_roles(apps, schema_editor):
    apps.get_model("auth", "Group").objects.filter(name__in=ROLE_PERMISSIONS).delete()


class Migration(migrations.Migration):
    dependencies = [
        ("shop", "0001_initial"),
        ("auth", "0012_alter_user_first_name_max_length"),
        ("contenttypes", "0002_remove_content_type_name"),
    ]

    operations = [migrations.RunPython(create_roles, remove_roles)]
