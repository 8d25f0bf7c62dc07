"""The staff services check who may act themselves, whichever page calls them."""

from __future__ import annotations

import pytest
from django.contrib.auth import get_user_model
from django.core.exceptions import PermissionDenied, ValidationError

from shop import roles
from shop.services import (
    staff_change_role,
    staff_create,
    staff_send_password_link,
    staff_set_active,
)

pytestmark = pytest.mark.django_db


def test_only_a_staff_manager_may_call_them(lead, technician):
    with pytest.raises(PermissionDenied):
        staff_create(actor=lead, username="kim", email="kim@test.example", role=roles.OFFICE)
    with pytest.raises(PermissionDenied):
        staff_change_role(actor=lead, member=technician, role=roles.OFFICE)
    with pytest.raises(PermissionDenied):
        staff_set_active(actor=lead, member=technician, active=False)
    with pytest.raises(PermissionDenied):
        staff_send_password_link(actor=lead, member=technician, domain="x", use_https=True)
    assert not get_user_model().objects.filter(username="kim").exists()


def test_a_role_outside_the_table_is_refused(office):
    with pytest.raises(ValidationError) as raised:
        staff_create(actor=office, username="kim", email="kim@test.example", role="Superuser")
    assert "role" in raised.value.message_dict


def test_a_superuser_keeps_admin_access_whatever_role_it_is_given():
    root = get_user_model().objects.create_superuser("root", "root@test.example", "pw-root-1")
    other = get_user_model().objects.create_superuser("root2", "r2@test.example", "pw-root-2")
    staff_change_role(actor=root, member=other, role=roles.TECHNICIAN)
    other.refresh_from_db()
    assert other.is_superuser and other.is_staff
