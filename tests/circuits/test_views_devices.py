"""Devices: list, detail with terminals and the terminations landing on it, new and edit
with terminals inline (by technicians assigned to the job; removing a terminal is lead or
office work), and a confirmed delete (refused while circuits use the device)."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import Device, Terminal, TorqueDefault
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db


@pytest.fixture
def job(technician):
    return make_job(technicians=[technician])


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


def test_editing_changes_and_removes_terminals(lead_client, job):
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
    response = lead_client.post(url, _device_post(terminals=terminals, initial=2))
    assert response.status_code == 302
    assert sorted(device.terminals.values_list("name", flat=True)) == ["POS", "T3"]


def test_technician_renames_terminals_but_is_not_offered_removal(technician_client, job):
    device = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    plus = make_terminal(device, name="+", polarity="pos")
    url = reverse("device_edit", args=[job.number, device.pk])
    assert "terminals-0-DELETE" not in technician_client.get(url).content.decode()
    terminals = [{"id": str(plus.pk), "name": "B+", "polarity": "pos", "manual_torque_unit": "N*m"}]
    response = technician_client.post(url, _device_post(terminals=terminals, initial=1))
    assert response.status_code == 302
    assert list(device.terminals.values_list("name", flat=True)) == ["B+"]


def test_technician_cannot_delete_terminal(technician_client, job):
    device = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    plus = make_terminal(device, name="+", polarity="pos")
    terminals = [{"id": str(plus.pk), "name": "B+", "polarity": "pos",
                  "manual_torque_unit": "N*m", "DELETE": "on"}]  # fmt: skip
    url = reverse("device_edit", args=[job.number, device.pk])
    response = technician_client.post(url, _device_post(terminals=terminals, initial=1))
    assert response.status_code == 403
    assert "Removing a terminal is lead or office work" in response.content.decode()
    # Refused whole: neither removed nor renamed.
    assert list(device.terminals.values_list("name", flat=True)) == ["+"]


def test_lead_is_offered_terminal_removal(lead_client, job):
    device = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    make_terminal(device, name="+", polarity="pos")
    url = reverse("device_edit", args=[job.number, device.pk])
    assert 'name="terminals-0-DELETE"' in lead_client.get(url).content.decode()


def _tampered(existing, foreign) -> dict[str, dict]:
    """Posts our form never sends: (terminal rows, INITIAL_FORMS, TOTAL_FORMS)."""
    row = {"id": str(existing.pk), "name": "+", "polarity": "pos", "manual_torque_unit": "N*m"}
    new = {"id": "", "name": "T9", "polarity": "pos", "manual_torque_unit": "N*m"}
    return {
        "existing terminal posted as a new row": ([row], 0, 1),
        "negative initial count": ([row], -1, 1),
        "initial count above the total": ([row], 3, 1),
        "another device's terminal": ([dict(row, id=str(foreign.pk))], 1, 1),
        "the same terminal twice": ([row, dict(row, name="B+")], 2, 2),
        "a new row carrying an id": ([new, dict(row, name="B+")], 1, 2),
        "an id that is not a number": ([dict(row, id="abc")], 1, 1),
    }


@pytest.mark.parametrize(
    "lie",
    [
        "existing terminal posted as a new row",
        "negative initial count",
        "initial count above the total",
        "another device's terminal",
        "the same terminal twice",
        "a new row carrying an id",
        "an id that is not a number",
    ],
)
def test_tampered_terminal_formset_is_refused(lead_client, job, lie):
    device = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    plus = make_terminal(device, name="+", polarity="pos")
    other = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    foreign = make_terminal(other, name="X", polarity="pos")
    terminals, initial, total = _tampered(plus, foreign)[lie]
    data = _device_post(terminals=terminals, initial=initial, name="Renamed")
    data["terminals-TOTAL_FORMS"] = str(total)
    response = lead_client.post(reverse("device_edit", args=[job.number, device.pk]), data)
    assert response.status_code == 400
    assert "Nothing was saved" in response.content.decode()
    device.refresh_from_db()
    assert device.name == "House battery"
    assert list(device.terminals.values_list("name", flat=True)) == ["+"]
    assert list(other.terminals.values_list("name", flat=True)) == ["X"]


def test_a_new_device_posting_existing_rows_is_refused(technician_client, job):
    foreign = make_terminal(make_device(job, name="Busbar"), name="X", polarity="pos")
    row = {"id": str(foreign.pk), "name": "X", "polarity": "pos", "manual_torque_unit": "N*m"}
    url = reverse("device_new", args=[job.number])
    response = technician_client.post(url, _device_post(terminals=[row], initial=1))
    assert response.status_code == 400
    assert not Device.objects.filter(name="House battery").exists()


def test_a_missing_management_form_is_an_error_beside_the_terminals(technician_client, job):
    data = _device_post()
    del data["terminals-TOTAL_FORMS"]
    response = technician_client.post(reverse("device_new", args=[job.number]), data)
    assert response.status_code == 200
    assert "ManagementForm data is missing" in response.content.decode()
    assert not Device.objects.exists()


def test_unassigned_technician_cannot_add_or_edit_devices(job):
    device = make_device(job, name="House battery")
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    for url in [
        reverse("device_new", args=[job.number]),
        reverse("device_edit", args=[job.number, device.pk]),
    ]:
        response = client.get(url)
        assert response.status_code == 403
        assert "ask a lead to add you" in response.content.decode()
        assert client.post(url, _device_post(name="Sneaky")).status_code == 403
    # Reading stays open to every technician.
    assert client.get(device.get_absolute_url()).status_code == 200
    assert list(Device.objects.values_list("name", flat=True)) == ["House battery"]


def test_edit_needs_change_permission(job):
    device = make_device(job)
    url = reverse("device_edit", args=[job.number, device.pk])
    assert _no_role_client().get(url).status_code == 403


def test_a_device_in_use_cannot_be_deleted(lead_client, job):
    battery = make_device(job, name="House battery", kind=Device.Kind.BATTERY)
    bus = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_circuit(job, battery, bus, tag="B-01", role="main_feed")
    url = reverse("device_delete", args=[job.number, battery.pk])
    response = lead_client.post(url, {"confirm": "yes"})
    body = response.content.decode()
    assert response.status_code == 409
    assert "House battery cannot be deleted" in body
    assert "B-01" in body
    assert Device.objects.filter(pk=battery.pk).exists()


def test_only_leads_and_office_delete_devices(technician_client, lead_client, job):
    device = make_device(job, name="Spare fan")
    url = reverse("device_delete", args=[job.number, device.pk])
    assert technician_client.post(url, {"confirm": "yes"}).status_code == 403
    assert lead_client.get(url).status_code == 200
    response = lead_client.post(url, {"confirm": "yes"})
    assert response.status_code == 302
    assert not Device.objects.filter(pk=device.pk).exists()


def test_delete_device_needs_confirmation(office_client, job, caplog):
    device = make_device(job, name="Spare fan")
    url = reverse("device_delete", args=[job.number, device.pk])
    page = office_client.get(url).content.decode()
    assert 'name="confirm" value="yes"' in page
    response = office_client.post(url)  # an empty POST: no confirm field
    assert response.status_code == 200
    assert "Nothing was deleted" in response.content.decode()
    assert Device.objects.filter(pk=device.pk).exists()
    assert office_client.post(url, {"confirm": "no"}).status_code == 200
    assert Device.objects.filter(pk=device.pk).exists()
    with caplog.at_level("WARNING", logger="security"):
        assert office_client.post(url, {"confirm": "yes"}).status_code == 302
    assert not Device.objects.filter(pk=device.pk).exists()
    logged = [r.getMessage() for r in caplog.records if r.name == "security"]
    assert any(
        "event=delete" in m
        and "record='device'" in m
        and "name='Spare fan'" in m
        and "who=office" in m
        for m in logged
    ), logged


def test_a_device_of_another_job_is_not_found(technician_client, job):
    other = make_device(make_job())
    assert (
        technician_client.get(reverse("device_detail", args=[job.number, other.pk])).status_code
        == 404
    )
