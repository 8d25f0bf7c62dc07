"""Devices (battery, busbar, fuse holder, inverter/charger, external supply…) and their
terminals."""

from __future__ import annotations

from decimal import Decimal

from django.core.exceptions import ValidationError
from django.core.validators import MinValueValidator
from django.db import models
from django.urls import reverse

from circuits.models.choices import Mounting, Polarity, ProtectionType, StudSize, TorqueUnit


class Device(models.Model):
    class Kind(models.TextChoices):
        BATTERY = "battery", "Battery"
        BUSBAR = "busbar", "Busbar"
        PROTECTION = "protection", "Fuse or breaker holder"
        INVERTER_CHARGER = "inverter_charger", "Inverter/charger"
        CHARGE_CONTROLLER = "charge_controller", "Charge controller"
        DC_DC_CHARGER = "dc_dc_charger", "DC-DC charger"
        ALTERNATOR = "alternator", "Alternator"
        SHORE_INLET = "shore_inlet", "Shore inlet"
        AC_PANEL = "ac_panel", "AC panel"
        DC_PANEL = "dc_panel", "DC panel"
        LOAD = "load", "Load"
        EXTERNAL_SUPPLY = "external_supply", "External supply (pedestal, generator, socket)"
        OTHER = "other", "Other"

    # Kinds whose own fuse or breaker can be a circuit's protection (Circuit.protection).
    PROTECTING_KINDS = (Kind.PROTECTION, Kind.EXTERNAL_SUPPLY)

    job = models.ForeignKey("shop.Job", on_delete=models.CASCADE, related_name="devices")
    name = models.CharField(max_length=80)
    kind = models.CharField(max_length=20, choices=Kind.choices)
    is_source = models.BooleanField(
        "source", default=False, help_text="Supplies current: battery, alternator, shore inlet…"
    )
    mounting = models.CharField(max_length=20, choices=Mounting.choices, default=Mounting.BODY)
    enclosure = models.CharField(
        max_length=80,
        blank=True,
        help_text="Panel or enclosure it sits in; colour rules compare devices sharing one.",
    )
    location = models.CharField(max_length=120, blank=True)
    input_current_a = models.DecimalField(
        "AC input current setting (A)",
        max_digits=6,
        decimal_places=1,
        null=True,
        blank=True,
        validators=[MinValueValidator(0.1)],
        help_text="Inverter/charger: the shore input current limit it is set to.",
    )
    # The fuse or breaker a protection device holds, or an external supply's own breaker.
    protection_type = models.CharField(
        "fuse or breaker",
        max_length=10,
        choices=[c for c in ProtectionType.choices if c[0] != ProtectionType.NONE],
        blank=True,
    )
    protection_a = models.DecimalField(
        "protection rating (A)",
        max_digits=7,
        decimal_places=1,
        null=True,
        blank=True,
        validators=[MinValueValidator(0.1)],
        help_text="Fuse or breaker holder: the fuse or breaker fitted. External supply: "
        "the breaker it is protected by at its source.",
    )
    supply_voltage = models.DecimalField(
        "supply voltage (V)",
        max_digits=5,
        decimal_places=1,
        null=True,
        blank=True,
        validators=[MinValueValidator(1)],
        help_text="External supply: its nominal voltage, e.g. 120 or 230.",
    )
    notes = models.TextField(blank=True)
    # Where the device sits along the vehicle (0 first): the torque work list walks the
    # devices in this order so a technician reads one device after the next.
    walking_order = models.PositiveIntegerField(default=0)

    class Meta:
        ordering = ["job", "name"]
        constraints = [
            models.UniqueConstraint(
                fields=["job", "name"],
                name="device_name_unique_per_job",
                violation_error_message="This job already has a device with this name.",
            )
        ]

    def __str__(self) -> str:
        return self.name

    def get_absolute_url(self) -> str:
        return reverse("device_detail", args=[self.job.number, self.pk])

    @property
    def is_external(self) -> bool:
        """A supply off the vehicle: a campground or marina pedestal, a generator, a
        building socket."""
        return self.kind == self.Kind.EXTERNAL_SUPPLY

    @property
    def supplies(self) -> bool:
        """A source for the rules: marked as one, or an external supply (always one)."""
        return self.is_source or self.is_external

    @property
    def protects(self) -> bool:
        """Its own fuse or breaker can be a circuit's protection."""
        return self.kind in self.PROTECTING_KINDS

    @property
    def protection_display(self) -> str:
        """'30 A breaker', 'fuse, rating not recorded', '' for a device holding none."""
        if not self.protects:
            return ""
        kind = "breaker" if self.protection_type == ProtectionType.BREAKER else "fuse"
        if not self.protection_type:
            kind = "fuse or breaker"
        if self.protection_a is None:
            return f"{kind}, rating not recorded"
        return f"{Decimal(self.protection_a).normalize():f} A {kind}"

    def clean(self) -> None:
        errors: dict[str, str] = {}
        if self.is_external:
            # An external supply is the far end of a shore cord: it stands off the
            # vehicle, supplies current and is protected by its own breaker.
            if self.mounting != Mounting.OFF_VEHICLE:
                errors["mounting"] = "An external supply stands off the vehicle."
            if not self.is_source:
                errors["is_source"] = "An external supply is a source; tick 'source'."
            if self.supply_voltage is None:
                errors["supply_voltage"] = "Give the supply's voltage, e.g. 120 or 230."
            if self.protection_a is None:
                errors["protection_a"] = "Give the rating of the breaker protecting the supply."
        else:
            if self.mounting == Mounting.OFF_VEHICLE:
                errors["mounting"] = "Only an external supply stands off the vehicle."
            if self.supply_voltage is not None:
                errors["supply_voltage"] = "Only an external supply has a supply voltage."
        if not self.protects and (self.protection_a is not None or self.protection_type):
            errors["protection_a"] = (
                "Only a fuse or breaker holder or an external supply has a protection rating."
            )
        if errors:
            raise ValidationError(errors)


class Terminal(models.Model):
    device = models.ForeignKey(Device, on_delete=models.CASCADE, related_name="terminals")
    name = models.CharField(max_length=40, help_text="As marked on the device, e.g. +, B-, L1.")
    polarity = models.CharField(max_length=10, choices=Polarity.choices)
    stud_size = models.CharField(max_length=10, choices=StudSize.choices, blank=True)
    # The device manual's torque, when known, wins over the shop default.
    manual_torque_value = models.DecimalField(
        max_digits=7, decimal_places=2, null=True, blank=True, validators=[MinValueValidator(0.01)]
    )
    manual_torque_unit = models.CharField(
        max_length=10, choices=TorqueUnit.choices, default=TorqueUnit.NM
    )

    class Meta:
        ordering = ["device", "name"]
        constraints = [
            models.UniqueConstraint(
                fields=["device", "name"],
                name="terminal_name_unique_per_device",
                violation_error_message="This device already has a terminal with this name.",
            )
        ]

    def __str__(self) -> str:
        return f"{self.device.name} {self.name}"
