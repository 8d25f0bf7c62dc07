"""Torque wrenches and torque records: one reading on one termination at one stage."""

from __future__ import annotations

import datetime

from django.conf import settings
from django.core.exceptions import ValidationError
from django.core.validators import MinValueValidator
from django.db import models
from django.db.models import Q
from django.utils import timezone

from circuits.models import Termination, TorqueUnit
from inspections.models.base import AppendOnlyModel, AppendOnlyQuerySet
from inspections.units import format_number, format_torque, to_nm


class TorqueWrench(models.Model):
    """A tool with a shop id, a range it reads over and a calibration due date. A
    reading made with an overdue wrench or outside its range is refused."""

    code = models.CharField(
        "shop id", max_length=20, unique=True, help_text="As marked on the wrench, e.g. TW-03."
    )
    description = models.CharField(max_length=120, blank=True)
    range_min = models.DecimalField(
        "range from", max_digits=7, decimal_places=2, validators=[MinValueValidator(0.01)]
    )
    range_max = models.DecimalField(
        "range to", max_digits=7, decimal_places=2, validators=[MinValueValidator(0.01)]
    )
    unit = models.CharField(max_length=10, choices=TorqueUnit.choices, default=TorqueUnit.NM)
    calibration_due = models.DateField(help_text="Readings are refused after this date.")
    in_service = models.BooleanField(
        default=True, help_text="Untick when the wrench is lost, broken or retired."
    )
    notes = models.TextField(blank=True)

    class Meta:
        ordering = ["code"]
        constraints = [
            models.CheckConstraint(
                condition=Q(range_min__gt=0) & Q(range_max__gt=models.F("range_min")),
                name="torque_wrench_range_ordered",
                violation_error_message="The range must run from a smaller to a larger value.",
            )
        ]

    def __str__(self) -> str:
        return f"{self.code} ({self.range_display})"

    @property
    def range_display(self) -> str:
        return (
            f"{format_number(self.range_min)}–{format_number(self.range_max)} "
            f"{TorqueUnit(self.unit).label}"
        )

    def range_nm(self) -> tuple[float, float]:
        return to_nm(self.range_min, self.unit), to_nm(self.range_max, self.unit)

    def days_overdue(self, on: datetime.date | None = None) -> int:
        """Days past its calibration due date on `on` (today); 0 while current. Due on a
        date means usable through that date."""
        on = on or timezone.localdate()
        return max(0, (on - self.calibration_due).days)

    def clean(self) -> None:
        if (
            self.range_min is not None
            and self.range_max is not None
            and self.range_max <= self.range_min
        ):
            raise ValidationError({"range_max": "The range must end above where it starts."})


class TorqueRecordQuerySet(AppendOnlyQuerySet):
    def current(self) -> TorqueRecordQuerySet:
        """Records no correction has superseded."""
        return self.filter(superseded_by__isnull=True)


class TorqueRecord(AppendOnlyModel):
    """One torque reading. Append-only (see inspections.models.base): a wrong entry is
    corrected by a new record that supersedes it and carries a reason.

    The spec in force at the time is copied in, so a later change of the termination's
    spec does not rewrite what this reading was judged against."""

    class Result(models.TextChoices):
        WITHIN = "within", "Within tolerance"
        LOW = "low", "Low"
        HIGH = "high", "High"

    # PROTECT throughout: a termination, stage, wrench or person with readings cannot
    # vanish, and so neither can the circuit, device or job above them (Django refuses
    # the whole cascade with ProtectedError before deleting anything).
    termination = models.ForeignKey(
        Termination, on_delete=models.PROTECT, related_name="torque_records"
    )
    stage = models.ForeignKey(
        "inspections.Stage", on_delete=models.PROTECT, related_name="torque_records"
    )
    value = models.DecimalField(
        "value as entered", max_digits=9, decimal_places=3, validators=[MinValueValidator(0.001)]
    )
    unit = models.CharField("unit as entered", max_length=10, choices=TorqueUnit.choices)
    value_nm = models.FloatField("value (N·m)")
    spec_value = models.DecimalField(max_digits=7, decimal_places=2)
    spec_unit = models.CharField(max_length=10, choices=TorqueUnit.choices)
    spec_tolerance_pct = models.DecimalField(max_digits=4, decimal_places=1)
    spec_source = models.CharField(max_length=14, choices=Termination.SpecSource.choices)
    spec_source_note = models.CharField(max_length=160, blank=True)
    spec_nm = models.FloatField("spec (N·m)")
    result = models.CharField(max_length=6, choices=Result.choices)
    wrench = models.ForeignKey(TorqueWrench, on_delete=models.PROTECT, related_name="records")
    technician = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="torque_records"
    )
    # When the reading was taken (a correction keeps the time of the reading it
    # corrects); created_at is when this row was written.
    recorded_at = models.DateTimeField(default=timezone.now)
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    found_loose = models.BooleanField(
        default=False, help_text="Retorque only: the fastener turned before the wrench clicked."
    )
    note = models.TextField(blank=True)
    photo = models.ImageField(upload_to="inspections/torque/%Y/%m/", blank=True)
    # One-to-one: a record is superseded at most once (a second, concurrent correction of
    # the same record fails on the unique index); correct the correction instead.
    supersedes = models.OneToOneField(
        "self",
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="superseded_by",
    )
    correction_reason = models.TextField(blank=True)
    # Made by the page when the reading is entered; a resend of the same reading carries
    # the same key, and the unique constraint stores it once however often it arrives.
    client_key = models.CharField(max_length=64)

    objects = TorqueRecordQuerySet.as_manager()

    class Meta:
        ordering = ["recorded_at", "pk"]
        constraints = [
            models.UniqueConstraint(fields=["client_key"], name="torque_record_client_key_unique"),
            models.CheckConstraint(
                condition=~Q(client_key=""), name="torque_record_client_key_given"
            ),
            models.CheckConstraint(
                condition=Q(value__gt=0) & Q(value_nm__gt=0) & Q(spec_nm__gt=0),
                name="torque_record_values_positive",
            ),
            models.CheckConstraint(
                condition=(
                    Q(supersedes__isnull=True, correction_reason="")
                    | (Q(supersedes__isnull=False) & ~Q(correction_reason=""))
                ),
                name="torque_record_correction_has_reason",
            ),
            models.CheckConstraint(
                condition=Q(result__in=["within", "low", "high"]),
                name="torque_record_result_known",
            ),
        ]
        indexes = [
            models.Index(fields=["stage", "termination", "recorded_at"], name="torque_by_stage")
        ]

    def __str__(self) -> str:
        return f"{self.termination}: {self.value_display} ({self.get_result_display()})"

    @property
    def value_display(self) -> str:
        return format_torque(self.value, self.unit)

    @property
    def spec_display(self) -> str:
        return (
            f"{format_torque(self.spec_value, self.spec_unit)} "
            f"±{format_number(self.spec_tolerance_pct, 1)} %"
        )

    @property
    def is_correction(self) -> bool:
        return self.supersedes_id is not None

    @property
    def within_tolerance(self) -> bool:
        return self.result == self.Result.WITHIN
