"""Staff roles: the groups the migrations leave, and the role table a shop expects
(shop/roles.py): technicians record what they install, leads run jobs and keep the torque
specs, the office books work in and manages staff, and nobody but a superuser holds an
auth permission."""

from __future__ import annotations

import pytest
from django.contrib.auth.models import Group, Permission

from shop import roles

pytestmark = pytest.mark.django_db


def _perms(group: Group) -> set[str]:
    return {f"{p.content_type.app_label}.{p.codename}" for p in group.permissions.all()}


def test_migration_creates_each_role_with_its_permissions():
    # The groups as the migrations left them match the table exactly (shop/0003_role_review).
    for role, perms in roles.ROLE_PERMISSIONS.items():
        assert _perms(Group.objects.get(name=role)) == set(perms), role


def test_technician_reads_but_does_not_edit_records(technician):
    assert technician.has_perm("shop.view_job")
    assert not technician.has_perm("shop.change_job")
    assert not technician.has_perm("shop.add_owner")


def test_technician_records_installs_but_removes_nothing(technician):
    for perm in ["circuits.add_device", "circuits.change_terminal", "circuits.add_circuit"]:
        assert technician.has_perm(perm), perm
    for perm in ["circuits.delete_terminal", "circuits.delete_device", "circuits.delete_circuit"]:
        assert not technician.has_perm(perm), perm


def test_technician_writes_only_to_assigned_jobs(technician, lead, office):
    # The access helper (shop.views.access.may_write_job) reads this permission.
    assert not technician.has_perm("shop.work_on_any_job")
    assert lead.has_perm("shop.work_on_any_job")
    assert office.has_perm("shop.work_on_any_job")


def test_leads_and_office_remove_from_a_system(lead, office):
    for user in (lead, office):
        for perm in [
            "circuits.delete_terminal",
            "circuits.delete_device",
            "circuits.delete_circuit",
        ]:
            assert user.has_perm(perm), (user, perm)


def test_torque_specs_are_the_leads(technician, lead, office):
    for perm in ["add", "change", "delete"]:
        assert lead.has_perm(f"circuits.{perm}_torquedefault")
        assert not office.has_perm(f"circuits.{perm}_torquedefault")
        assert not technician.has_perm(f"circuits.{perm}_torquedefault")
    for user in (technician, lead, office):
        assert user.has_perm("circuits.view_torquedefault")


def test_only_leads_update_circuits_by_import(technician, lead, office):
    assert lead.has_perm("shop.import_circuit_updates")
    assert not technician.has_perm("shop.import_circuit_updates")
    assert not office.has_perm("shop.import_circuit_updates")


def test_only_leads_waive(technician, lead, office):
    assert lead.has_perm("circuits.add_waiver")
    assert not office.has_perm("circuits.add_waiver")
    assert not technician.has_perm("circuits.add_waiver")


def test_only_office_manages_the_shop_profile_and_staff(technician, lead, office):
    assert office.has_perm("shop.change_shopprofile")
    assert office.has_perm("shop.manage_staff")
    for user in (technician, lead):
        assert not user.has_perm("shop.change_shopprofile")
        assert not user.has_perm("shop.manage_staff")


def test_no_role_holds_an_auth_permission():
    # Staff are managed in the app (shop.manage_staff); the admin's user pages are a
    # superuser's alone, so no role may add, change or even read users there.
    for role, perms in roles.ROLE_PERMISSIONS.items():
        assert not [p for p in perms if p.startswith("auth.")], role
        assert not Group.objects.get(name=role).permissions.filter(
            content_type__app_label="auth"
        ), role


def test_sync_restores_a_deleted_role():
    Group.objects.filter(name=roles.LEAD).delete()
    roles.sync_role_groups()
    assert _perms(Group.objects.get(name=roles.LEAD)) == set(roles.ROLE_PERMISSIONS[roles.LEAD])


def test_sync_removes_a_permission_no_longer_listed():
    office = Group.objects.get(name=roles.OFFICE)
    office.permissions.add(Permission.objects.get(codename="change_user"))
    technicians = Group.objects.get(name=roles.TECHNICIAN)
    technicians.permissions.add(Permission.objects.get(codename="delete_terminal"))
    roles.sync_role_groups()
    assert _perms(office) == set(roles.ROLE_PERMISSIONS[roles.OFFICE])
    assert "circuits.delete_terminal" not in _perms(technicians)


def test_role_names_are_in_a_stable_order(technician):
    technician.groups.add(Group.objects.get(name=roles.OFFICE))
    assert roles.role_names(technician) == [roles.TECHNICIAN, roles.OFFICE]
