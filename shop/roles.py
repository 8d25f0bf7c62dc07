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

ROLE_PERMISSIONS: dict[str, list[str]] = {  # mirrored by migration 0002
    TECHNICIAN: [*_VIEW_SHOP],
    LEAD: [*_VIEW_SHOP, *_EDIT_RECORDS],
    OFFICE: [
        *_VIEW_SHOP,
        *_EDIT_RECORDS,
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
