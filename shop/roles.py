"""Staff roles as Django groups, and the permissions each one holds.

The data migration `0002_staff_roles` creates the groups from ROLE_PERMISSIONS; later
issues add their own permissions in their own migrations.
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
# Technicians write down what they install; leads and office also remove it.
_EDIT_SYSTEM = [
    "circuits.add_device",
    "circuits.change_device",
    "circuits.add_terminal",
    "circuits.change_terminal",
    "circuits.delete_terminal",
    "circuits.add_circuit",
    "circuits.change_circuit",
    "circuits.change_termination",
]
_REMOVE_SYSTEM = ["circuits.delete_device", "circuits.delete_circuit"]

# Mirrored, frozen, by the data migrations shop/0002_staff_roles and circuits/0002_roles.
ROLE_PERMISSIONS: dict[str, list[str]] = {
    TECHNICIAN: [*_VIEW_SHOP, *_VIEW_SYSTEM, *_EDIT_SYSTEM],
    LEAD: [
        *_VIEW_SHOP,
        *_EDIT_RECORDS,
        *_VIEW_SYSTEM,
        *_EDIT_SYSTEM,
        *_REMOVE_SYSTEM,
        "circuits.add_waiver",
        "circuits.delete_waiver",
    ],
    OFFICE: [
        *_VIEW_SHOP,
        *_EDIT_RECORDS,
        *_VIEW_SYSTEM,
        *_EDIT_SYSTEM,
        *_REMOVE_SYSTEM,
        "circuits.add_torquedefault",
        "circuits.change_torquedefault",
        "circuits.delete_torquedefault",
        "shop.delete_owner",
        "shop.delete_vehicle",
        "shop.delete_job",
        "shop.change_shopprofile",
        "auth.view_user",
        "auth.add_user",
        "auth.change_user",
    ],
}


def role_names(user) -> list[str]:
    """The user's roles in a stable order (superusers administer everything)."""
    if not user.is_authenticated:
        return []
    names = set(user.groups.values_list("name", flat=True))
    return [role for role in ROLES if role in names]


def sync_role_groups() -> None:
    """Create any missing role group and give each role its permissions (idempotent).

    Migrations create the roles on a new database; this restores them after a flush
    (transactional tests) or when a later issue adds permissions to a role.
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
        group.permissions.add(*wanted)
