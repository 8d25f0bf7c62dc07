"""Staff roles as Django groups, and the permissions each one holds.

What a shop expects of each role:

- Technician: reads every job; writes down what they install (devices, terminals, circuits,
  terminations) on the jobs they are assigned to (Job.technicians, checked by
  shop.views.access); imports new circuits by CSV into those jobs. Removes nothing.
- Lead: runs jobs: edits owners, vehicles and jobs (and so who is assigned), writes to any
  job's system, removes devices, terminals and circuits, updates circuits by CSV import,
  waives findings, and keeps the shop's torque specs (engineering data).
- Office: books work in: owners, vehicles and jobs (and deletes them), the shop profile,
  staff accounts (`shop.manage_staff`: add, role, deactivate, password-set link; never
  staff or superuser flags); writes to any job's system and removes from it; reads torque
  specs. Holds no auth.* permission: staff are managed in the app, not the admin.

Everyone reads the inspections records; technicians and leads add readings, the office
keeps the torque wrenches.

Migrations keep the groups in line: `shop/0002_staff_roles` and `circuits/0002_roles`
created them, `shop/0003_role_review` set them to this table, `inspections/0003_roles`
added the inspections part. A later permission gets its own data migration and an entry
here; `sync_role_groups()` makes the groups match exactly.
"""

from __future__ import annotations

TECHNICIAN = "Technician"
LEAD = "Lead"
OFFICE = "Office"
ROLES = (TECHNICIAN, LEAD, OFFICE)

_VIEW_SHOP = [
    "shop.view_owner",
    "shop.view_vehicle",
    "shop.view_job",
    "shop.view_shopprofile",
]
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
# Technicians write down what they install (on their own jobs); removal is lead or
# office work, so no delete permission is in this list.
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
# Leads and office are not limited to the jobs they are assigned to.
_ANY_JOB = ["shop.work_on_any_job"]
# Torque specs are engineering data: the lead keeps them, everyone else reads them.
_TORQUE_SPECS = [
    "circuits.add_torquedefault",
    "circuits.change_torquedefault",
    "circuits.delete_torquedefault",
]

# Inspections records (mirrored by inspections/0003_roles): readings are only ever added
# (a correction is a new reading), so no role changes or deletes them; the office keeps
# the torque wrenches.
_VIEW_INSPECTIONS = [
    "inspections.view_stage",
    "inspections.view_torquewrench",
    "inspections.view_torquerecord",
    "inspections.view_heatcyclerun",
    "inspections.view_thermalreading",
    "inspections.view_auditevent",
]
_RECORD_INSPECTIONS = [
    "inspections.add_torquerecord",
    "inspections.add_heatcyclerun",
    "inspections.add_thermalreading",
]
_WRENCHES = ["inspections.add_torquewrench", "inspections.change_torquewrench"]
# Checklists, sign-offs and gates (mirrored by inspections/0006_gate_roles): technicians
# and leads mark items and sign their stages; leads alone approve, reopen and waive a hot
# connection; the office keeps the shop's own checklist and signs nothing.
_VIEW_GATES = [
    "inspections.view_checklistmark",
    "inspections.view_shopchecklistitem",
    "inspections.view_signoff",
    "inspections.view_thermalwaiver",
]
_WORK = ["inspections.add_checklistmark", "inspections.sign_stage"]
_REVIEW = ["inspections.approve_job", "inspections.reopen_job", "inspections.waive_thermal"]
# The shop insight pages (mirrored by insights/0002_roles): leads and office see the
# loosening and wrench figures and the shop rules; leads alone see the per-technician
# figures (coaching) and make and retire rules; technicians see none of it.
_INSIGHTS = ["insights.view_insights"]
_LEAD_INSIGHTS = ["insights.view_technician_insights", "insights.manage_shop_rules"]
# The vehicles due for their re-check (mirrored by reminders/0002): leads and office.
_RECHECKS = ["reminders.view_rechecks"]

# Mirrored, frozen, by the data migrations shop/0003_role_review (shop and circuits) and
# inspections/0003_roles (inspections).
ROLE_PERMISSIONS: dict[str, list[str]] = {
    TECHNICIAN: [
        *_VIEW_SHOP,
        *_VIEW_SYSTEM,
        *_EDIT_SYSTEM,
        *_VIEW_INSPECTIONS,
        *_RECORD_INSPECTIONS,
        *_VIEW_GATES,
        *_WORK,
    ],
    LEAD: [
        *_VIEW_SHOP,
        *_EDIT_RECORDS,
        *_VIEW_SYSTEM,
        *_EDIT_SYSTEM,
        *_REMOVE_SYSTEM,
        *_ANY_JOB,
        *_TORQUE_SPECS,
        "shop.import_circuit_updates",
        "circuits.add_waiver",
        "circuits.delete_waiver",
        *_VIEW_INSPECTIONS,
        *_RECORD_INSPECTIONS,
        *_VIEW_GATES,
        *_WORK,
        *_REVIEW,
        *_INSIGHTS,
        *_LEAD_INSIGHTS,
        *_RECHECKS,
    ],
    OFFICE: [
        *_VIEW_SHOP,
        *_EDIT_RECORDS,
        *_VIEW_SYSTEM,
        *_EDIT_SYSTEM,
        *_REMOVE_SYSTEM,
        *_ANY_JOB,
        "shop.delete_owner",
        "shop.delete_vehicle",
        "shop.delete_job",
        "shop.change_shopprofile",
        "shop.manage_staff",
        *_VIEW_INSPECTIONS,
        *_WRENCHES,
        *_VIEW_GATES,
        "inspections.manage_checklist",
        *_INSIGHTS,
        *_RECHECKS,
    ],
}


def role_names(user) -> list[str]:
    """The user's roles in a stable order (superusers administer everything)."""
    if not user.is_authenticated:
        return []
    names = set(user.groups.values_list("name", flat=True))
    return [role for role in ROLES if role in names]


def sync_role_groups() -> None:
    """Create any missing role group and give each role exactly its permissions
    (idempotent): a permission no longer listed is taken away again.

    Migrations set the roles on a database; this restores them after a flush
    (transactional tests) or brings a database whose groups were edited by hand back to
    the table. The migration shop/0003_role_review does the same with a frozen copy.
    """
    from django.contrib.auth.models import Group, Permission

    for role, perms in ROLE_PERMISSIONS.items():
        group, _ = Group.objects.get_or_create(name=role)
        wanted = []
        for perm in perms:
            app_label, codename = perm.split(".")
            wanted.append(
                Permission.objects.get(content_type__app_label=app_label, codename=codename)
            )
        group.permissions.set(wanted)
