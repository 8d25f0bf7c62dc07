"""The last record a return visit starts from: which record it was (this shop's approved
job, or another shop's record PDF read by `import_record`), the circuits it listed, and
the final torque reading of each conductor end in it.

Copied once, when the return visit is booked, and append-only like the evidence: what
the earlier record said is a fact of the past, and the return visit's re-check and its
record are read against it. Conductor ends are named by their key (circuit tag, end,
polarity, conductor index) rather than by a foreign key, so new work on the return visit
may remove a circuit without touching what the last record said about it."""

from __future__ import annotations

from django.db import models
from django.db.models import Q
from django.utils import timezone

from circuits.models import Polarity, Termination, TorqueUnit
from inspections.models.base import AppendOnlyModel


class PriorRecord(AppendOnlyModel):
    """The record a return visit follows (one per return visit)."""

    class Source(models.TextChoices):
        THIS_SHOP = "this_shop", "This shop's approved job"
        IMPORTED = "imported", "Another record, read from its PDF"

    job = models.OneToOneField("shop.Job", on_delete=models.PROTECT, related_name="prior_record")
    source = models.CharField(max_length=10, choices=Source.choices)
    job_number = models.CharField("earlier job number", max_length=40)
    shop_name = models.CharField("shop that issued it", max_length=160, blank=True)
    approved_at = models.DateTimeField(null=True, blank=True)
    # [{"tag": "D-01", "name": "Battery to fuse block"}, ...] as the record listed them.
    circuits = models.JSONField(default=list)
    created_at = models.DateTimeField(default=timezone.now, editable=False)

    class Meta:
        constraints = [
            models.CheckConstraint(
                condition=Q(source__in=["this_shop", "imported"]), name="prior_record_source"
            )
        ]

    def __str__(self) -> str:
        return f"{self.job_number} ({self.get_source_display().lower()})"


class PriorReading(AppendOnlyModel):
    """The final reading of one conductor end in the earlier record: its retorque (as
    corrected), else its first install, else its re-check."""

    record = models.ForeignKey(PriorRecord, on_delete=models.PROTECT, related_name="readings")
    circuit_tag = models.CharField(max_length=12)
    end = models.CharField(max_length=4, choices=Termination.End.choices)
    polarity = models.CharField(max_length=10, choices=Polarity.choices)
    conductor_index = models.PositiveSmallIntegerField(default=1)
    label = models.CharField(max_length=80)
    pass_name = models.CharField(
        "pass", max_length=20, help_text="Which pass the reading was: retorque, first install."
    )
    value = models.DecimalField(max_digits=9, decimal_places=3)
    unit = models.CharField(max_length=10, choices=TorqueUnit.choices)
    value_nm = models.FloatField()
    spec_display = models.CharField(max_length=60, blank=True)
    result = models.CharField(max_length=6)
    found_loose = models.BooleanField(default=False)
    wrench = models.CharField(max_length=40, blank=True)
    technician = models.CharField(max_length=120, blank=True)
    recorded_at = models.DateTimeField(null=True, blank=True)

    class Meta:
        ordering = ["record", "circuit_tag", "end", "polarity", "conductor_index"]
        constraints = [
            models.UniqueConstraint(
                fields=["record", "circuit_tag", "end", "polarity", "conductor_index"],
                name="prior_reading_one_per_end",
            )
        ]

    def __str__(self) -> str:
        return f"{self.label}: {self.value} {self.unit} ({self.pass_name})"

    @property
    def key(self) -> tuple[str, str, str, int]:
        return (self.circuit_tag, self.end, self.polarity, self.conductor_index)
