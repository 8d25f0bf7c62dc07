"""The heat-cycle run and the temperature of each connection taken right after it."""

from __future__ import annotations

from django.conf import settings
from django.db import models
from django.db.models import F, Q
from django.utils import timezone

from circuits.models import Termination
from inspections.models.base import AppendOnlyModel


class HeatCycleRun(models.Model):
    """The system run near its design load, then left to cool; the retorque stage opens
    once a run is logged and the shop's soak time has passed since its end."""

    # PROTECT: a job with a logged run is evidence and cannot be deleted.
    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="heat_cycle_runs")
    started_at = models.DateTimeField()
    ended_at = models.DateTimeField()
    peak_current_a = models.DecimalField("peak current (A)", max_digits=6, decimal_places=1)
    ambient_c = models.DecimalField("ambient temperature (°C)", max_digits=4, decimal_places=1)
    logged_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="heat_cycle_runs"
    )
    notes = models.TextField(blank=True)
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    # A return visit's re-check runs the system under load for its thermal check, as
    # found, before any re-tightening: that run signs nothing and starts no soak (the
    # heat-cycle stage's run, after any re-tightening, does; latest_run leaves these out).
    recheck = models.BooleanField(
        "re-check run", default=False, help_text="Run for the re-check's thermal check."
    )

    class Meta:
        ordering = ["job", "ended_at", "pk"]
        get_latest_by = ["ended_at", "pk"]
        constraints = [
            models.CheckConstraint(
                condition=Q(ended_at__gt=F("started_at")), name="heat_cycle_run_ends_after_start"
            ),
            models.CheckConstraint(
                condition=Q(peak_current_a__gt=0), name="heat_cycle_run_current_positive"
            ),
        ]

    def __str__(self) -> str:
        return f"{self.job.number} run ending {self.ended_at:%Y-%m-%d %H:%M}"


class ThermalReading(AppendOnlyModel):
    """One connection's temperature after a run. Append-only like torque records. Its
    class (possible deficiency … major discrepancy) is not stored: it is computed from
    the run's ambient and the similar connections read on the same run
    (inspections.thermal), as findings are recomputed rather than stored."""

    run = models.ForeignKey(HeatCycleRun, on_delete=models.PROTECT, related_name="readings")
    termination = models.ForeignKey(
        Termination, on_delete=models.PROTECT, related_name="thermal_readings"
    )
    temperature_c = models.DecimalField("temperature (°C)", max_digits=5, decimal_places=1)
    taken_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="thermal_readings"
    )
    taken_at = models.DateTimeField(default=timezone.now)
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    note = models.TextField(blank=True)
    client_key = models.CharField(max_length=64)

    class Meta:
        ordering = ["taken_at", "pk"]
        constraints = [
            models.UniqueConstraint(
                fields=["client_key"], name="thermal_reading_client_key_unique"
            ),
            models.CheckConstraint(
                condition=~Q(client_key=""), name="thermal_reading_client_key_given"
            ),
        ]

    def __str__(self) -> str:
        return f"{self.termination}: {self.temperature_c} °C"


class ThermalWaiver(AppendOnlyModel):
    """A lead's written acceptance of one hot connection, so it no longer blocks the
    retorque sign-off. Bound to the temperature reading it accepts: a later reading of
    the same connection that is hot again is not covered and blocks until it is read
    cooler or waived again. Append-only like the readings."""

    reading = models.ForeignKey(ThermalReading, on_delete=models.PROTECT, related_name="waivers")
    reason = models.TextField()
    lead = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="thermal_waivers"
    )
    waived_at = models.DateTimeField(default=timezone.now)

    class Meta:
        ordering = ["waived_at", "pk"]
        permissions = [("waive_thermal", "Can waive a hot connection found after the heat cycle")]
        constraints = [
            models.UniqueConstraint(fields=["reading"], name="thermal_waiver_one_per_reading"),
            models.CheckConstraint(condition=~Q(reason=""), name="thermal_waiver_has_reason"),
        ]

    def __str__(self) -> str:
        return f"Waiver of {self.reading}"
