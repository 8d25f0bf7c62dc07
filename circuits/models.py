"""A job's electrical system: devices and their terminals, circuits, terminations, the
shop's default torque specs, and leads' waivers of findings.

Findings themselves are never stored: they are recomputed from these records by the
sizing engine and the whole-system rules on every view (circuits.system).
"""

from __future__ import annotations

from django.core.exceptions import ValidationError
from django.core.validators import MaxValueValidator, MinValueValidator
from django.db import models
from django.db.models import Q
from django.urls import reverse

from circuits.sizing import SizeNotationError, parse_size

# The Waiver model lives in its own module (this one is long enough); it is part of this
# app and importable from here like the others.
from circuits.waiver_models import Waiver  # noqa: F401

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


def format_length(metres: float | None, unit: str) -> str:
    """A stored length shown back in the unit it was entered in: "10 ft", "3.5 m"."""
    if metres is None:
        return ""
    value = metres / FOOT_M if unit == "ft" else metres
    return f"{round(value, 2):g} {unit}"


INSULATION_RATINGS = [(t, f"{t} °C") for t in (60, 75, 80, 90, 105, 125, 200)]


class Mounting(models.TextChoices):
    CHASSIS = "chassis", "Chassis"
    ENGINE = "engine", "Engine"
    BODY = "body", "Body / wall"
    BATTERY_BOX = "battery_box", "Battery box"


class Polarity(models.TextChoices):
    POSITIVE = "pos", "DC positive"
    NEGATIVE = "neg", "DC negative"
    LINE = "line", "AC line"
    NEUTRAL = "neutral", "AC neutral"
    EARTH = "earth", "Earth / bonding"


class StudSize(models.TextChoices):
    M4 = "M4", "M4"
    M5 = "M5", "M5"
    M6 = "M6", "M6"
    M8 = "M8", "M8"
    M10 = "M10", "M10"
    M12 = "M12", "M12"
    IN_1_4 = "1/4in", '1/4"'
    IN_5_16 = "5/16in", '5/16"'
    IN_3_8 = "3/8in", '3/8"'
    IN_1_2 = "1/2in", '1/2"'
    SCREW = "screw", "Screw terminal"
    OTHER = "other", "Other"


class TerminationKind(models.TextChoices):
    LUG_ON_STUD = "lug", "Crimped lug on stud"
    SET_SCREW = "set_screw", "Set-screw"
    CLAMP = "clamp", "Clamp"
    FERRULE = "ferrule", "Ferrule"


class TorqueUnit(models.TextChoices):
    NM = "N*m", "N·m"
    LBF_IN = "lbf*in", "lbf·in"
    LBF_FT = "lbf*ft", "lbf·ft"
    KGF_CM = "kgf*cm", "kgf·cm"


class Colour(models.TextChoices):
    RED = "red", "Red"
    BLACK = "black", "Black"
    YELLOW = "yellow", "Yellow"
    WHITE = "white", "White"
    BLUE = "blue", "Blue"
    BROWN = "brown", "Brown"
    GREEN = "green", "Green"
    GREEN_YELLOW = "green_yellow", "Green-yellow"
    GREY = "grey", "Grey"
    ORANGE = "orange", "Orange"
    OTHER = "other", "Other"


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
        OTHER = "other", "Other"

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


class CircuitQuerySet(models.QuerySet):
    def for_schedule(self) -> CircuitQuerySet:
        return self.select_related(
            "from_device", "to_device", "from_terminal", "to_terminal"
        ).order_by("tag")


class Circuit(models.Model):
    class Role(models.TextChoices):
        BATTERY_INTERCONNECT = "interconnect", "Battery interconnect"
        MAIN_FEED = "main_feed", "Main feed"
        DC_BRANCH = "dc_branch", "DC branch"
        CHARGING_SOURCE = "charging", "Charging source"
        SHORE_SUPPLY = "shore", "Shore supply"
        AC_BRANCH = "ac_branch", "AC branch"
        BONDING = "bonding", "Bonding"

    class Conductors(models.TextChoices):
        PAIR = "pair", "Positive and negative"
        POSITIVE = "pos", "Positive only"
        NEGATIVE = "neg", "Negative only"
        AC = "ac", "Line, neutral and earth"
        EARTH = "earth", "Earth / bonding only"

    class Construction(models.TextChoices):
        FINE = "fine", "Fine-stranded"
        STANDARD = "standard", "Standard-stranded"
        SOLID = "solid", "Solid"
        CORD = "cord", "Portable flexible cord"

    class ProtectionType(models.TextChoices):
        NONE = "none", "None"
        FUSE = "fuse", "Fuse"
        BREAKER = "breaker", "Circuit breaker"

    class LengthUnit(models.TextChoices):
        M = "m", "m"
        FT = "ft", "ft"

    job = models.ForeignKey("shop.Job", on_delete=models.CASCADE, related_name="circuits")
    tag = models.CharField(max_length=12, help_text="Unique within the job, e.g. D-07.")
    name = models.CharField(max_length=120)
    role = models.CharField(max_length=20, choices=Role.choices)
    from_device = models.ForeignKey(Device, on_delete=models.PROTECT, related_name="circuits_out")
    from_terminal = models.ForeignKey(
        Terminal, on_delete=models.SET_NULL, null=True, blank=True, related_name="+"
    )
    to_device = models.ForeignKey(Device, on_delete=models.PROTECT, related_name="circuits_in")
    to_terminal = models.ForeignKey(
        Terminal, on_delete=models.SET_NULL, null=True, blank=True, related_name="+"
    )
    nominal_voltage = models.DecimalField(
        max_digits=5, decimal_places=1, validators=[MinValueValidator(1)]
    )
    design_current_a = models.DecimalField(
        "design current (A)", max_digits=7, decimal_places=2, validators=[MinValueValidator(0.01)]
    )
    continuous = models.BooleanField(default=False, help_text="Runs 3 hours or more.")
    critical = models.BooleanField(
        default=False, help_text="Critical load: 3 % voltage-drop limit instead of 10 %."
    )
    length_m = models.FloatField(
        "one-way length (m)", validators=[MinValueValidator(0.01), MaxValueValidator(500)]
    )
    length_unit = models.CharField(
        max_length=2,
        choices=LengthUnit.choices,
        default=LengthUnit.M,
        help_text="Unit the length was entered in; shown back in it.",
    )
    conductor_size = models.CharField(
        max_length=20, help_text="As written, e.g. 4/0, 2 AWG, 35 mm²."
    )
    conductors = models.CharField(max_length=8, choices=Conductors.choices, default=Conductors.PAIR)
    parallel = models.PositiveSmallIntegerField(
        "conductors in parallel", default=1, validators=[MinValueValidator(1), MaxValueValidator(8)]
    )
    construction = models.CharField(
        max_length=10, choices=Construction.choices, default=Construction.FINE
    )
    tinned = models.BooleanField(default=True)
    insulation_c = models.PositiveSmallIntegerField(
        "insulation rating", choices=INSULATION_RATINGS, default=105
    )
    engine_space = models.BooleanField(default=False)
    bundled = models.PositiveSmallIntegerField(
        "current-carrying conductors bundled",
        default=1,
        validators=[MinValueValidator(1), MaxValueValidator(100)],
        help_text="Including this circuit's own.",
    )
    colour_a = models.CharField(
        "colour: positive / line", max_length=14, choices=Colour.choices, blank=True
    )
    colour_b = models.CharField(
        "colour: negative / neutral", max_length=14, choices=Colour.choices, blank=True
    )
    colour_earth = models.CharField(
        "colour: earth", max_length=14, choices=Colour.choices, blank=True
    )
    splice = models.BooleanField(default=False, help_text="The run has a splice.")
    colour_after_splice = models.CharField(
        max_length=14,
        choices=Colour.choices,
        blank=True,
        help_text="Colour of the positive / line conductor beyond the splice.",
    )
    tape_remarked = models.BooleanField(
        default=False, help_text="Conductor re-marked with tape instead of its own colour."
    )
    protection_type = models.CharField(
        max_length=10, choices=ProtectionType.choices, default=ProtectionType.FUSE
    )
    protection_a = models.DecimalField(
        "protection rating (A)",
        max_digits=7,
        decimal_places=1,
        null=True,
        blank=True,
        validators=[MinValueValidator(0.1)],
    )
    protection_distance_m = models.FloatField(
        "protection distance from source (m)",
        null=True,
        blank=True,
        validators=[MinValueValidator(0)],
    )
    service_loop_confirmed = models.BooleanField(
        default=False, help_text="Slack left where the run crosses between mounting bodies."
    )
    notes = models.TextField(blank=True)

    objects = CircuitQuerySet.as_manager()

    class Meta:
        ordering = ["job", "tag"]
        constraints = [
            models.UniqueConstraint(
                fields=["job", "tag"],
                name="circuit_tag_unique_per_job",
                violation_error_message="This job already has a circuit with this tag.",
            ),
            models.CheckConstraint(
                condition=Q(parallel__gte=1), name="circuit_parallel_at_least_one"
            ),
        ]

    def __str__(self) -> str:
        return f"{self.tag} {self.name}"

    def get_absolute_url(self) -> str:
        return reverse("circuit_edit", args=[self.job.number, self.pk])

    @property
    def is_ac(self) -> bool:
        return self.role in (self.Role.SHORE_SUPPLY, self.Role.AC_BRANCH)

    @property
    def length_display(self) -> str:
        return format_length(self.length_m, self.length_unit)

    @property
    def protection_distance_display(self) -> str:
        return format_length(self.protection_distance_m, self.length_unit)

    @property
    def size_label(self) -> str:
        try:
            return parse_size(self.conductor_size).label
        except SizeNotationError:
            return self.conductor_size

    def polarities(self) -> list[str]:
        """The conductors this circuit runs, each once (parallel runs repeat each)."""
        return {
            self.Conductors.PAIR: [Polarity.POSITIVE, Polarity.NEGATIVE],
            self.Conductors.POSITIVE: [Polarity.POSITIVE],
            self.Conductors.NEGATIVE: [Polarity.NEGATIVE],
            self.Conductors.AC: [Polarity.LINE, Polarity.NEUTRAL, Polarity.EARTH],
            self.Conductors.EARTH: [Polarity.EARTH],
        }[self.conductors]

    def clean(self) -> None:
        errors: dict[str, str] = {}
        if self.conductor_size:
            try:
                parse_size(self.conductor_size)
            except SizeNotationError as exc:
                errors["conductor_size"] = str(exc)
        if self.from_device_id and self.to_device_id and self.from_device_id == self.to_device_id:
            errors["to_device"] = "A circuit runs between two different devices."
        for side in ("from", "to"):
            device_id = getattr(self, f"{side}_device_id")
            terminal = getattr(self, f"{side}_terminal")
            if terminal is not None and device_id and terminal.device_id != device_id:
                errors[f"{side}_terminal"] = "This terminal belongs to another device."
        job_id = self.job_id
        for side in ("from", "to"):
            device = (
                getattr(self, f"{side}_device", None)
                if getattr(self, f"{side}_device_id")
                else None
            )
            if device is not None and job_id and device.job_id != job_id:
                errors[f"{side}_device"] = "This device belongs to another job."
        if self.protection_type == self.ProtectionType.NONE:
            if self.protection_a is not None:
                errors["protection_a"] = "Choose a fuse or breaker to give a rating."
        elif self.protection_a is None and self.protection_type:
            errors["protection_a"] = "Give the rating of the fuse or breaker."
        if self.colour_after_splice and not self.splice:
            errors["colour_after_splice"] = "Tick 'splice' to record a colour beyond it."
        if errors:
            raise ValidationError(errors)


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
