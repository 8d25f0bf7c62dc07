"""Shop rules: who may read, make and retire them; making one validates every field and
saves nothing on bad input; a rule adds its item to new jobs of matching hardware only."""

from __future__ import annotations

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.urls import reverse

from insights.models import ShopRule
from insights.services import shop_rule_create, shop_rule_retire
from inspections.models import Stage
from inspections.services import checklist_items_for
from shop import roles
from tests.factories import make_job, make_user
from tests.insights.data import build
from tests.inspections.factories import mark_all

pytestmark = pytest.mark.django_db
URL = reverse("shop_rules")
GOOD = {
    "stage_kind": "3",
    "device_kind": "charge_controller",
    "termination_kind": "set_screw",
    "text": "Set-screws get a second retorque",
}


def test_anonymous_is_sent_to_sign_in(anon_client):
    assert "/login/" in anon_client.get(URL)["Location"]
    assert "/login/" in anon_client.post(URL, GOOD)["Location"]


def test_technicians_may_not_read_or_make_rules(technician_client):
    assert technician_client.get(URL).status_code == 403
    assert technician_client.post(URL, GOOD).status_code == 403
    assert not ShopRule.objects.exists()


def test_office_reads_the_rules_but_makes_none(office_client, lead):
    shop_rule_create(by=lead, **GOOD)
    page = office_client.get(URL).content.decode()
    assert "Set-screws get a second retorque" in page and "Make the rule" not in page
    assert office_client.post(URL, GOOD).status_code == 403
    assert ShopRule.objects.count() == 1


def test_a_lead_makes_a_rule(lead_client, lead):
    response = lead_client.post(URL, GOOD)
    assert response.status_code == 302
    rule = ShopRule.objects.get()
    assert (rule.stage_kind, rule.device_kind, rule.termination_kind) == (
        3,
        "charge_controller",
        "set_screw",
    )
    assert rule.created_by == lead and rule.active


def test_the_loosening_button_prefills_the_form(lead_client):
    response = lead_client.get(URL, {"termination_kind": "set_screw", "made_from": "Loosening x"})
    form = response.context["form"]
    assert form.initial["termination_kind"] == "set_screw"
    assert "Filled in from the loosening page" in response.content.decode()


@pytest.mark.parametrize(
    ("change", "field", "message"),
    [
        ({"device_kind": "", "termination_kind": ""}, "device_kind", "Say what the rule applies"),
        ({"device_kind": "toaster"}, "device_kind", "Select a valid choice"),
        ({"stage_kind": "2"}, "stage_kind", "Select a valid choice"),
        ({"text": ""}, "text", "This field is required"),
        ({"text": "ok"}, "text", "Write what is to be checked"),
        ({"text": "x" * 161}, "text", "at most 160"),
    ],
)
def test_bad_input_is_explained_beside_the_field_and_nothing_saved(
    lead_client, change, field, message
):
    response = lead_client.post(URL, {**GOOD, **change})
    assert response.status_code == 200
    assert message in " ".join(response.context["form"].errors[field])
    assert not ShopRule.objects.exists()


def test_the_service_checks_role_and_values():
    tech = make_user(roles.TECHNICIAN)
    with pytest.raises(PermissionDenied):
        shop_rule_create(by=tech, **GOOD)
    lead = make_user(roles.LEAD)
    with pytest.raises(ValidationError) as error:
        shop_rule_create(by=lead, stage_kind="nine", stud_size="M99", text="\x00 nul")
    assert set(error.value.message_dict) == {"stage_kind", "stud_size", "text"}
    assert not ShopRule.objects.exists()


def test_retiring_asks_first_and_only_leads_may(lead_client, office_client, lead):
    rule = shop_rule_create(by=lead, **GOOD)
    url = reverse("shop_rule_retire", args=[rule.pk])
    assert office_client.post(url, {"confirm": "retire"}).status_code == 403
    assert lead_client.post(url).status_code == 200  # no confirmation: asks again
    rule.refresh_from_db()
    assert rule.active
    assert lead_client.post(url, {"confirm": "retire"}).status_code == 302
    rule.refresh_from_db()
    assert not rule.active and rule.retired_by == lead
    assert lead_client.get(reverse("shop_rule_retire", args=[rule.pk + 99])).status_code == 404
    with pytest.raises(ValidationError):
        shop_rule_retire(rule=rule, by=lead)


def _rule_items(job):
    stage = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    return [item for item in checklist_items_for(stage=stage) if item.kind == "rule"]


def test_a_rule_adds_its_item_to_new_jobs_with_matching_hardware():
    lead = make_user(roles.LEAD)
    before = build(make_job())  # a job that existed before the rule
    rule = shop_rule_create(by=lead, **GOOD)
    after = build(make_job())
    (item,) = _rule_items(after.job)
    assert item.key == f"rule:{rule.pk}:device:{after.controller.pk}"
    assert item.text == "Solar controller: Set-screws get a second retorque"
    assert item.basis == "2 set-screw terminations"
    # The older job's checklist (and so what its sign-offs cover) is unchanged.
    assert _rule_items(before.job) == []
    # Not at the other stages; and a rule for another device kind adds nothing.
    install = Stage.objects.get(job=after.job, kind=Stage.Kind.FIRST_INSTALL)
    assert not [i for i in checklist_items_for(stage=install) if i.kind == "rule"]


def test_the_rule_item_is_marked_like_any_other_and_keeps_after_retiring():
    lead = make_user(roles.LEAD)
    rule = shop_rule_create(by=lead, **GOOD)
    data = build(make_job())
    retorque = Stage.objects.get(job=data.job, kind=Stage.Kind.RETORQUE)
    mark_all(retorque, by=data.checker)
    (item,) = _rule_items(data.job)
    assert item.state == "pass"
    shop_rule_retire(rule=rule, by=lead)
    (item,) = _rule_items(data.job)  # the job was made while it was in force
    assert item.state == "pass"
    assert _rule_items(build(make_job()).job) == []  # a job made after: none


def test_a_device_only_rule_matches_every_device_of_that_kind():
    lead = make_user(roles.LEAD)
    shop_rule_create(by=lead, stage_kind=3, device_kind="busbar", text="Busbar cover refitted")
    data = build(make_job())
    (item,) = _rule_items(data.job)
    assert item.text == "Bus 1: Busbar cover refitted" and item.basis == "Busbar"
