"""The audit trail: one append-only event for every change of state on a job."""

from __future__ import annotations

from django.conf import settings
from django.core.serializers.json import DjangoJSONEncoder
from django.db import models
from django.utils import timezone

from inspections.models.base import AppendOnlyModel


class AuditEvent(AppendOnlyModel):
    """Who did what, when, with the state before and after. Written by the services in
    the same transaction as the change it records, so neither exists without the other."""

    class Kind(models.TextChoices):
        READING = "reading", "Reading made"
        CORRECTION = "correction", "Reading corrected"
        THERMAL_READING = "thermal_reading", "Temperature reading made"
        RUN_LOGGED = "run_logged", "Heat-cycle run logged"
        ITEM_TICKED = "item_ticked", "Checklist item marked"
        STAGE_OPENED = "stage_opened", "Stage opened"
        STAGE_SIGNED = "stage_signed", "Stage signed"
        SENT_BACK = "sent_back", "Stage sent back"
        WAIVER_GRANTED = "waiver_granted", "Finding waived"
        WAIVER_WITHDRAWN = "waiver_withdrawn", "Waiver withdrawn"
        APPROVAL = "approval", "Approved for handover"
        REOPEN = "reopen", "Reopened"
        RECEIVED = "received", "Received by the owner"

    # PROTECT: a job or person with a trail cannot be deleted (deactivate staff instead).
    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="audit_events")
    kind = models.CharField(max_length=20, choices=Kind.choices)
    actor = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="audit_events",
        help_text="Empty when the system made the change.",
    )
    at = models.DateTimeField(default=timezone.now)
    summary = models.CharField(max_length=300)
    before = models.JSONField(null=True, blank=True, encoder=DjangoJSONEncoder)
    after = models.JSONField(null=True, blank=True, encoder=DjangoJSONEncoder)
    # What the event is about, as a model label ("inspections.torquerecord") and primary
    # key; plain text rather than a generic foreign key so no content-type row is needed
    # and the subject's later removal (where allowed) leaves the trail readable.
    subject_type = models.CharField(max_length=60, blank=True)
    subject_id = models.CharField(max_length=40, blank=True)

    class Meta:
        ordering = ["-at", "-pk"]
        indexes = [models.Index(fields=["job", "at"], name="audit_by_job_and_time")]

    def __str__(self) -> str:
        return f"{self.at:%Y-%m-%d %H:%M} {self.get_kind_display()}: {self.summary}"
