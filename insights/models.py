"""Shop rules: a lead turns a finding of the insight pages into a checklist item for
new jobs ("set-screw terminals on charge controllers get a second retorque").

A rule applies to the jobs created while it is in force (from when it was made until it
was retired), never to jobs that already existed: an existing job's checklist, and so
what its sign-offs cover, does not change under it. Rules are made and retired, never
edited: a mark keeps the words it was given against, and the rule keeps its own."""

from __future__ import annotations

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.utils import timezone

from circuits.models import Device, Mounting, StudSize, TerminationKind
from inspections.models import Stage


class ShopRuleQuerySet(models.QuerySet):
    def in_force_for(self, job) -> ShopRuleQuerySet:
        """Rules in force when `job` was created."""
        return self.filter(created_at__lte=job.created_at).filter(
            Q(retired_at__isnull=True) | Q(retired_at__gt=job.created_at)
        )


class ShopRule(models.Model):
    stage_kind = models.PositiveSmallIntegerField("stage", choices=Stage.Kind.choices)
    # What it applies to: each one given must match (blank: any). At least one is given.
    device_kind = models.CharField(max_length=20, choices=Device.Kind.choices, blank=True)
    mounting = models.CharField(
        "device mounted on", max_length=20, choices=Mounting.choices, blank=True
    )
    termination_kind = models.CharField(max_length=10, choices=TerminationKind.choices, blank=True)
    stud_size = models.CharField(max_length=10, choices=StudSize.choices, blank=True)
    text = models.CharField("checklist item", max_length=160)
    # The insight it was made from, in words ("Loosening 2024-01-01 to 2024-12-31:
    # set-screw, 7 of 20 found loose"), so a later reader knows why the rule exists.
    made_from = models.CharField(max_length=300, blank=True)
    created_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+"
    )
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    retired_at = models.DateTimeField(null=True, blank=True)
    retired_by = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="+",
    )

    objects = ShopRuleQuerySet.as_manager()

    class Meta:
        ordering = ["-created_at", "-pk"]
        permissions = [
            ("view_insights", "Can see the shop's loosening and wrench insights"),
            ("view_technician_insights", "Can see the per-technician insights"),
            ("manage_shop_rules", "Can make and retire shop rules"),
        ]
        constraints = [
            models.CheckConstraint(
                condition=~Q(device_kind="", mounting="", termination_kind="", stud_size=""),
                name="shop_rule_has_a_condition",
            ),
            models.CheckConstraint(condition=~Q(text=""), name="shop_rule_has_text"),
            models.CheckConstraint(
                condition=Q(stage_kind__gte=1, stage_kind__lte=4), name="shop_rule_stage_known"
            ),
        ]

    def __str__(self) -> str:
        return self.text

    @property
    def active(self) -> bool:
        return self.retired_at is None

    def conditions(self) -> list[str]:
        """What it applies to, in words: ["Charge controller", "Set-screw"]."""
        words = []
        if self.device_kind:
            words.append(self.get_device_kind_display())
        if self.mounting:
            words.append(f"mounted on {self.get_mounting_display().lower()}")
        if self.termination_kind:
            words.append(f"{self.get_termination_kind_display().lower()} terminations")
        if self.stud_size:
            words.append(f"{self.get_stud_size_display()} studs")
        return words
