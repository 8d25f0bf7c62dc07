"""The office pages: everyone reads the torque wrenches (overdue and soon-due ones said in
words) and the shop's own checklist; the office adds and changes both. Bad input shows a
message beside its field and saves nothing."""

from __future__ import annotations

import datetime

import pytest
from django.urls import reverse
from django.utils import timezone

from inspections.models import ShopChecklistItem, Stage, TorqueWrench
from tests.inspections.factories import make_wrench, read

pytestmark = pytest.mark.django_db


def text(response) -> str:
    return response.content.decode()


def days_from_today(days: int) -> datetime.date:
    return timezone.localdate() + datetime.timedelta(days=days)


def wrench_data(**changes) -> dict[str, str]:
    data = {
        "code": "TW-20",
        "description": "1/4 in click wrench",
        "range_min": "2",
        "range_max": "25",
        "unit": "N*m",
        "calibration_due": days_from_today(200).isoformat(),
        "in_service": "on",
        "notes": "",
    }
    data.update(changes)
    return data


def field_error(page: str, field: str) -> str:
    assert f'id="id_{field}_error"' in page, f"no error beside {field}"
    return page.split(f'id="id_{field}_error"', 1)[1].split("</p>", 1)[0]


# ---- anonymous, wrong role, right role ----------------------------------------------------


@pytest.mark.parametrize(
    "name", ["wrench_list", "wrench_new", "shop_checklist", "shop_checklist_item_new"]
)
def test_anonymous_visitors_are_sent_to_sign_in(anon_client, name):
    response = anon_client.get(reverse(name))
    assert response.status_code == 302
    assert response["Location"].startswith(reverse("login"))


@pytest.mark.parametrize("name", ["wrench_new", "shop_checklist_item_new"])
def test_technicians_and_leads_cannot_add(technician_client, lead_client, name):
    for client in (technician_client, lead_client):
        assert client.get(reverse(name)).status_code == 403
        assert client.post(reverse(name), {"code": "TW-99", "text": "x"}).status_code == 403
    assert not TorqueWrench.objects.exists()
    assert not ShopChecklistItem.objects.exists()


def test_a_technician_reads_the_wrenches_without_edit_buttons(technician_client):
    wrench = make_wrench(code="TW-21")
    page = text(technician_client.get(reverse("wrench_list")))
    assert "TW-21" in page
    assert reverse("wrench_edit", args=[wrench.pk]) not in page
    assert reverse("wrench_new") not in page


# ---- the wrench list ----------------------------------------------------------------------


def test_the_list_shows_range_unit_and_due_date(office_client):
    make_wrench(
        code="TW-22",
        description="Stubby",
        range_min=20,
        range_max=100,
        unit="lbf*in",
        calibration_due=datetime.date(2099, 3, 31),
    )
    page = text(office_client.get(reverse("wrench_list")))
    assert "TW-22" in page and "Stubby" in page
    assert "20–100" in page
    assert "lbf·in" in page
    assert "31 Mar 2099" in page


def test_an_overdue_wrench_says_by_how_many_days(office_client):
    make_wrench(code="TW-23", calibration_due=days_from_today(-12))
    page = text(office_client.get(reverse("wrench_list")))
    assert "calibration overdue by 12 days" in page
    assert "1 overdue" in page


def test_a_wrench_due_within_30_days_is_flagged(office_client):
    # 30 days' warning: common practice (time to book a calibration), DUE_SOON_DAYS.
    make_wrench(code="TW-24", calibration_due=days_from_today(9))
    make_wrench(code="TW-25", calibration_due=days_from_today(31))
    page = text(office_client.get(reverse("wrench_list")))
    assert "due in 9 days" in page
    assert "due in 31 days" not in page
    assert "1 due within 30 days" in page


def test_a_wrench_due_today_is_still_usable_today(office_client):
    # TorqueWrench.days_overdue: due on a date means usable through that date.
    make_wrench(code="TW-26", calibration_due=days_from_today(0))
    page = text(office_client.get(reverse("wrench_list")))
    assert "due today" in page
    assert "overdue" not in page.split("TW-26", 1)[1].split("</tr>", 1)[0]


# ---- adding and changing a wrench -------------------------------------------------------


def test_the_office_adds_a_wrench(office_client):
    response = office_client.post(reverse("wrench_new"), wrench_data())
    assert response.status_code == 302
    assert response["Location"] == reverse("wrench_list")
    wrench = TorqueWrench.objects.get()
    assert (wrench.code, wrench.range_display) == ("TW-20", "2–25 N·m")


@pytest.mark.parametrize(
    "field, value, message",
    [
        ("range_min", "NaN", "must be a number"),
        ("range_min", "inf", "must be a number"),
        ("range_min", "1e309", "far too large"),
        ("range_min", "-1", "above zero"),
        ("range_min", "two", "must be a number"),
        ("range_max", "1", "must end above where it starts"),
        ("unit", "furlong", "Choose the unit the wrench scale reads in."),
        ("calibration_due", "someday", "Give the date as the picker offers it"),
        ("code", "", "Give the shop id"),
    ],
)
def test_a_bad_value_is_shown_beside_its_field_and_nothing_is_saved(
    office_client, field, value, message
):
    response = office_client.post(reverse("wrench_new"), wrench_data(**{field: value}))
    assert response.status_code == 200
    assert message in field_error(text(response), field)
    assert not TorqueWrench.objects.exists()


def test_an_unknown_wrench_is_not_found(office_client):
    assert office_client.get(reverse("wrench_edit", args=[999999])).status_code == 404


def test_the_edit_form_shows_the_wrench_as_stored(office_client):
    wrench = make_wrench(code="TW-27", range_min=5, range_max="62.5")
    page = text(office_client.get(reverse("wrench_edit", args=[wrench.pk])))
    assert 'value="TW-27"' in page
    assert 'value="62.5"' in page and 'value="5"' in page


def test_a_wrench_with_readings_keeps_its_shop_id_on_the_form(
    office_client, install, termination, technician
):
    wrench = make_wrench(code="TW-28")
    read(termination, install, 10, technician=technician, wrench=wrench)
    page = text(office_client.get(reverse("wrench_edit", args=[wrench.pk])))
    assert "keeps its shop id and unit" in page
    response = office_client.post(
        reverse("wrench_edit", args=[wrench.pk]), wrench_data(code="TW-29")
    )
    assert "keeps its shop id" in field_error(text(response), "code")
    wrench.refresh_from_db()
    assert wrench.code == "TW-28"


# ---- the shop's own checklist -------------------------------------------------------------


def test_everyone_reads_the_shops_list_by_stage_in_order(technician_client):
    ShopChecklistItem.objects.create(stage_kind=Stage.Kind.RETORQUE, text="Paint marks", order=20)
    ShopChecklistItem.objects.create(stage_kind=Stage.Kind.RETORQUE, text="Vent clear", order=10)
    ShopChecklistItem.objects.create(
        stage_kind=Stage.Kind.RETORQUE, text="Old check", order=5, active=False
    )
    page = text(technician_client.get(reverse("shop_checklist")))
    retorque = page.split('id="stage-3"', 1)[1].split("</section>", 1)[0]
    assert (
        retorque.index("Old check") < retorque.index("Vent clear") < retorque.index("Paint marks")
    )
    assert "retired" in retorque
    assert reverse("shop_checklist_item_new") not in page  # reads only


def test_the_office_adds_an_item_at_the_end_of_its_stage(office_client):
    ShopChecklistItem.objects.create(stage_kind=Stage.Kind.HANDOVER, text="Manual handed", order=10)
    response = office_client.post(
        reverse("shop_checklist_item_new"), {"stage_kind": "4", "text": "Spare fuses handed"}
    )
    assert response.status_code == 302
    assert response["Location"] == reverse("shop_checklist") + "#stage-4"
    item = ShopChecklistItem.objects.get(text="Spare fuses handed")
    assert (item.stage_kind, item.order, item.active) == (4, 20, True)


def test_the_new_form_can_start_on_a_stage(office_client):
    page = text(office_client.get(reverse("shop_checklist_item_new") + "?stage=3"))
    assert '<option value="3" selected>' in page
    page = text(office_client.get(reverse("shop_checklist_item_new") + "?stage=NaN"))
    assert "selected>" not in page.split('name="stage_kind"', 1)[1].split("</select>", 1)[0]


@pytest.mark.parametrize(
    "field, data, message",
    [
        ("stage_kind", {"stage_kind": "9", "text": "Vent clear"}, "Choose the stage"),
        ("stage_kind", {"stage_kind": "", "text": "Vent clear"}, "Choose the stage"),
        ("text", {"stage_kind": "1", "text": "   "}, "Write what is to be checked."),
        ("order", {"stage_kind": "1", "text": "Vent", "order": "first"}, "whole number"),
        ("order", {"stage_kind": "1", "text": "Vent", "order": "-3"}, "whole number"),
        ("order", {"stage_kind": "1", "text": "Vent", "order": "1e309"}, "whole number"),
    ],
)
def test_a_bad_item_is_refused_beside_its_field(office_client, field, data, message):
    response = office_client.post(reverse("shop_checklist_item_new"), data)
    assert response.status_code == 200
    assert message in field_error(text(response), field)
    assert not ShopChecklistItem.objects.exists()


def test_an_item_is_moved_and_retired_not_deleted(office_client):
    item = ShopChecklistItem.objects.create(stage_kind=1, text="Vent clear", order=10)
    response = office_client.post(
        reverse("shop_checklist_item_edit", args=[item.pk]),
        {"stage_kind": "1", "text": "Battery box vent clear", "order": "5"},  # "In use" unticked
    )
    assert response.status_code == 302
    item.refresh_from_db()
    assert (item.text, item.order, item.active) == ("Battery box vent clear", 5, False)


def test_an_unknown_item_is_not_found(office_client):
    assert office_client.get(reverse("shop_checklist_item_edit", args=[999999])).status_code == 404
