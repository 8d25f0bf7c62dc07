"""Default torque specs and terminations: one end of one conductor on one terminal."""

from __future__ import annotations

from django.core.validators import MaxValueValidator, MinValueValidator
from django.db import models

from circuits.models.choices import Polarity, StudSize, TerminationKind, TorqueUnit
from circuits.models.circuit import Circuit
from circuits.models.devices import Device, Terminal


class TorqueDefault(models.Model):
    """Shop table of default torque specs by stud size and termination kind; fills new
    terminations unless the device manual's value is known."""

    stud_size = models.CharField(max_length=10, choices=StudSize.choices)
    kind = models.CharField(max_length=10, choices=TerminationKind.choices)
    value = models.DecimalField(
        max_digits=7, decimal_places=2, validators=[MinValueValidator(0.01)]
    )
    unit = models.CharField(max_length=10, choices=TorqueUnit.choices, default=TorqueUnit.NM)
    tolerance_pct = models.DecimalField(
        max_digits=4,
        decimal_places=1,
        default=10,
        validators=[MinValueValidator(1), MaxValueValidator(30)],
    )
    source = models.CharField(
        max_length=160, help_text="Where the value comes from (standard, maker's table…)."
    )

    class Meta:
        ordering = ["stud_size", "kind"]
        constraints = [
            models.UniqueConstraint(
                fields=["stud_size", "kind"],
                name="torque_default_unique",
                violation_error_message="There is already a default for this stud size and kind.",
            )
        ]

    def __str__(self) -> str:
        return f"{self.get_stud_size_display()} {self.get_kind_display()}: {self.value} {self.unit}"


class Termination(models.Model):
    """One end of one conductor on one device terminal."""

    class End(models.TextChoices):
        FROM = "from", "From end"
        TO = "to", "To end"

    class SpecSource(models.TextChoices):
        MANUAL = "manual", "Device manual"
        SHOP_DEFAULT = "shop_default", "Shop default for the stud size"
        STANDARD = "standard", "Standard"
        NONE = "none", "Not set"

    circuit = models.ForeignKey(Circuit, on_delete=models.CASCADE, related_name="terminations")
    end = models.CharField(max_length=4, choices=End.choices)
    polarity = models.CharField(max_length=10, choices=Polarity.choices)
    conductor_index = models.PositiveSmallIntegerField(default=1)
    terminal = models.ForeignKey(
        Terminal, on_delete=models.SET_NULL, null=True, blank=True, related_name="terminations"
    )
    kind = models.CharField(
        max_length=10, choices=TerminationKind.choices, default=TerminationKind.LUG_ON_STUD
    )
    stud_size = models.CharField(max_length=10, choices=StudSize.choices, blank=True)
    torque_value = models.DecimalField(
        max_digits=7, decimal_places=2, null=True, blank=True, validators=[MinValueValidator(0.01)]
    )
    torque_unit = models.CharField(max_length=10, choices=TorqueUnit.choices, default=TorqueUnit.NM)
    torque_tolerance_pct = models.DecimalField(
        max_digits=4,
        decimal_places=1,
        default=10,
        validators=[MinValueValidator(1), MaxValueValidator(30)],
    )
    torque_source = models.CharField(
        max_length=14, choices=SpecSource.choices, default=SpecSource.NONE
    )
    torque_source_note = models.CharField(max_length=160, blank=True)

    class Meta:
        ordering = ["circuit", "end", "polarity", "conductor_index"]
        constraints = [
            models.UniqueConstraint(
                fields=["circuit", "end", "polarity", "conductor_index"],
                name="termination_unique_end",
            )
        ]

    def __str__(self) -> str:
        index = f" #{self.conductor_index}" if self.circuit.parallel > 1 else ""
        return f"{self.circuit.tag} {self.get_end_display()} {self.get_polarity_display()}{index}"

    @property
    def device(self) -> Device:
        return self.circuit.from_device if self.end == self.End.FROM else self.circuit.to_device
