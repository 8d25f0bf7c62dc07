"""circuits.services.device_save takes plain values (the view unpacks the form): the
device's fields, the terminal rows to keep or add, the ids to remove; all or nothing."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError

from circuits.models import Device, Terminal
from circuits.services import device_save
from tests.circuits.factories import make_device, make_terminal
from tests.factories import make_job

pytestmark = pytest.mark.django_db

FIELDS = {"name": "Main fuse", "kind": "protection", "mounting": "battery_box",
          "protection_type": "fuse", "protection_a": Decimal("300")}  # fmt: skip


def test_a_new_device_is_saved_with_its_terminals():
    job = make_job()
    device = device_save(job=job, fields=FIELDS, terminals=[
        {"name": "In", "polarity": "pos", "stud_size": "M10"},
        {"name": "Out", "polarity": "pos", "stud_size": "M10"},
    ])  # fmt: skip
    assert device.protection_display == "300 A fuse"
    assert sorted(device.terminals.values_list("name", flat=True)) == ["In", "Out"]


def test_an_edit_updates_adds_and_removes_terminals_in_one_go():
    job = make_job()
    device = make_device(job, name="Busbar", kind="busbar")
    keep = make_terminal(device, name="+")
    gone = make_terminal(device, name="spare")
    device_save(job=job, device=device,
                fields={"name": "DC busbar", "kind": "busbar", "mounting": "body"},
                terminals=[{"id": keep.pk, "name": "+ main", "polarity": "pos"},
                           {"name": "-", "polarity": "neg"}],
                remove_terminals=[gone.pk])  # fmt: skip
    device.refresh_from_db()
    assert device.name == "DC busbar"
    assert sorted(device.terminals.values_list("name", flat=True)) == ["+ main", "-"]


def test_a_bad_value_saves_nothing():
    job = make_job()
    device = make_device(job, name="Busbar", kind="busbar")
    with pytest.raises(ValidationError):
        device_save(job=job, device=device,
                    fields={"name": "Renamed", "kind": "busbar", "mounting": "body"},
                    terminals=[{"name": "", "polarity": "pos"}])  # fmt: skip
    device.refresh_from_db()
    assert device.name == "Busbar" and not Terminal.objects.filter(device=device).exists()


def test_another_devices_terminal_is_refused():
    job = make_job()
    device = make_device(job, name="Busbar", kind="busbar")
    other = make_terminal(make_device(job, name="Other"), name="X")
    with pytest.raises(ValidationError):
        device_save(job=job, device=device,
                    fields={"name": "Busbar", "kind": "busbar", "mounting": "body"},
                    remove_terminals=[other.pk])  # fmt: skip
    assert Terminal.objects.filter(pk=other.pk).exists()
    assert Device.objects.filter(pk=device.pk).exists()
