"""Checklists: generated items per termination and per circuit, the shop's own items per
stage, marks that are evidence (append-only, once per key, the latest counts), and a
mark that stops counting when what it was given on changes."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.db import DatabaseError, connection, transaction

from circuits.services import circuit_update
from inspections.models import AppendOnlyError, AuditEvent, ChecklistMark, ShopChecklistItem, Stage
from inspections.services import (
    checklist_item_mark,
    checklist_items_for,
    shop_checklist_item_save,
)
from tests.circuits.factories import make_circuit, make_device
from tests.inspections.factories import approved, log_soaked_run, new_key, read

pytestmark = pytest.mark.django_db


def _items(stage):
    return {item.key: item for item in checklist_items_for(stage=stage)}


def _mark(stage, key, result="pass", *, by, note="", **kwargs):
    kwargs.setdefault("client_key", new_key())
    return checklist_item_mark(stage=stage, item_key=key, result=result, note=note, by=by, **kwargs)


def _errors(exc_info) -> dict[str, str]:
    return {field: " ".join(messages) for field, messages in exc_info.value.message_dict.items()}


# --- which items a stage has --------------------------------------------------------------


def test_first_install_has_a_torque_item_per_termination_and_the_circuit_checks(
    install, circuit, terminations
):
    items = _items(install)
    torque = [i for i in items.values() if i.kind == "torque"]
    assert sorted(i.termination.pk for i in torque) == sorted(t.pk for t in terminations)
    kinds = {i.kind for i in items.values() if i.circuit == circuit}
    # Both busbars sit on the body: the slack rule asks no service loop.
    assert kinds == {"protection", "colours", "labels", "chafe"}
    assert items[f"circuit:{circuit.pk}:protection"].basis == "fuse 15 A"
    assert "red positive, black negative" in items[f"circuit:{circuit.pk}:colours"].text


def test_a_run_between_engine_and_chassis_gets_a_service_loop_item(install, job):
    # The slack rule (circuits/rules/slack.py) asks a loop where a run leaves the engine.
    alternator = make_device(job, name="Alternator", kind="alternator", mounting="engine")
    bus = make_device(job, name="Chassis bus", kind="busbar", mounting="chassis")
    run = make_circuit(job, alternator, bus, role="charging", service_loop_confirmed=True)
    item = _items(install)[f"circuit:{run.pk}:service_loop"]
    assert item.basis == "engine to chassis"


def test_the_retorque_checks_torque_and_the_shops_items_not_the_install_checks(retorque, circuit):
    ShopChecklistItem.objects.create(stage_kind=Stage.Kind.RETORQUE, text="Covers refitted")
    kinds = {item.kind for item in checklist_items_for(stage=retorque)}
    assert kinds == {"torque", "shop"}


def test_the_shops_own_items_follow_their_stage_and_order_and_retired_ones_drop_out(
    install, office
):
    second = shop_checklist_item_save(by=office, stage_kind=1, text="Vent clear", order=20)
    first = shop_checklist_item_save(by=office, stage_kind=1, text="Box strapped", order=10)
    shop_checklist_item_save(by=office, stage_kind=3, text="Covers refitted")
    retired = shop_checklist_item_save(by=office, stage_kind=1, text="Old check", active=False)
    shop = [i for i in checklist_items_for(stage=install) if i.kind == "shop"]
    assert [i.shop_item for i in shop] == [first, second]
    assert retired.key not in _items(install)


def test_a_retired_item_that_was_marked_stays_in_the_stages_list(install, office, technician):
    item = shop_checklist_item_save(by=office, stage_kind=1, text="Vent clear")
    _mark(install, item.key, by=technician)
    shop_checklist_item_save(by=office, item=item, stage_kind=1, text="Vent clear", active=False)
    assert _items(install)[item.key].state == "pass"


def test_only_the_office_keeps_the_shops_list(technician, lead):
    for user in (technician, lead):
        with pytest.raises(PermissionDenied):
            shop_checklist_item_save(by=user, stage_kind=1, text="Vent clear")


def test_a_shop_item_needs_a_stage_and_words(office):
    with pytest.raises(ValidationError) as exc_info:
        shop_checklist_item_save(by=office, stage_kind="nine", text="  ", order="-1")
    assert set(exc_info.value.message_dict) == {"stage_kind", "text", "order"}


# --- marking ------------------------------------------------------------------------------


def test_a_mark_records_who_what_and_leaves_an_event_with_before_and_after(
    install, circuit, technician
):
    key = f"circuit:{circuit.pk}:labels"
    first = _mark(install, key, "fail", by=technician, note="Label missing at the far end")
    again = _mark(install, key, "pass", by=technician)
    assert (first.marked_by, first.item_basis) == (technician, circuit.tag)
    assert _items(install)[key].state == "pass"  # the latest counts
    assert ChecklistMark.objects.filter(item_key=key).count() == 2
    event = AuditEvent.objects.filter(kind=AuditEvent.Kind.ITEM_TICKED).order_by("-pk").first()
    assert event.subject_id == str(again.pk)
    assert event.before["result"] == "fail" and event.after["result"] == "pass"


@pytest.mark.parametrize("result", ["fail", "na"])
def test_a_fail_or_not_applicable_needs_a_note(install, circuit, technician, result):
    with pytest.raises(ValidationError) as exc_info:
        _mark(install, f"circuit:{circuit.pk}:chafe", result, by=technician, note=" ")
    assert "note" in _errors(exc_info)
    assert not ChecklistMark.objects.exists()


def test_a_result_other_than_pass_fail_or_not_applicable_is_refused(install, circuit, technician):
    with pytest.raises(ValidationError) as exc_info:
        _mark(install, f"circuit:{circuit.pk}:chafe", "maybe", by=technician)
    assert "pass, fail or not applicable" in _errors(exc_info)["result"]


def test_a_torque_item_is_not_ticked_by_hand_it_follows_the_readings(
    install, termination, wrench, technician
):
    key = f"torque:{termination.pk}"
    with pytest.raises(ValidationError) as exc_info:
        _mark(install, key, by=technician)
    assert "record a reading" in _errors(exc_info)["item_key"]
    read(termination, install, "7", technician=technician, wrench=wrench)
    assert _items(install)[key].state == "fail"
    read(termination, install, "10", technician=technician, wrench=wrench)
    assert _items(install)[key].state == "pass"


def test_an_unknown_item_or_a_closed_stage_is_refused(stages, install, technician):
    with pytest.raises(ValidationError) as exc_info:
        _mark(install, "circuit:999999:labels", by=technician)
    assert "no such item" in _errors(exc_info)["item_key"]
    with pytest.raises(ValidationError) as exc_info:
        _mark(stages[Stage.Kind.HANDOVER], "shop:1", by=technician)
    assert "not started" in _errors(exc_info)["stage"]


def test_the_office_cannot_mark_an_item(install, circuit, office):
    with pytest.raises(PermissionDenied):
        _mark(install, f"circuit:{circuit.pk}:labels", by=office)


def test_the_same_mark_sent_twice_is_stored_once_and_a_reused_key_is_refused(
    install, circuit, technician
):
    key = new_key()
    item = f"circuit:{circuit.pk}:labels"
    first = _mark(install, item, by=technician, client_key=key)
    assert _mark(install, item, by=technician, client_key=key).pk == first.pk
    with pytest.raises(ValidationError) as exc_info:
        _mark(install, item, "fail", note="missing", by=technician, client_key=key)
    assert "already used" in _errors(exc_info)["client_key"]
    assert ChecklistMark.objects.count() == 1
    assert AuditEvent.objects.filter(kind=AuditEvent.Kind.ITEM_TICKED).count() == 1


def test_a_mark_stops_counting_when_the_circuit_records_something_else(
    install, circuit, technician
):
    key = f"circuit:{circuit.pk}:protection"
    _mark(install, key, by=technician)
    circuit_update(circuit=circuit, protection_a=Decimal("20"))
    item = _items(install)[key]
    assert (item.state, item.mark.item_basis, item.basis) == ("changed", "fuse 15 A", "fuse 20 A")
    assert not item.marked


def test_retorque_marks_wait_for_the_soak(stages, job, technician):
    item = ShopChecklistItem.objects.create(stage_kind=Stage.Kind.RETORQUE, text="Covers on")
    log_soaked_run(job, technician, minutes_ago=10)  # the default soak is 120 minutes
    retorque = Stage.objects.get(pk=stages[Stage.Kind.RETORQUE].pk)
    with pytest.raises(ValidationError) as exc_info:
        _mark(retorque, item.key, by=technician)
    assert "minutes left" in _errors(exc_info)["stage"]


def test_no_mark_is_made_on_an_approved_job(approved_job, technician):
    retorque = approved_job.stages.get(kind=Stage.Kind.RETORQUE)
    with pytest.raises(ValidationError) as exc_info:
        _mark(retorque, "shop:1", by=technician)
    assert "a lead must reopen it first" in _errors(exc_info)["job"]


# --- evidence -----------------------------------------------------------------------------


@pytest.fixture
def mark(install, circuit, technician):
    return _mark(install, f"circuit:{circuit.pk}:labels", by=technician)


def _raw(sql, params):
    with transaction.atomic(), connection.cursor() as cursor:
        cursor.execute(sql, params)


def test_a_stored_mark_cannot_be_saved_again_or_deleted(mark):
    mark.result = "fail"
    with pytest.raises(AppendOnlyError):
        mark.save()
    with pytest.raises(AppendOnlyError):
        mark.delete()
    with pytest.raises(AppendOnlyError):
        ChecklistMark.objects.all().update(result="fail")


def test_raw_sql_update_of_a_checklist_mark_fails(mark):
    with pytest.raises(DatabaseError, match="checklist marks are append-only"):
        _raw("UPDATE inspections_checklistmark SET result = %s WHERE id = %s", ["fail", mark.pk])
    assert ChecklistMark.objects.get(pk=mark.pk).result == "pass"


def test_raw_sql_delete_of_a_checklist_mark_fails(mark):
    with pytest.raises(DatabaseError, match="checklist marks are append-only"):
        _raw("DELETE FROM inspections_checklistmark WHERE id = %s", [mark.pk])
    assert ChecklistMark.objects.filter(pk=mark.pk).exists()


@pytest.fixture
def approved_job(job, technician, lead, wrench):
    approved(job, technician=technician, lead=lead, wrench=wrench)
    return job
