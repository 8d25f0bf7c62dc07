"""Writes of the insights app: making and retiring shop rules (keyword-only, validated,
one transaction each). A rule is never edited: retire it and make a new one."""

from __future__ import annotations

import contextlib

from django.core.exceptions import ValidationError
from django.db import transaction
from django.utils import timezone

from circuits.models import Device, Mounting, StudSize, TerminationKind
from insights.models import ShopRule
from inspections.models import Stage
from inspections.services.common import Errors, add_error, clean_text, raise_if, require_perm

MANAGE_PERM = "insights.manage_shop_rules"
MIN_TEXT = 5
# Stages a rule's item can be checked at: the ones with work on the connections.
RULE_STAGES = (Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE, Stage.Kind.HANDOVER)


def _choice(value: object, choices, *, field: str, what: str, errors: Errors) -> str:
    text = str(value or "").strip()
    if text and text not in choices.values:
        add_error(errors, field, f"Choose a {what} from the list (or leave it as any).")
        return ""
    return text


def shop_rule_create(
    *,
    stage_kind: object,
    text: object,
    device_kind: object = "",
    mounting: object = "",
    termination_kind: object = "",
    stud_size: object = "",
    made_from: object = "",
    by,
) -> ShopRule:
    """Make a rule: from now on, new jobs with a matching device get the item `text` on
    the checklist of stage `stage_kind`. At least one of device kind, mounting,
    termination kind and stud size says what it applies to."""
    require_perm(by, MANAGE_PERM, "Only leads make shop rules.")
    errors: Errors = {}
    kind = None
    with contextlib.suppress(TypeError, ValueError):
        kind = Stage.Kind(int(str(stage_kind)))
    if kind not in RULE_STAGES:
        add_error(errors, "stage_kind", "Choose the stage the item is checked at.")
    conditions = {
        "device_kind": _choice(
            device_kind, Device.Kind, field="device_kind", what="device kind", errors=errors
        ),
        "mounting": _choice(mounting, Mounting, field="mounting", what="mounting", errors=errors),
        "termination_kind": _choice(
            termination_kind,
            TerminationKind,
            field="termination_kind",
            what="termination kind",
            errors=errors,
        ),
        "stud_size": _choice(
            stud_size, StudSize, field="stud_size", what="stud size", errors=errors
        ),
    }
    if not errors and not any(conditions.values()):
        add_error(
            errors,
            "device_kind",
            "Say what the rule applies to: a device kind, a mounting, a termination kind"
            " or a stud size.",
        )
    words = clean_text(text, field="text", what="item's text", limit=160, errors=errors)
    if "text" not in errors and len(words) < MIN_TEXT:
        add_error(errors, "text", "Write what is to be checked, e.g. 'second retorque'.")
    source = clean_text(made_from, field="made_from", what="source", limit=300, errors=errors)
    raise_if(errors)
    with transaction.atomic():
        rule = ShopRule(stage_kind=kind, text=words, made_from=source, created_by=by, **conditions)
        rule.full_clean()
        rule.save()
    return rule


def shop_rule_retire(*, rule: ShopRule, by) -> ShopRule:
    """Retire a rule: jobs created from now on no longer get its item (jobs that already
    have it keep it, with any mark it was given)."""
    require_perm(by, MANAGE_PERM, "Only leads retire shop rules.")
    with transaction.atomic():
        rule = ShopRule.objects.select_for_update().get(pk=rule.pk)
        if rule.retired_at is not None:
            raise ValidationError({"rule": "This rule is already retired."})
        rule.retired_at = timezone.now()
        rule.retired_by = by
        rule.save(update_fields=["retired_at", "retired_by"])
    return rule
