"""Checklist items per stage, and the marks technicians give them.

Two sources of items (assembled by inspections.services.checklists_items_for, nothing
about a generated item is stored until it is marked):

* generated from the job's system: one torque item per termination (derived from the
  torque records, never ticked by hand) and, at first install, per circuit: protection
  fitted and rated as recorded, colours as recorded, labels fitted, chafe protection
  through bulkheads, and a service loop where the slack rule asks for one;
* the shop's own list per stage (ShopChecklistItem), kept by the office.

A mark is evidence: append-only like torque records (inspections.models.base, and the
triggers of migration 0005). Marking an item again is a new row; the latest counts.
"""

from __future__ import annotations

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.utils import timezone

from inspections.models.base import AppendOnlyModel
from inspections.models.stages import Stage


class ShopChecklistItem(models.Model):
    """One line of the shop's own checklist for a stage ("Battery box vent clear").
    Editing its text changes what later stages show; marks keep the text they were given
    against. Retire an item by unticking `active` (one that was marked cannot be deleted)."""

    stage_kind = models.PositiveSmallIntegerField("stage", choices=Stage.Kind.choices)
    text = models.CharField(max_length=200)
    order = models.PositiveIntegerField(default=0, help_text="Lower numbers come first.")
    active = models.BooleanField(default=True, help_text="Untick to retire the item.")
    created_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["stage_kind", "order", "pk"]
        permissions = [("manage_checklist", "Can keep the shop's own checklist for each stage")]
        constraints = [
            models.CheckConstraint(
                condition=Q(stage_kind__gte=1, stage_kind__lte=4),
                name="shop_checklist_item_stage_known",
            ),
            models.CheckConstraint(condition=~Q(text=""), name="shop_checklist_item_has_text"),
        ]

    def __str__(self) -> str:
        return f"{self.get_stage_kind_display()}: {self.text}"

    @property
    def key(self) -> str:
        return f"shop:{self.pk}"


class ChecklistMark(AppendOnlyModel):
    """One mark of one checklist item at one stage: pass, fail or not applicable, with a
    note (required for fail and not applicable), an optional photo, who and when.

    `item_text` and `item_basis` are copied in: the words the technician saw and what the
    item was checked against ("fuse 15 A", "red positive, black negative"). When the
    circuit later records something else, the mark no longer counts for the item (it is
    shown as changed since marked) and the item must be marked again."""

    class Result(models.TextChoices):
        PASS = "pass", "Pass"
        FAIL = "fail", "Fail"
        NOT_APPLICABLE = "na", "Not applicable"

    stage = models.ForeignKey(Stage, on_delete=models.PROTECT, related_name="checklist_marks")
    # "torque:<termination id>", "circuit:<circuit id>:<check>" or "shop:<item id>".
    item_key = models.CharField(max_length=80)
    item_text = models.CharField(max_length=300)
    item_basis = models.CharField(max_length=300, blank=True)
    shop_item = models.ForeignKey(
        ShopChecklistItem,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="marks",
    )
    result = models.CharField(max_length=4, choices=Result.choices)
    note = models.TextField(blank=True)
    photo = models.ImageField(upload_to="inspections/checklists/%Y/%m/", blank=True)
    marked_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="checklist_marks"
    )
    marked_at = models.DateTimeField(default=timezone.now)
    # Made by the page; a resend of the same mark is stored once (as torque records).
    client_key = models.CharField(max_length=64)

    class Meta:
        ordering = ["marked_at", "pk"]
        constraints = [
            models.UniqueConstraint(fields=["client_key"], name="checklist_mark_client_key_unique"),
            models.CheckConstraint(
                condition=~Q(client_key=""), name="checklist_mark_client_key_given"
            ),
            models.CheckConstraint(
                condition=Q(result__in=["pass", "fail", "na"]), name="checklist_mark_result_known"
            ),
            models.CheckConstraint(
                condition=Q(result="pass") | ~Q(note=""),
                name="checklist_mark_fail_or_na_has_note",
            ),
        ]
        indexes = [
            models.Index(fields=["stage", "item_key", "marked_at"], name="checklist_mark_by_item")
        ]

    def __str__(self) -> str:
        return f"{self.item_text}: {self.get_result_display()}"
