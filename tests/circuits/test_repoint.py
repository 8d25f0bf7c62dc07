"""A conductor end that carries readings stays where it was read: editing its circuit so
that the end would move to another device or terminal, or disappear, is refused with a
clear message (on the circuit form too) and nothing changes; nor can the circuit, or a
terminal it lands on, be deleted. (The issue's "Records": a termination that carries
readings can no longer be silently removed.) Ends without readings move as before."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import ValidationError
from django.test import Client

from circuits.forms import DeviceForm, TerminalFormSet, device_save_values
from circuits.models import Circuit, Terminal, Termination
from circuits.services import circuit_delete, circuit_update, device_save
from inspections.models import Stage
from tests.circuits.factories import make_device, make_terminal
from tests.factories import make_job
from tests.html_forms import form_fields
from tests.inspections.factories import make_spec_circuit, make_wrench, read, stages_by_kind

pytestmark = pytest.mark.django_db


@pytest.fixture
def job(technician):
    job = make_job()
    job.technicians.add(technician)
    return job


@pytest.fixture
def circuit(job):
    return make_spec_circuit(job, tag="D-01")


@pytest.fixture
def read_to_end(job, circuit, technician):
    """The circuit's "to" positive end read at the first install."""
    install = stages_by_kind(job)[Stage.Kind.FIRST_INSTALL]
    end = circuit.terminations.get(end="to", polarity="pos")
    read(end, install, "10", technician=technician, wrench=make_wrench())
    return end


@pytest.fixture
def other_bus(job):
    bus = make_device(job, name="Other bus", kind="busbar")
    for name, polarity in (("+", "pos"), ("-", "neg")):
        make_terminal(bus, name=name, polarity=polarity, manual_torque_value=Decimal("6"))
    return bus


def _where(termination) -> tuple:
    termination.refresh_from_db()
    return termination.terminal_id, termination.torque_value


def test_moving_a_read_end_to_another_device_is_refused(circuit, read_to_end, other_bus):
    before = _where(read_to_end)
    to_device = circuit.to_device_id
    with pytest.raises(ValidationError) as caught:
        circuit_update(circuit=Circuit.objects.get(pk=circuit.pk), to_device=other_bus)
    message = " ".join(caught.value.messages)
    assert message.startswith("D-01 To end DC positive carries torque or temperature readings")
    assert "cannot move to another device or terminal" in message
    assert _where(read_to_end) == before
    assert Circuit.objects.get(pk=circuit.pk).to_device_id == to_device


def test_moving_a_read_end_to_another_terminal_of_its_device_is_refused(circuit, read_to_end):
    second_plus = make_terminal(circuit.to_device, name="+2", polarity="pos")
    before = _where(read_to_end)
    with pytest.raises(ValidationError):
        circuit_update(circuit=Circuit.objects.get(pk=circuit.pk), to_terminal=second_plus)
    assert _where(read_to_end) == before


def test_ends_without_readings_still_move(circuit, other_bus):
    circuit_update(circuit=Circuit.objects.get(pk=circuit.pk), to_device=other_bus)
    moved = circuit.terminations.get(end="to", polarity="pos")
    assert moved.terminal.device == other_bus
    assert moved.torque_value == Decimal("6")  # the new stud's manual value


def test_removing_a_read_end_is_refused(circuit, read_to_end):
    with pytest.raises(ValidationError) as caught:
        circuit_update(circuit=Circuit.objects.get(pk=circuit.pk), parallel=1, conductors="neg")
    assert "already carry torque readings" in " ".join(caught.value.messages)
    assert Termination.objects.filter(pk=read_to_end.pk).exists()
    assert Circuit.objects.get(pk=circuit.pk).conductors == Circuit.Conductors.PAIR


def test_a_circuit_with_readings_cannot_be_deleted(circuit, read_to_end, lead):
    with pytest.raises(ValidationError) as caught:
        circuit_delete(circuit=circuit, user=lead)
    assert "carries torque readings" in " ".join(caught.value.messages)
    assert Circuit.objects.filter(pk=circuit.pk).exists()


def test_a_terminal_with_read_ends_cannot_be_removed_from_its_device(job, read_to_end):
    device = read_to_end.terminal.device
    terminals = list(device.terminals.order_by("pk"))
    data = {
        "name": device.name,
        "kind": device.kind,
        "mounting": device.mounting,
        "terminals-TOTAL_FORMS": str(len(terminals)),
        "terminals-INITIAL_FORMS": str(len(terminals)),
    }
    for index, terminal in enumerate(terminals):
        data |= {
            f"terminals-{index}-id": str(terminal.pk),
            f"terminals-{index}-name": terminal.name,
            f"terminals-{index}-polarity": terminal.polarity,
            f"terminals-{index}-manual_torque_value": "10",
            f"terminals-{index}-manual_torque_unit": "N*m",
        }
        if terminal == read_to_end.terminal:
            data[f"terminals-{index}-DELETE"] = "on"
    form = DeviceForm(data, instance=device, job=job)
    formset = TerminalFormSet(data, instance=device, prefix="terminals")
    formset.can_delete = True
    assert form.is_valid(), form.errors
    assert formset.is_valid(), formset.errors
    with pytest.raises(ValidationError) as caught:
        device_save(**device_save_values(form, formset))
    assert "readings" in " ".join(caught.value.messages)
    assert Terminal.objects.filter(pk=read_to_end.terminal_id).exists()
    assert _where(read_to_end)[0] == read_to_end.terminal_id


def test_the_circuit_form_shows_why_the_move_was_refused(job, circuit, read_to_end, other_bus):
    client = Client()
    client.force_login(job.technicians.get())
    url = circuit.get_absolute_url()
    data = form_fields(client.get(url).content.decode(), action_contains=url)
    data |= {"to_device": [str(other_bus.pk)], "to_terminal": [""]}
    response = client.post(url, data)
    assert response.status_code == 200
    body = response.content.decode()
    assert "cannot move to another device or terminal" in body
    assert Circuit.objects.get(pk=circuit.pk).to_device_id != other_bus.pk
