"""The Django admin: every model is registered; office staff reach it to read records and
edit the shop profile, but cannot grant themselves superuser, set another person's
password, or change what only the services may write (circuits, terminals, terminations,
torque defaults, waivers, jobs). A superuser still administers everything."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.apps import apps
from django.contrib import admin
from django.contrib.auth import get_user_model
from django.test import Client
from django.urls import reverse

from circuits.models import Circuit, Device, Terminal, Termination, TorqueDefault
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_owner

pytestmark = pytest.mark.django_db


@pytest.fixture
def superuser_client() -> Client:
    user = get_user_model().objects.create_superuser("root", "root@test.example", "pw-root-1")
    client = Client()
    client.force_login(user)
    return client


@pytest.mark.parametrize("app_label", ["shop", "circuits", "inspections"])
def test_every_model_is_registered(app_label):
    for model in apps.get_app_config(app_label).get_models():
        assert admin.site.is_registered(model), model.__name__


def test_office_opens_the_admin_and_technician_does_not(office_client, technician_client):
    assert office_client.get(reverse("admin:shop_job_changelist")).status_code == 200
    assert technician_client.get(reverse("admin:index")).status_code == 302


def _user_change_post(user, **overrides) -> dict:
    data = {
        "username": user.username,
        "first_name": user.first_name,
        "last_name": user.last_name,
        "email": user.email,
        "is_active": "on",
        "is_staff": "on",
        "is_superuser": "on",
        "date_joined_0": "2026-01-01",
        "date_joined_1": "08:00:00",
    }
    data.update(overrides)
    return data


def test_office_cannot_grant_superuser(office_client, office):
    url = reverse("admin:auth_user_change", args=[office.pk])
    assert office_client.get(url).status_code == 403
    assert office_client.post(url, _user_change_post(office)).status_code == 403
    office.refresh_from_db()
    assert not office.is_superuser


def test_office_cannot_set_another_password(office_client, lead):
    url = reverse("admin:auth_user_password_change", args=[lead.pk])
    data = {"password1": "taken-over-2026!", "password2": "taken-over-2026!"}
    assert office_client.post(url, data).status_code == 403
    lead.refresh_from_db()
    assert lead.check_password("pw-for-tests-only")


@pytest.mark.parametrize(
    "name",
    ["admin:auth_user_changelist", "admin:auth_user_add", "admin:auth_group_changelist"],
)
def test_office_does_not_see_users_or_groups_in_the_admin(office_client, name):
    assert office_client.get(reverse(name)).status_code == 403
    index = office_client.get(reverse("admin:index")).content.decode()
    assert reverse("admin:auth_user_changelist") not in index


def test_superuser_still_administers_users(superuser_client, lead):
    assert (
        superuser_client.get(reverse("admin:auth_user_change", args=[lead.pk])).status_code == 200
    )
    assert superuser_client.get(reverse("admin:auth_group_changelist")).status_code == 200


@pytest.fixture
def system():
    job = make_job()
    battery = make_device(job, name="House battery", kind="battery")
    terminal = make_terminal(battery, name="B+", polarity="pos")
    circuit = make_circuit(job, battery, make_device(job, name="Busbar", kind="busbar"))
    spec = TorqueDefault.objects.create(
        stud_size="M8", kind="lug", value=Decimal("10"), unit="N*m", tolerance_pct=10,
        source="Shop table",
    )  # fmt: skip
    return {
        "device": battery,
        "terminal": terminal,
        "circuit": circuit,
        "termination": circuit.terminations.first(),
        "torquedefault": spec,
    }


MODELS = {
    "device": Device,
    "terminal": Terminal,
    "circuit": Circuit,
    "termination": Termination,
    "torquedefault": TorqueDefault,
}


@pytest.mark.parametrize("model", list(MODELS))
def test_office_cannot_change_the_system_in_the_admin(office_client, system, model):
    obj = system[model]
    change = reverse(f"admin:circuits_{model}_change", args=[obj.pk])
    # Read-only: the page opens, without a save button.
    page = office_client.get(change)
    assert page.status_code == 200
    assert 'name="_save"' not in page.content.decode()
    assert office_client.post(change, {}).status_code == 403
    assert office_client.get(reverse(f"admin:circuits_{model}_add")).status_code == 403
    delete = reverse(f"admin:circuits_{model}_delete", args=[obj.pk])
    assert office_client.post(delete, {"post": "yes"}).status_code == 403
    assert MODELS[model].objects.filter(pk=obj.pk).exists()


def test_office_cannot_change_torque_defaults_in_the_admin(office_client, system):
    spec = system["torquedefault"]
    url = reverse("admin:circuits_torquedefault_change", args=[spec.pk])
    data = {"stud_size": "M8", "kind": "lug", "value": "99", "unit": "N*m",
            "tolerance_pct": "10", "source": "Typed in the admin"}  # fmt: skip
    assert office_client.post(url, data).status_code == 403
    spec.refresh_from_db()
    assert spec.value == Decimal("10")


def test_office_reads_jobs_in_the_admin_but_edits_them_in_the_app(office_client):
    job = make_job(title="Original")
    url = reverse("admin:shop_job_change", args=[job.pk])
    assert 'name="_save"' not in office_client.get(url).content.decode()
    assert office_client.post(url, {"title": "Changed in the admin"}).status_code == 403
    job.refresh_from_db()
    assert job.title == "Original"


def test_office_still_edits_the_shop_profile_and_owners_in_the_admin(office_client):
    owner = make_owner(name="Pat Example")
    url = reverse("admin:shop_owner_change", args=[owner.pk])
    response = office_client.post(url, {"name": "Pat Example-Jones", "email": "", "phone": ""})
    assert response.status_code == 302
    owner.refresh_from_db()
    assert owner.name == "Pat Example-Jones"


def test_superuser_still_changes_the_system_in_the_admin(superuser_client, system):
    url = reverse("admin:circuits_torquedefault_change", args=[system["torquedefault"].pk])
    assert 'name="_save"' in superuser_client.get(url).content.decode()
