"""A job's stages: first install, heat-cycle run, retorque, handover (DESIGN.md)."""

from __future__ import annotations

from django.db import models
from django.db.models import Q


class Stage(models.Model):
    """One stage of one job. Its state changes only through inspections.services (each
    change leaves an audit event); the gates of later issues read and move it."""

    class Kind(models.IntegerChoices):
        # Numbers, so that ordering by kind is the order the work happens in. A return
        # visit's re-check (as-found torque and the thermal check, before any
        # re-tightening) comes before the usual stages for any new work.
        RECHECK = 0, "Re-check"
        FIRST_INSTALL = 1, "First install"
        HEAT_CYCLE = 2, "Heat-cycle run"
        RETORQUE = 3, "Retorque"
        HANDOVER = 4, "Handover"

    class State(models.TextChoices):
        NOT_STARTED = "not_started", "Not started"
        OPEN = "open", "Open"
        SIGNED = "signed", "Signed"
        SENT_BACK = "sent_back", "Sent back"
        REOPENED = "reopened", "Reopened"
        # A return visit with nothing to re-tighten and no new work: the lead marks the
        # build stages not needed, with a reason (inspections.services.return_visit).
        NOT_NEEDED = "not_needed", "Not needed"

    # The stages every job has; a return visit adds the re-check before them.
    BUILD_KINDS = (Kind.FIRST_INSTALL, Kind.HEAT_CYCLE, Kind.RETORQUE, Kind.HANDOVER)

    # States in which technicians work on the stage: open, sent back by a lead for more
    # work, or reopened after approval. Signed and not-started stages take no new records.
    WORKING_STATES = (State.OPEN, State.SENT_BACK, State.REOPENED)

    job = models.ForeignKey("shop.Job", on_delete=models.CASCADE, related_name="stages")
    kind = models.PositiveSmallIntegerField(choices=Kind.choices)
    state = models.CharField(max_length=12, choices=State.choices, default=State.NOT_STARTED)
    opened_at = models.DateTimeField(null=True, blank=True)
    updated_at = models.DateTimeField(auto_now=True)

    class Meta:
        ordering = ["job", "kind"]
        constraints = [
            models.UniqueConstraint(
                fields=["job", "kind"],
                name="stage_one_per_job_and_kind",
                violation_error_message="This job already has this stage.",
            ),
            models.CheckConstraint(condition=Q(kind__gte=0, kind__lte=4), name="stage_kind_known"),
            models.CheckConstraint(
                condition=Q(
                    state__in=[
                        "not_started",
                        "open",
                        "signed",
                        "sent_back",
                        "reopened",
                        "not_needed",
                    ]
                ),
                name="stage_state_known",
            ),
        ]

    def __str__(self) -> str:
        return f"{self.job.number} {self.get_kind_display()} ({self.get_state_display()})"

    @property
    def accepts_work(self) -> bool:
        return self.state in self.WORKING_STATES

    @property
    def takes_torque_readings(self) -> bool:
        return self.kind in (self.Kind.RECHECK, self.Kind.FIRST_INSTALL, self.Kind.RETORQUE)
