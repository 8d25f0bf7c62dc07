"""Circuits: one conductor run between two devices, its conductors, colours, re-marking
and protection.

A circuit's protection has one home (`Circuit.protection`): either the protection device
it passes through (a fuse or breaker holder, or an external supply's own breaker, at one
end of the run: rating and type are read from that device, its position from which end
it is), or, for an in-line fuse with no terminals of its own, the circuit's own fields
(protection_type, protection_a, protection_distance_m). Never both: `clean()` and the
constraint `circuit_protection_one_home` refuse it.
"""

from __future__ import annotations

from dataclasses import dataclass
from decimal import Decimal

from django.core.exceptions import ValidationError
from django.core.validators import MaxValueValidator, MinValueValidator
from django.db import models
from django.db.models import Q
from django.urls import reverse

from circuits.models.choices import (
    INSULATION_RATINGS,
    MARKING_COLOURS,
    Colour,
    MarkingEnds,
    MarkingMethod,
    Polarity,
    ProtectionType,
    format_length,
)
from circuits.models.devices import Device, Terminal
from circuits.models.marking import ROLES, colour_text, marking_of, seen_colours
from circuits.sizing import SizeNotationError, parse_size


@dataclass(frozen=True)
class Protection:
    """A circuit's protection, wherever it is recorded.

    `kind` is "none", "fuse" or "breaker"; `device` is the protection device when the
    protection is read from one, and `end` ("from"/"to") the end of the run it sits at;
    `distance_m` is the circuit's own recorded distance from the source (in-line
    protection only: a device's position follows from its end, see `distance_from`)."""

    kind: str
    rating_a: Decimal | None
    device: Device | None = None
    end: str | None = None
    distance_m: float | None = None

    @property
    def fitted(self) -> bool:
        return self.kind != ProtectionType.NONE

    @property
    def words(self) -> str:
        """'30 A breaker in Pedestal', '250 A fuse', 'no protection'."""
        if not self.fitted:
            return "no protection"
        kind = "breaker" if self.kind == ProtectionType.BREAKER else "fuse"
        if self.rating_a is None:
            rating = f"{kind}, rating not recorded"
        else:
            rating = f"{Decimal(self.rating_a).normalize():f} A {kind}"
        return f"{rating} in {self.device.name}" if self.device is not None else rating


def _marking_fields(words: str) -> tuple[models.Field, models.Field, models.Field]:
    """A conductor role's re-marking: how (tape, heat-shrink, printed band), its colour,
    and at which ends. All blank: not re-marked."""
    return (
        models.CharField(
            f"re-marking: {words}", max_length=14, choices=MarkingMethod.choices, blank=True
        ),
        models.CharField(
            f"marking colour: {words}", max_length=14, choices=MARKING_COLOURS, blank=True
        ),
        models.CharField(
            f"marked at: {words}", max_length=4, choices=MarkingEnds.choices, blank=True
        ),
    )


ROLE_WORDS = {"a": "positive / line", "b": "negative / neutral", "earth": "earth"}


class CircuitQuerySet(models.QuerySet):
    def for_schedule(self) -> CircuitQuerySet:
        return self.select_related(
            "from_device", "to_device", "from_terminal", "to_terminal", "protection_device"
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

    ProtectionType = ProtectionType

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
    marking_a_method, marking_a_colour, marking_a_ends = _marking_fields(ROLE_WORDS["a"])
    marking_b_method, marking_b_colour, marking_b_ends = _marking_fields(ROLE_WORDS["b"])
    marking_earth_method, marking_earth_colour, marking_earth_ends = _marking_fields("earth")
    splice = models.BooleanField(default=False, help_text="The run has a splice.")
    colour_after_splice = models.CharField(
        max_length=14,
        choices=Colour.choices,
        blank=True,
        help_text="Colour of the positive / line conductor beyond the splice.",
    )
    # One home for the protection: a protection device at one end of the run, or the
    # circuit's own fields below (an in-line fuse holder with no terminals of its own).
    protection_device = models.ForeignKey(
        Device,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="protected_circuits",
        help_text="The fuse or breaker holder (or external supply) at one end of this run "
        "whose fuse or breaker protects it.",
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
            models.CheckConstraint(
                condition=Q(protection_device__isnull=True)
                | Q(
                    protection_type=ProtectionType.NONE,
                    protection_a__isnull=True,
                    protection_distance_m__isnull=True,
                ),
                name="circuit_protection_one_home",
                violation_error_message="A circuit's protection is either a protection device "
                "or its own in-line fuse or breaker, not both.",
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

    # ---- protection: one home ----

    def _protection_end(self) -> str | None:
        device_id = self.protection_device_id
        if device_id is None:
            return None
        if device_id == self.from_device_id:
            return "from"
        return "to" if device_id == self.to_device_id else None

    @property
    def protection(self) -> Protection:
        """The circuit's protection, read from its one home."""
        device = self.protection_device if self.protection_device_id else None
        if device is not None:
            kind = device.protection_type or ProtectionType.FUSE
            return Protection(
                kind=kind, rating_a=device.protection_a, device=device, end=self._protection_end()
            )
        if self.protection_type == ProtectionType.NONE:
            return Protection(kind=ProtectionType.NONE, rating_a=None)
        return Protection(
            kind=self.protection_type,
            rating_a=self.protection_a,
            distance_m=self.protection_distance_m,
        )

    @property
    def protection_rating_a(self) -> Decimal | None:
        return self.protection.rating_a

    # ---- colours and re-marking ----

    def colour_roles(self) -> list[str]:
        """The conductor roles ("a", "b", "earth") this circuit runs."""
        return {
            self.Conductors.PAIR: ["a", "b"],
            self.Conductors.POSITIVE: ["a"],
            self.Conductors.NEGATIVE: ["b"],
            self.Conductors.AC: ["a", "b", "earth"],
            self.Conductors.EARTH: ["earth"],
        }.get(self.conductors, list(ROLES))

    def role_words(self, role: str) -> str:
        if role == "earth":
            return "earth"
        if self.conductors == self.Conductors.AC or self.is_ac:
            return "line" if role == "a" else "neutral"
        return "positive" if role == "a" else "negative"

    def marking(self, role: str):
        return marking_of(self, role)

    def seen_colours(self, role: str) -> dict[str, str]:
        return seen_colours(self, role)

    def colour_texts(self) -> list[tuple[str, str]]:
        """(conductor, what it looks like) for each conductor with anything recorded:
        [("positive", "black, marked red with heat-shrink at both ends"), ...]."""
        roles = self.colour_roles()
        # An earth-only circuit entered with its one colour in colour_a (older records).
        if roles == ["earth"] and not self.colour_earth and self.colour_a:
            return [("earth", colour_text(self, "a"))]
        return [(self.role_words(r), t) for r in roles if (t := colour_text(self, r))]

    @property
    def colour_summary(self) -> str:
        """'positive red; negative black, marked yellow with tape at both ends'."""
        return "; ".join(f"{who} {text}" for who, text in self.colour_texts())

    @property
    def tape_remarked(self) -> bool:
        """Any conductor re-marked with tape (what the old tick recorded)."""
        return any(
            (m := self.marking(r)) is not None and m.method == MarkingMethod.TAPE for r in ROLES
        )

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
        errors.update(self._protection_errors())
        if self.colour_after_splice and not self.splice:
            errors["colour_after_splice"] = "Tick 'splice' to record a colour beyond it."
        errors.update(self._marking_errors())
        if errors:
            raise ValidationError(errors)

    def _protection_errors(self) -> dict[str, str]:
        errors: dict[str, str] = {}
        if self.protection_device_id:
            device = self.protection_device
            if not device.protects:
                errors["protection_device"] = (
                    f"{device.name} is not a fuse or breaker holder or an external supply."
                )
            elif self._protection_end() is None:
                errors["protection_device"] = (
                    f"{device.name} is not at either end of this circuit; choose the "
                    "protection device the run passes through."
                )
            elif device.protection_a is None:
                errors["protection_device"] = (
                    f"{device.name} has no rating recorded; give it one on the device first."
                )
            # One home: the circuit's own fields stay empty.
            if self.protection_type != ProtectionType.NONE or self.protection_a is not None:
                errors["protection_a"] = (
                    "The protection is read from the protection device; leave the circuit's "
                    "own rating empty."
                )
            if self.protection_distance_m is not None:
                errors["protection_distance_m"] = (
                    "The protection device's position follows from its end of the run; "
                    "leave the distance empty."
                )
            return errors
        if self.protection_type == ProtectionType.NONE:
            if self.protection_a is not None:
                errors["protection_a"] = "Choose a fuse or breaker to give a rating."
        elif self.protection_a is None and self.protection_type:
            errors["protection_a"] = "Give the rating of the fuse or breaker."
        return errors

    def _marking_errors(self) -> dict[str, str]:
        errors: dict[str, str] = {}
        for role in ROLES:
            method = getattr(self, f"marking_{role}_method")
            colour = getattr(self, f"marking_{role}_colour")
            ends = getattr(self, f"marking_{role}_ends")
            if method:
                if not colour:
                    errors[f"marking_{role}_colour"] = "Give the colour of the marking."
                if not ends:
                    errors[f"marking_{role}_ends"] = "Say at which ends it is marked."
            elif colour or ends:
                errors[f"marking_{role}_method"] = (
                    "Say how it is marked (tape, heat-shrink, printed band), or clear the "
                    "marking's colour and ends."
                )
        return errors
