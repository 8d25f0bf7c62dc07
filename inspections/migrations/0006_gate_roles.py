"""Give the staff roles what the checklists, sign-offs and gates need.

* Technicians and leads mark checklist items (add_checklistmark) and sign the first
  install and retorque stages (sign_stage): a lead who did the work signs it as well.
* Leads alone review (approve_job: approve for handover, or send a stage back), reopen an
  approved job (reopen_job) and waive a hot connection (waive_thermal).
* The office keeps the shop's own checklist (manage_checklist) and signs nothing.
* Everyone reads the new records.

Nobody is given add, change or delete on marks, sign-offs or thermal waivers beyond the
above: the services write them, and the models and the database refuse changes anyway.
Frozen copy of the inspections part of shop.roles at the time of this migration (the
lead engineer adds the same lines to shop.roles.ROLE_PERMISSIONS).
"""

from django.contrib.auth.management import create_permissions
from django.db import migrations

VIEW = [
    "view_checklistmark",
    "view_shopchecklistitem",
    "view_signoff",
    "view_thermalwaiver",
]
WORK = ["add_checklistmark", "sign_stage"]
REVIEW = ["approve_job", "reopen_job", "waive_thermal"]
CHECKLIST = ["manage_checklist"]
ROLE_PERMISSIONS = {
    "Technician": VIEW + WORK,
    "Lead": VIEW + WORK + REVIEW,
    "Office": VIEW + CHECKLIST,
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
    every = {codename for codenames in ROLE_PERMISSIONS.values() for codename in codenames}
    perms = Permission.objects.filter(content_type__app_label="inspections", codename__in=every)
    for group in Group.objects.filter(name__in=ROLE_PERMISSIONS):
        group.permissions.remove(*perms)


class Migration(migrations.Migration):
    dependencies = [
        ("inspections", "0005_append_only_guards_signoffs"),
        ("inspections", "0003_roles"),
        # After the role review, which sets each group to exactly its table and would take
        # these permissions away again if it ran later.
        ("shop", "0003_role_review"),
    ]

    operations = [migrations.RunPython(grant, revoke)]
