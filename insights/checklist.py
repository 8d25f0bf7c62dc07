"""The shop rules' checklist items (registered with inspections in InsightsConfig.ready).

One item per rule in force for the job (see ShopRule) whose stage this is, per device of
the job that matches the rule: a device of the kind and mounting the rule names, with at
least one termination of the kind and stud size it names (when it names them). The key
`rule:<rule id>:device:<device id>` stays the same as long as both exist; the basis says
what matched, so a mark given before the device's terminations changed no longer counts.
"""

from __future__ import annotations

from django.db.models import Case, CharField, Count, F, When

from circuits.models import Device, Termination
from insights.models import ShopRule
from inspections.models import Stage
from inspections.services.checklists import ChecklistItem

RULE = "rule"


def _device_side(field: str) -> Case:
    """The termination's device's `field`: a termination sits on its circuit's from
    device at the from end, on the to device at the to end."""
    return Case(
        When(end=Termination.End.FROM, then=F(f"circuit__from_device__{field}")),
        default=F(f"circuit__to_device__{field}"),
        output_field=CharField() if field != "id" else None,
    )


def _matches(rule: ShopRule, job_id: int) -> list[tuple[Device, str]]:
    devices = Device.objects.filter(job=job_id)
    if rule.device_kind:
        devices = devices.filter(kind=rule.device_kind)
    if rule.mounting:
        devices = devices.filter(mounting=rule.mounting)
    if not (rule.termination_kind or rule.stud_size):
        return [(device, device.get_kind_display()) for device in devices.order_by("name")]
    ends = Termination.objects.filter(circuit__job=job_id)
    if rule.termination_kind:
        ends = ends.filter(kind=rule.termination_kind)
    if rule.stud_size:
        ends = ends.filter(stud_size=rule.stud_size)
    counts = dict(
        ends.annotate(device_id=_device_side("id"))
        .values("device_id")
        .annotate(n=Count("pk"))
        .values_list("device_id", "n")
    )
    what = " ".join(
        word
        for word in (
            rule.get_termination_kind_display().lower() if rule.termination_kind else "",
            "termination",
        )
        if word
    )
    on = f" on {rule.get_stud_size_display()} studs" if rule.stud_size else ""
    return [
        (device, f"{counts[device.pk]} {what}{'s' if counts[device.pk] != 1 else ''}{on}")
        for device in devices.filter(pk__in=counts).order_by("name")
    ]


def rule_items(stage: Stage) -> list[ChecklistItem]:
    rules = ShopRule.objects.in_force_for(stage.job).filter(stage_kind=stage.kind)
    items = []
    for rule in rules.order_by("created_at", "pk"):
        for device, basis in _matches(rule, stage.job_id):
            items.append(
                ChecklistItem(
                    key=f"rule:{rule.pk}:device:{device.pk}",
                    kind=RULE,
                    text=f"{device.name}: {rule.text}",
                    basis=basis,
                )
            )
    return items
