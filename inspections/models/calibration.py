"""A wrench's calibration history: one row per calibration, append-only like the evidence,
because the record of which tool was in tolerance when is what stands behind a reading."""

from __future__ import annotations

from django.conf import settings
from django.core.exceptions import ValidationError
from django.core.validators import MaxValueValidator, MinValueValidator
from django.db import models
from django.db.models import Q
from django.utils import timezone

from inspections.models.base import AppendOnlyModel


class WrenchCalibration(AppendOnlyModel):
    """One calibration of one wrench: when, until when, by whom, and how far off it was
    found before adjustment (the as-found error is what says whether the readings made
    since the last calibration can be trusted)."""

    wrench = models.ForeignKey(
        "inspections.TorqueWrench", on_delete=models.PROTECT, related_name="calibrations"
    )
    calibrated_on = models.DateField()
    due_on = models.DateField(help_text="Next calibration due.")
    done_by = models.CharField(
        max_length=120, help_text="Laboratory or person who calibrated the wrench."
    )
    certificate = models.CharField(max_length=60, blank=True, help_text="Certificate number.")
    as_found_error_pct = models.DecimalField(
        "as-found error (%)",
        max_digits=5,
        decimal_places=1,
        null=True,
        blank=True,
        validators=[MinValueValidator(-100), MaxValueValidator(100)],
        help_text="Deviation found before any adjustment; blank when not stated.",
    )
    adjusted = models.BooleanField(default=False, help_text="Adjusted during calibration.")
    notes = models.TextField(blank=True)
    recorded_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+"
    )
    recorded_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        ordering = ["wrench", "-calibrated_on", "-pk"]
        constraints = [
            models.CheckConstraint(
                condition=Q(due_on__gt=models.F("calibrated_on")),
                name="wrench_calibration_due_after_done",
                violation_error_message="The next due date must come after the calibration.",
            )
        ]

    def __str__(self) -> str:
        return f"{self.wrench.code} calibrated {self.calibrated_on:%Y-%m-%d}"

    def clean(self) -> None:
        if self.calibrated_on and self.due_on and self.due_on <= self.calibrated_on:
            raise ValidationError({"due_on": "The next due date must come after the calibration."})
