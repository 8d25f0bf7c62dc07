"""Devices: list, detail with terminals and the terminations landing on it, new and edit
with terminals inline, and delete (refused while circuits use the device)."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import Device, Terminal, TorqueDefault
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    return make_job()


def _no_role_client() -> Client:
    client = Client()
    client.force_login(make_user())
    return client


def _device_post(name="House battery", terminals=(), initial=0, **fields) -> dict:
    data = {
        "name": name,
        "kind": "battery",
        "mounting": "battery_box",
        "is_source": "on",
        "terminals-TOTAL_FORMS": str(len(terminals)),
        "terminals-INITIAL_FORMS": str(initial),
        "terminals-MIN_NUM_FORMS": "0",
        "terminals-MAX_NUM_FORMS": "1000",
    }
    for i, terminal in enumerate(terminals):
        for key, value in terminal.items():
            data[f"terminals-{i}-{key}"] = value
    data.update(fields)
    return data


@pytest.mark.parametrize(
    "name", ["device_list", "device_new", "device_detail", "device_edit", "device_delete"]
)
def test_every_device_page_needs_sign_in_and_a_role(anon_client, job, name):
    device = make_device(job)
    args = [job.number] if name in ("device_list", "device_new") else [job.number, device.pk]
    url = reverse(name, args=args)
    response = anon_client.get(url)
    assert response.status_code == 302
    assert "/login/" in response["Location"]
    assert _no_role_client().get(url).status_code == 403
    if name not in ("device_list", "device_detail"):  # read-only pages take GET alone
        assert _no_role_client().post(url, _device_post(name="Sneaky")).status_code == 403
    assert list(Device.objects.values_list("name", flat=True)) == [device.name]


def test_technician_sees_the_device_list(technician_client, job):
    battery = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_terminal(battery, name="+", polarity="pos")
    make_circuit(job, battery, bus, role="main_feed")
    body = technician_client.get(reverse("device_list", args=[job.number])).content.decode()
    assert "House battery" in body and "Busbar" in body
    assert "Source" in body


def test_detail_lists_terminals_circuits_and_terminations_with_torque(technician_client, job):
    TorqueDefault.objects.create(
        stud_size="M8", kind="lug", value=Decimal("10"), unit="N*m", tolerance_pct=10,
        source="Shop table",
    )  # fmt: skip
    battery = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_terminal(battery, name="B+", polarity="pos", stud_size="M8")
    make_terminal(
        battery, name="B-", polarity="neg", stud_size="M8",
        manual_torque_value=Decimal("9"), manual_torque_unit="N*m",
    )  # fmt: skip
    make_circuit(job, battery, bus, tag="B-01", role="main_feed")
    body = technician_client.get(battery.get_absolute_url()).content.decode()
    assert "B+" in body and "B-" in body
    assert "B-01" in body
    # The manual's value wins on B-; the shop default fills B+.
    assert "9 N·m ± 10 %" in body
    assert "Device manual" in body
    assert "10 N·m ± 10 %" in body
    assert "Shop default for the stud size" in body
    # Only the battery's own ends land here (two: positive and negative, from end).
    assert body.count('data-label="Circuit"') == 2


def test_technician_adds_a_device_with_its_terminals(technician_client, job):
    url = reverse("device_new", args=[job.number])
    assert technician_client.get(url).status_code == 200
    terminals = [
        {"name": "+", "polarity": "pos", "stud_size": "M8", "manual_torque_unit": "N*m"},
        {"name": "-", "polarity": "neg", "stud_size": "M8", "manual_torque_value": "9",
         "manual_torque_unit": "N*m"},
    ]  # fmt: skip
    response = technician_client.post(url, _device_post(terminals=terminals))
    device = Device.objects.get(job=job, name="House battery")
    assert response.status_code == 302
    assert response["Location"] == device.get_absolute_url()
    assert sorted(device.terminals.values_list("name", flat=True)) == ["+", "-"]
    assert device.terminals.get(name="-").manual_torque_value == Decimal("9")


def test_a_bad_terminal_saves_neither_device_nor_terminals(technician_client, job):
    terminals = [{"name": "+", "polarity": "sideways", "manual_torque_unit": "N*m"}]
    url = reverse("device_new", args=[job.number])
    response = technician_client.post(url, _device_post(terminals=terminals))
    assert response.status_code == 200
    assert "Select a valid choice" in response.content.decode()
    assert not Device.objects.exists()
    assert not Terminal.objects.exists()


def test_save_and_add_terminals_comes_back_to_the_form(technician_client, job):
    url = reverse("device_new", args=[job.number])
    response = technician_client.post(url, _device_post(more="1"))
    device = Device.objects.get(job=job)
    assert response["Location"] == reverse("device_edit", args=[job.number, device.pk])


def test_editing_changes_and_removes_terminals(technician_client, job):
    device = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    plus = make_terminal(device, name="+", polarity="pos")
    minus = make_terminal(device, name="-", polarity="neg")
    terminals = [
        {"id": str(minus.pk), "name": "-", "polarity": "neg", "manual_torque_unit": "N*m"},
        {"id": str(plus.pk), "name": "POS", "polarity": "pos", "manual_torque_unit": "N*m"},
        {"id": "", "name": "T3", "polarity": "pos", "manual_torque_unit": "N*m",
         "DELETE": ""},
    ]  # fmt: skip
    terminals[0]["DELETE"] = "on"
    url = reverse("device_edit", args=[job.number, device.pk])
    response = technician_client.post(url, _device_post(terminals=terminals, initial=2))
    assert response.status_code == 302
    assert sorted(device.terminals.values_list("name", flat=True)) == ["POS", "T3"]


def test_edit_needs_change_permission(job):
    device = make_device(job)
    url = reverse("device_edit", args=[job.number, device.pk])
    assert _no_role_client().get(url).status_code == 403


def test_a_device_in_use_cannot_be_deleted(lead_client, job):
    battery = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_circuit(job, battery, bus, tag="B-01", role="main_feed")
    url = reverse("device_delete", args=[job.number, battery.pk])
    response = lead_client.post(url)
    body = response.content.decode()
    assert response.status_code == 409
    assert "House battery cannot be deleted" in body
    assert "B-01" in body
    assert Device.objects.filter(pk=battery.pk).exists()


def test_only_leads_and_office_delete_devices(technician_client, lead_client, job):
    device = make_device(job, name="Spare fan")
    url = reverse("device_delete", args=[job.number, device.pk])
    assert technician_client.post(url).status_code == 403
    assert lead_client.get(url).status_code == 200
    response = lead_client.post(url)
    assert response.status_code == 302
    assert not Device.objects.filter(pk=device.pk).exists()


def test_a_device_of_another_job_is_not_found(technician_client, job):
    other = make_device(make_job())
    assert (
        technician_client.get(reverse("device_detail", args=[job.number, other.pk])).status_code
        == 404
    )
