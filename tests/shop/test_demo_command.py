"""The demo command: loads the invented shop, changes nothing the second time, and refuses
to mix with real records unless forced."""

from __future__ import annotations

import io

import pytest
from django.contrib.auth import get_user_model
from django.core.management import CommandError, call_command

from shop import roles
from shop.models import Job, Owner, Vehicle
from tests.factories import make_owner

pytestmark = pytest.mark.django_db


def _snapshot() -> dict:
    User = get_user_model()
    return {
        "owners": list(Owner.objects.order_by("pk").values()),
        "vehicles": list(Vehicle.objects.order_by("pk").values()),
        "jobs": list(Job.objects.order_by("pk").values()),
        "users": list(User.objects.order_by("pk").values()),
    }


def test_demo_loads_the_promised_scenario():
    out = io.StringIO()
    call_command("demo", stdout=out)
    assert Owner.objects.count() >= 3
    assert Job.objects.count() >= 5
    kinds = set(Vehicle.objects.values_list("kind", "dc_voltage", "ac_system"))
    assert ("van", 12, "120_60") in kinds or ("van", 12, "none") in kinds
    assert any(k == "motorhome" and v == 48 and ac == "230_50" for k, v, ac in kinds)
    assert any(k == "boat" and v == 12 for k, v, ac in kinds)
    assert any(v == 24 for _, v, _ in kinds)
    for role in roles.ROLES:
        assert get_user_model().objects.filter(groups__name=role).exists(), role
    assert "password" in out.getvalue()


def test_running_demo_twice_changes_nothing():
    call_command("demo", stdout=io.StringIO())
    before = _snapshot()
    call_command("demo", stdout=io.StringIO())
    assert _snapshot() == before


def test_demo_refuses_a_database_with_real_records():
    make_owner(name="A Real Customer")
    with pytest.raises(CommandError, match="not demo data"):
        call_command("demo", stdout=io.StringIO())
    assert not Job.objects.exists()


def test_force_loads_beside_real_records():
    make_owner(name="A Real Customer")
    call_command("demo", "--force", stdout=io.StringIO())
    assert Owner.objects.filter(name="A Real Customer").exists()
    assert Job.objects.count() >= 5


def test_demo_staff_can_sign_in(client):
    call_command("demo", stdout=io.StringIO())
    assert client.login(username="tessa", password="tech-demo-pass")
