"""Staff roles: the groups the migration creates, and what each may do."""

from __future__ import annotations

import pytest
from django.contrib.auth.models import Group

from shop import roles

pytestmark = pytest.mark.django_db


def test_migration_creates_each_role_with_its_permissions():
    for role, perms in roles.ROLE_PERMISSIONS.items():
        group = Group.objects.get(name=role)
        have = {f"{p.content_type.app_label}.{p.codename}" for p in group.permissions.all()}
        assert have == set(perms), role


def test_technician_reads_but_does_not_edit(technician):
    assert technician.has_perm("shop.view_job")
    assert not technician.has_perm("shop.change_job")
    assert not technician.has_perm("shop.add_owner")


def test_only_office_manages_the_shop_profile(lead, office):
    assert office.has_perm("shop.change_shopprofile")
    assert not lead.has_perm("shop.change_shopprofile")


def test_sync_restores_a_deleted_role():
    Group.objects.filter(name=roles.LEAD).delete()
    roles.sync_role_groups()
    assert Group.objects.get(name=roles.LEAD).permissions.count() == len(
        roles.ROLE_PERMISSIONS[roles.LEAD]
    )
