"""The shop's own records: its profile, owners, vehicles and jobs."""

from __future__ import annotations

import datetime

from django.conf import settings
from django.core.exceptions import ValidationError
from django.core.validators import MaxValueValidator, MinValueValidator, RegexValidator
from django.db import models
from django.db.models import Q
from django.urls import reverse
from django.utils import timezone

from shop.identifiers import IdentificationError, validate_hin, validate_vin

FIRST_MODEL_YEAR = 1950


class ShopProfile(models.Model):
    """The one shop this server belongs to (a single row, pk=1)."""

    name = models.CharField(max_length=120, default="Our shop")
    address = models.TextField(blank=True)
    phone = models.CharField(max_length=40, blank=True)
    email = models.EmailField(blank=True)
    logo = models.ImageField(upload_to="shop/", blank=True)
    job_prefix = models.CharField(
        max_length=6,
        default="JOB",
        validators=[RegexValidator(r"^[A-Z]{2,6}$", "Use 2 to 6 capital letters.")],
        help_text="Start of every job number, e.g. JOB-2026-0001.",
    )
    soak_minutes = models.PositiveIntegerField(
        default=120,
        validators=[MaxValueValidator(7 * 24 * 60)],
        help_text="Minimum time between the end of the heat-cycle run and the retorque stage.",
    )
    default_torque_tolerance_pct = models.DecimalField(
        max_digits=4,
        decimal_places=1,
        default=10,
        validators=[MinValueValidator(1), MaxValueValidator(30)],
        help_text="Tolerance (±%) applied to torque specs that do not state their own.",
    )

    class PaperSize(models.TextChoices):
        A4 = "A4", "A4 (210 × 297 mm)"
        LETTER = "letter", "Letter (8.5 × 11 in)"

    paper_size = models.CharField(
        max_length=6,
        choices=PaperSize.choices,
        default=PaperSize.A4,
        help_text="Paper of the printed wiring record and stage sheets.",
    )
    recheck_months = models.PositiveSmallIntegerField(
        "re-check after (months)",
        default=12,
        validators=[MinValueValidator(1), MaxValueValidator(60)],
        help_text="When an approved vehicle is due back for its re-check.",
    )
    recheck_months_after_loose = models.PositiveSmallIntegerField(
        "re-check after found-loose connections (months)",
        default=6,
        validators=[MinValueValidator(1), MaxValueValidator(60)],
        help_text="Sooner due date when the record had connections found loose at retorque.",
    )

    class Meta:
        verbose_name = "shop profile"
        # Shop-wide abilities that are no one model's add/change/delete; the role table
        # (shop/roles.py) hands them out. They hang on the profile because it is the shop.
        permissions = [
            (
                "manage_staff",
                "Can add staff, change their role, deactivate them and send password links",
            ),
            ("work_on_any_job", "Can write to any job, not only the jobs they are assigned to"),
            ("import_circuit_updates", "Can update existing circuits by CSV import"),
        ]

    def __str__(self) -> str:
        return self.name

    def get_absolute_url(self) -> str:
        return reverse("admin:shop_shopprofile_change", args=[self.pk])

    @classmethod
    def load(cls) -> ShopProfile:
        profile, _ = cls.objects.get_or_create(pk=1)
        return profile


class Owner(models.Model):
    name = models.CharField(max_length=120)
    email = models.EmailField(blank=True)
    phone = models.CharField(max_length=40, blank=True)
    address = models.TextField("postal address", blank=True)
    notes = models.TextField(blank=True)
    created_at = models.DateTimeField(auto_now_add=True)

    class Meta:
        ordering = ["name"]

    def __str__(self) -> str:
        return self.name

    def get_absolute_url(self) -> str:
        return reverse("owner_detail", args=[self.pk])


class Vehicle(models.Model):
    class Kind(models.TextChoices):
        VAN = "van", "Van"
        MOTORHOME = "motorhome", "Motorhome"
        TRAILER = "trailer", "Trailer"
        BUS = "bus", "Bus"
        TRUCK_CAMPER = "truck_camper", "Truck camper"
        BOAT = "boat", "Boat"

    class DCVoltage(models.IntegerChoices):
        V12 = 12, "12 V"
        V24 = 24, "24 V"
        V48 = 48, "48 V"

    class ACSystem(models.TextChoices):
        NONE = "none", "No AC"
        AC120 = "120_60", "120 V 60 Hz"
        AC230 = "230_50", "230 V 50 Hz"

    owner = models.ForeignKey(Owner, on_delete=models.PROTECT, related_name="vehicles")
    kind = models.CharField(max_length=20, choices=Kind.choices)
    make = models.CharField(max_length=60, blank=True)
    model = models.CharField(max_length=60, blank=True)
    year = models.PositiveSmallIntegerField(null=True, blank=True)
    identification = models.CharField(
        max_length=20,
        blank=True,
        help_text="17-character VIN, or the 12-character hull number for a boat.",
    )
    dc_voltage = models.PositiveSmallIntegerField(
        "nominal DC voltage", choices=DCVoltage.choices, default=DCVoltage.V12
    )
    ac_system = models.CharField(
        "AC system", max_length=10, choices=ACSystem.choices, default=ACSystem.NONE
    )
    near_salt_water = models.BooleanField(
        default=False, help_text="Kept on or near salt water (tinned conductors expected)."
    )
    notes = models.TextField(blank=True)
    created_at = models.DateTimeField(auto_now_add=True)

    class Meta:
        ordering = ["owner__name", "make", "model"]
        constraints = [
            models.UniqueConstraint(
                fields=["identification"],
                condition=~Q(identification=""),
                name="vehicle_identification_unique",
                violation_error_message="Another vehicle already has this identification.",
            ),
            models.CheckConstraint(
                condition=Q(dc_voltage__in=[12, 24, 48]),
                name="vehicle_dc_voltage_known",
                violation_error_message="Nominal DC voltage must be 12, 24 or 48 V.",
            ),
        ]

    def __str__(self) -> str:
        label = " ".join(str(p) for p in (self.year, self.make, self.model) if p)
        return label or self.get_kind_display()

    def get_absolute_url(self) -> str:
        return reverse("vehicle_detail", args=[self.pk])

    @property
    def is_boat(self) -> bool:
        return self.kind == self.Kind.BOAT

    @property
    def identification_label(self) -> str:
        return "Hull number" if self.is_boat else "VIN"

    def clean(self) -> None:
        errors: dict[str, str] = {}
        if self.year is not None:
            latest = timezone.now().year + 1
            if not FIRST_MODEL_YEAR <= self.year <= latest:
                errors["year"] = f"Year must be between {FIRST_MODEL_YEAR} and {latest}."
        if self.identification:
            try:
                check = validate_hin if self.is_boat else validate_vin
                self.identification = check(self.identification)
            except IdentificationError as exc:
                errors["identification"] = str(exc)
        if errors:
            raise ValidationError(errors)


class JobSequence(models.Model):
    """Last number handed out per prefix and year; numbers are never reused, even after a
    job is deleted, because the counter only moves forward."""

    prefix = models.CharField(max_length=6)
    year = models.PositiveSmallIntegerField()
    last = models.PositiveIntegerField(default=0)

    class Meta:
        constraints = [
            models.UniqueConstraint(fields=["prefix", "year"], name="job_sequence_unique")
        ]

    def __str__(self) -> str:
        return f"{self.prefix}-{self.year}: {self.last}"


class JobQuerySet(models.QuerySet):
    def search(self, text: str) -> JobQuerySet:
        text = (text or "").strip()
        if not text:
            return self
        return self.filter(
            Q(number__icontains=text)
            | Q(title__icontains=text)
            | Q(vehicle__owner__name__icontains=text)
            | Q(vehicle__make__icontains=text)
            | Q(vehicle__model__icontains=text)
            | Q(vehicle__identification__icontains=text.replace(" ", "").upper())
        )

    def with_status(self, status: str) -> JobQuerySet:
        return self.filter(status=status) if status else self

    def for_list(self) -> JobQuerySet:
        return self.select_related("vehicle__owner", "lead").order_by("-created_at", "-pk")


class Job(models.Model):
    class Status(models.TextChoices):
        BOOKED = "booked", "Booked in"
        RECHECK = "recheck", "Re-check"
        INSTALL = "install", "First install"
        HEAT_CYCLE = "heat_cycle", "Heat-cycle run"
        RETORQUE = "retorque", "Retorque"
        HANDOVER = "handover", "Awaiting approval"
        APPROVED = "approved", "Approved"
        HANDED_OVER = "handed_over", "Handed over"

    class Kind(models.TextChoices):
        BUILD = "build", "Build or rework"
        RETURN_VISIT = "return_visit", "Return visit"

    number = models.CharField(max_length=24, unique=True, editable=False)
    vehicle = models.ForeignKey(Vehicle, on_delete=models.PROTECT, related_name="jobs")
    title = models.CharField(max_length=160)
    kind = models.CharField(max_length=20, choices=Kind.choices, default=Kind.BUILD)
    # A return visit re-checks the system of an earlier approved job of this shop (or of
    # a record read from another shop's PDF, when this is empty).
    follows = models.ForeignKey(
        "self",
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="return_visits",
        help_text="The approved job whose record this return visit starts from.",
    )
    description = models.TextField(blank=True)
    lead = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="led_jobs",
    )
    technicians = models.ManyToManyField(
        settings.AUTH_USER_MODEL, blank=True, related_name="assigned_jobs"
    )
    booked_in_on = models.DateField(default=datetime.date.today)
    target_handover_on = models.DateField(null=True, blank=True)
    handed_over_on = models.DateField(null=True, blank=True)
    # Set by the stage services of later issues; plain field so the list can filter on it.
    status = models.CharField(max_length=20, choices=Status.choices, default=Status.BOOKED)
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    updated_at = models.DateTimeField(auto_now=True)

    objects = JobQuerySet.as_manager()

    class Meta:
        ordering = ["-created_at", "-pk"]

    def __str__(self) -> str:
        return f"{self.number} {self.title}"

    def get_absolute_url(self) -> str:
        return reverse("job_detail", args=[self.number])

    def clean(self) -> None:
        if (
            self.target_handover_on
            and self.booked_in_on
            and self.target_handover_on < self.booked_in_on
        ):
            raise ValidationError(
                {"target_handover_on": "Target handover cannot be before the booking date."}
            )
