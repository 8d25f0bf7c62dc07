"""Hostile and careless input on the tablet and office pages of the working half: torque
entry and correction, the offline queue's JSON, the walking order, checklist marks,
sign-offs (the signature's data), send-back, approval, reopen, the owner's receipt, the
heat-cycle run, thermal readings and their waivers, wrenches and their calibrations, the
shop's checklist items, return visits, and the query strings of the lists.

The founders' rule on bad input, checked on every page: never a server error or a
traceback, markup always escaped, a refused post says why beside the field, and nothing
already saved (readings, marks, sign-offs, audit events) gains or loses a row.
Runs on SQLite and on PostgreSQL (which refuses NUL characters and out-of-range integers)."""

from __future__ import annotations

import json
import uuid

import pytest
from django.forms.models import model_to_dict
from django.urls import reverse
from hypothesis import given
from hypothesis import strategies as st

from inspections.models import Stage, TorqueRecord, TorqueWrench
from tests.hostile_web import (
    FUZZ,
    MARKUP,
    assert_sane,
    client_for,
    evidence_counts,
    fuzz_form,
    fuzz_query,
    hostile_values,
    today_plus,
    world_scope,
)
from tests.inspections.factories import PASSWORD, signature

pytestmark = pytest.mark.django_db


@pytest.fixture(scope="module")
def world(django_db_setup, django_db_blocker):
    with world_scope(django_db_blocker) as built:
        yield built


@pytest.fixture
def tech(world):
    return client_for(world.tech)


@pytest.fixture
def lead(world):
    return client_for(world.lead)


@pytest.fixture
def office(world):
    return client_for(world.office)


def _number(world, name: str) -> str:
    return world.jobs[name].number


def _unread_end(world):
    return world.jobs["working"].circuits.first().terminations.order_by("pk")[1]


def _reading_snapshot(world):
    return lambda: model_to_dict(TorqueRecord.objects.get(pk=world.reading.pk))


# --- torque readings ------------------------------------------------------------------


def test_torque_entry_refuses_hostile_fields_beside_them(world, tech):
    page = reverse("torque_entry", args=[_number(world, "working"), _unread_end(world).pk])
    fuzz_form(tech, page, fill={"value": "10", "wrench": str(world.wrench.pk)})


def test_torque_correction_refuses_hostile_fields_and_keeps_the_reading(world, tech):
    page = reverse("torque_correct", args=[_number(world, "working"), world.reading.pk])
    fuzz_form(
        tech,
        page,
        fill={"value": "10.5", "reason": "typed 10 for 10.5", "wrench": str(world.wrench.pk)},
        snapshot=_reading_snapshot(world),
    )


def test_walking_order_refuses_hostile_device_and_direction(world, tech):
    page = reverse("walking_order", args=[_number(world, "working")])
    fuzz_form(tech, page, fill={"move": "down"})


def test_checklist_mark_refuses_hostile_item_result_and_note(world, tech):
    page = reverse("stage_checklist", args=[_number(world, "working"), 1])
    fuzz_form(tech, page, action="/mark/", fill={"result": "pass"})


# --- the offline queue's JSON ---------------------------------------------------------


def _sync(client, world, body: str):
    return client.post(
        reverse("torque_sync", args=[_number(world, "working")]),
        data=body,
        content_type="application/json",
    )


def _reading(world, **fields) -> dict:
    return {
        "key": "3f0c1d2e-0000-4000-8000-00000000000a",
        "termination": _unread_end(world).pk,
        "stage": int(Stage.Kind.FIRST_INSTALL),
        "value": "10",
        "unit": "N*m",
        "wrench": world.wrench.pk,
        "found_loose": False,
        "note": "",
        **fields,
    }


json_scalars = st.one_of(
    hostile_values,
    st.integers(min_value=-(2**70), max_value=2**70),
    st.floats(),
    st.booleans(),
    st.none(),
    st.just([]),
    st.just({}),
)


@pytest.mark.parametrize(
    "name", ["key", "termination", "stage", "value", "unit", "wrench", "found_loose", "note"]
)
def test_sync_answers_every_hostile_reading_field_in_json(name, world, tech):
    """A field of any JSON type or hostile text is refused in the answer (200, "refused"
    with the field's message) or as malformed (400), never stored when refused."""

    @FUZZ
    @given(value=json_scalars)
    def send(value) -> None:
        before = evidence_counts()
        answer = _sync(tech, world, json.dumps({"readings": [_reading(world, **{name: value})]}))
        assert_sane(answer, value)
        assert answer.status_code in (200, 400), answer.status_code
        reply = answer.json()
        if answer.status_code == 400:
            assert reply["error"]
            assert evidence_counts() == before
            return
        (result,) = reply["results"]
        if result["status"] == "refused":
            assert result["message"] and result["errors"]
            assert evidence_counts() == before

    send()


@pytest.mark.parametrize(
    "body",
    [
        "[" * 100_000,
        '{"readings": ' + "[" * 50_000 + "]" * 50_000 + "}",
        "{" * 5_000,
        "\xff\xfe",
        "",
        "null",
        '{"readings": null}',
        '{"readings": [NaN]}',
        '{"readings": {"0": 1}}',
        json.dumps({"readings": [1] * 51}),
        '{"readings": [{"key": "\\ud800", "termination": 1, "stage": 1, "value": "1",'
        ' "unit": "N*m"}]}',
    ],
    ids=lambda b: repr(b[:24]),
)
def test_sync_refuses_malformed_bodies_with_a_plain_error(body, world, tech):
    """Malformed JSON, nested thousands deep included, is a 400 with a message."""
    before = evidence_counts()
    answer = _sync(tech, world, body)
    assert_sane(answer)
    assert answer.status_code in (200, 400)
    assert evidence_counts() == before


def test_sync_refuses_a_lone_surrogate_in_the_note(world, tech):
    """A note of an unpaired UTF-16 surrogate (JSON allows the escape; no database can
    store it) is refused beside the note, not a server error."""
    body = json.dumps({"readings": [_reading(world, note="\ud800 loose")]})
    before = evidence_counts()
    answer = _sync(tech, world, body)
    assert_sane(answer)
    (result,) = answer.json()["results"]
    assert result["status"] == "refused" and "note" in result["errors"]
    assert evidence_counts() == before


# --- sign-offs, send-back, approval, reopen, receipt ---------------------------------


def test_stage_sign_refuses_hostile_password_or_signature(world, tech):
    page = reverse("stage_sign", args=[_number(world, "ready"), 1])
    fuzz_form(tech, page, fill={"password": PASSWORD, "signature": signature()})


def test_send_back_refuses_hostile_notes(world, lead):
    page = reverse("stage_send_back", args=[_number(world, "retorque"), 1])
    fuzz_form(lead, page)


def test_approval_refuses_hostile_password_or_signature(world, lead):
    page = reverse("job_approve", args=[_number(world, "to_approve")])
    fuzz_form(lead, page, fill={"password": PASSWORD, "signature": signature()})


def test_reopen_refuses_hostile_reasons(world, lead):
    page = reverse("job_reopen", args=[_number(world, "approved")])
    fuzz_form(lead, page)


def test_handover_receipt_refuses_hostile_name_or_signature(world, tech):
    page = reverse("handover_receipt", args=[_number(world, "approved")])
    fuzz_form(tech, page, fill={"printed_name": "Ada Owner", "signature": signature()})


# --- heat cycle, thermal readings, waivers -------------------------------------------


def test_heat_cycle_run_refuses_hostile_times_and_figures(world, tech):
    page = reverse("heat_cycle_log", args=[_number(world, "heat")])
    fuzz_form(
        tech,
        page,
        fill={
            "start": today_plus(-1) + "T08:00",
            "end": today_plus(-1) + "T09:00",
            "peak_current_a": "120",
            "ambient_c": "20",
        },
    )


def test_thermal_readings_refuse_hostile_temperatures_and_keys(world, tech):
    page = reverse("thermal_readings", args=[_number(world, "retorque")])
    fuzz_form(tech, page)


def test_thermal_waiver_refuses_hostile_reasons(world, lead):
    page = reverse("thermal_waive", args=[_number(world, "retorque"), world.thermal.pk])
    fuzz_form(lead, page)


# --- the office: wrenches, calibrations, checklist items, return visits --------------


def _wrench_snapshot(world):
    return lambda: model_to_dict(TorqueWrench.objects.get(pk=world.wrench.pk))


WRENCH = {
    "code": "TW-H8",
    "description": "Click wrench",
    "range_min": "2",
    "range_max": "50",
    "unit": "N*m",
    "calibration_due": today_plus(90),
}


# A range is checked as a whole: its end must lie above its start (beside the end).
WRENCH_RELATED = {"range_min": ("range_max",)}


def test_new_wrench_refuses_hostile_fields(world, office):
    fuzz_form(office, reverse("wrench_new"), fill=WRENCH, related=WRENCH_RELATED)


def test_wrench_edit_refuses_hostile_fields_and_keeps_the_wrench(world, office):
    fuzz_form(
        office,
        reverse("wrench_edit", args=[world.wrench.pk]),
        snapshot=_wrench_snapshot(world),
        related=WRENCH_RELATED,
    )


def test_calibration_refuses_hostile_dates_errors_and_files(world, office):
    fuzz_form(
        office,
        reverse("wrench_calibrations", args=[world.wrench.pk]),
        fill={
            "calibrated_on": today_plus(-1),
            "due_on": today_plus(364),
            "as_found_error_pct": "1.5",
            "done_by": "Test calibration lab",
        },
        snapshot=_wrench_snapshot(world),
        # The next due date is checked against the calibration's own date, beside it.
        related={"calibrated_on": ("due_on",)},
    )


def test_shop_checklist_item_refuses_hostile_fields(world, office):
    fuzz_form(office, reverse("shop_checklist_item_new"), fill={"text": "Check the fuse"})


def test_return_visit_booking_refuses_hostile_fields(world, lead):
    page = reverse("return_visit_book", args=[_number(world, "approved")])
    fuzz_form(lead, page, fill={"title": "Yearly re-check", "booked_in_on": today_plus(30)})


# --- query strings of the lists -------------------------------------------------------

QUERY_KEYS = ["stage", "saved", "next", "q", "status", "page", "kind", "sort", "job", "tech"]


@pytest.mark.parametrize(
    "name,args",
    [
        ("stage_work", ["working"]),
        ("torque_entry", None),
        ("review_queue", []),
        ("job_review", ["retorque"]),
        ("job_timeline", ["approved"]),
        ("wrench_list", []),
        ("shop_checklist", []),
    ],
)
def test_no_query_parameter_gives_a_server_error(name, args, world, lead):
    if args is None:
        page = reverse(name, args=[_number(world, "working"), _unread_end(world).pk])
        client = client_for(world.tech)
    else:
        page = reverse(name, args=[_number(world, a) for a in args])
        client = lead
    fuzz_query(client, page, QUERY_KEYS)


def test_markup_in_a_note_comes_back_escaped_on_the_work_list(world, tech):
    """A note saved with markup in it shows as text on the pages that list it."""
    page = reverse("torque_entry", args=[_number(world, "working"), _unread_end(world).pk])
    answer = tech.post(
        page,
        {
            "value": "10",
            "unit": "N*m",
            "wrench": world.wrench.pk,
            "note": MARKUP,
            "client_key": str(uuid.uuid4()),
        },
    )
    assert_sane(answer, MARKUP)
    for address in (page, reverse("job_timeline", args=[_number(world, "working")])):
        assert_sane(tech.get(address), MARKUP)
