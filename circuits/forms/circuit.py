"""The circuit form: what a run is, its ends, load, conductor, protection (one home:
a protection device at one end of the run, or the circuit's own in-line fuse or breaker,
never both), colours and re-marking.

Lengths are typed with their unit ("10 ft", "3 m", "120 in") and every number is read by
the one strict parser (circuits.sizing.quantity, through circuits.entry) with the ranges
of its LIMITS table; a bad entry is a ValidationError beside the field, never a 500.
Record choices read their ids strictly (shop.fields). Model rules (Circuit.clean, the
constraints) still run through the ModelForm's validation.
"""

from __future__ import annotations

from decimal import Decimal

from django import forms
from django.core.exceptions import ValidationError

from circuits.entry import check_entry, parse_length_entry
from circuits.form_fields import strict_field
from circuits.forms.common import AC_ROLES, AC_VOLTS, TerminalChoiceField, as_typed
from circuits.models import Circuit, Device, Terminal, format_length
from circuits.sizing import SizeNotationError, parse_size
from shop.fields import IdChoiceField, parse_id

NONE, INLINE, DEVICE = "none", "inline", "device"
PROTECTION_HOMES = [
    (DEVICE, "A protection device at one end of this run (fuse or breaker holder, or the "
     "external supply's breaker)"),
    (INLINE, "Its own in-line fuse or breaker (a holder with no terminals of its own)"),
    (NONE, "No protection"),
]  # fmt: skip
MARKING_FIELDS = [
    f"marking_{role}_{part}"
    for role in ("a", "b", "earth")
    for part in ("method", "colour", "ends")
]


class _ProtectionDeviceField(IdChoiceField):
    def label_from_instance(self, obj: Device) -> str:
        return f"{obj.name} ({obj.protection_display})"


class CircuitForm(forms.ModelForm):
    length = forms.CharField(
        label="One-way length",
        max_length=40,
        help_text='With its unit: "10 ft", "3 m", "120 in". A bare number is taken in the '
        "unit chosen beside it.",
        widget=forms.TextInput(attrs={"inputmode": "decimal", "autocomplete": "off"}),
    )
    protection_home = forms.ChoiceField(
        label="Where the protection is",
        choices=PROTECTION_HOMES,
        required=False,
        widget=forms.RadioSelect,
        help_text="One home for the protection: a device's fuse or breaker, or the circuit's "
        "own; never both.",
    )
    protection_distance = forms.CharField(
        label="Protection distance from source",
        max_length=40,
        required=False,
        help_text='Along the conductor, with its unit ("7 in", "0.2 m"); blank if not known.',
        widget=forms.TextInput(attrs={"inputmode": "decimal", "autocomplete": "off"}),
    )

    class Meta:
        model = Circuit
        fields = [
            "tag",
            "name",
            "role",
            "conductors",
            "from_device",
            "from_terminal",
            "to_device",
            "to_terminal",
            "nominal_voltage",
            "design_current_a",
            "continuous",
            "critical",
            "length",
            "length_unit",
            "conductor_size",
            "parallel",
            "construction",
            "tinned",
            "insulation_c",
            "engine_space",
            "bundled",
            "protection_home",
            "protection_device",
            "protection_type",
            "protection_a",
            "protection_distance",
            "colour_a",
            *MARKING_FIELDS[0:3],
            "colour_b",
            *MARKING_FIELDS[3:6],
            "colour_earth",
            *MARKING_FIELDS[6:9],
            "splice",
            "colour_after_splice",
            "service_loop_confirmed",
            "notes",
        ]
        labels = {
            "length_unit": "Unit",
            "nominal_voltage": "Nominal voltage (V)",
            "conductor_size": "Conductor size",
            "insulation_c": "Insulation rating",
            "protection_type": "In-line: fuse or breaker",
            "protection_a": "In-line: rating (A)",
            "colour_a": "Insulation: positive / line",
            "colour_b": "Insulation: negative / neutral",
            "colour_earth": "Insulation: earth",
            "marking_a_method": "Re-marked with",
            "marking_a_colour": "Marking colour",
            "marking_a_ends": "Marked at",
            "marking_b_method": "Re-marked with",
            "marking_b_colour": "Marking colour",
            "marking_b_ends": "Marked at",
            "marking_earth_method": "Re-marked with",
            "marking_earth_colour": "Marking colour",
            "marking_earth_ends": "Marked at",
        }
        help_texts = {
            "conductor_size": "Trade notation: 4/0, 2 AWG, #6, 35 mm². Blank: recommend one.",
            "length_unit": "For a bare number.",
        }
        widgets = {
            "notes": forms.Textarea(attrs={"rows": 3}),
            "design_current_a": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "nominal_voltage": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "protection_a": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "conductor_size": forms.TextInput(attrs={"autocomplete": "off"}),
        }
        field_classes = {
            "from_device": IdChoiceField,
            "to_device": IdChoiceField,
            "protection_device": _ProtectionDeviceField,
        }

    def __init__(self, *args, job, for_save: bool = True, **kwargs):
        super().__init__(*args, **kwargs)
        self.job = job
        self.for_save = for_save
        self.instance.job = job
        devices = Device.objects.filter(job=job).order_by("name")
        self.fields["from_device"].queryset = devices
        self.fields["to_device"].queryset = devices
        protecting = devices.filter(kind__in=Device.PROTECTING_KINDS)
        field = self.fields["protection_device"]
        field.queryset = protecting
        field.required = False
        field.label = "Protection device"
        field.help_text = (
            "The fuse or breaker holder, or external supply, this run starts or ends at."
        )
        field.error_messages["invalid_choice"] = (
            "Choose a fuse or breaker holder or an external supply of this job."
        )
        # The in-line protection is fuse or breaker; "none" is a choice of the home above.
        self.fields["protection_type"].choices = [("", "---------")] + [
            c for c in Circuit.ProtectionType.choices if c[0] != Circuit.ProtectionType.NONE
        ]
        if not self.is_bound and self.instance.protection_type == Circuit.ProtectionType.NONE:
            self.initial["protection_type"] = ""  # nothing in-line: the select shows so
        self.fields["protection_type"].required = False
        if not self.is_bound:
            self.initial["protection_home"] = self._saved_home()
        for side in ("from", "to"):
            self.fields[f"{side}_terminal"] = self._terminal_field(side)
        # A blank conductor size asks the live panel for a recommendation; saving still
        # needs one (checked in clean() when the form is for saving).
        self.fields["conductor_size"].required = False
        self.fields["nominal_voltage"].required = False
        # Every number through the strict parser, with its field's range (LIMITS).
        strict_field(
            self, "design_current_a", kind="current", field="current", what="design current"
        )
        strict_field(
            self, "nominal_voltage", kind="voltage", field="voltage", what="nominal voltage"
        )
        strict_field(self, "protection_a", kind="current", field="protection")
        strict_field(self, "parallel", kind="number", field="parallel")
        strict_field(self, "bundled", kind="number", field="bundled")
        volts = self.default_voltage(Circuit.Role.DC_BRANCH)
        ac = AC_VOLTS.get(job.vehicle.ac_system)
        hint = f"Blank: {volts:g} V for DC" + (f", {ac:g} V for AC." if ac else ".")
        self.fields["nominal_voltage"].help_text = hint
        self.fields["nominal_voltage"].widget.attrs["placeholder"] = f"{volts:g}"
        as_typed(self, ("design_current_a", "nominal_voltage", "protection_a"))
        if self.instance.pk and not self.is_bound:
            unit = self.instance.length_unit
            self.initial["length"] = format_length(self.instance.length_m, unit)
            self.initial["protection_distance"] = format_length(
                self.instance.protection_distance_m, unit
            )

    def _saved_home(self) -> str:
        instance = self.instance
        if instance.protection_device_id:
            return DEVICE
        if instance.pk and instance.protection_type == Circuit.ProtectionType.NONE:
            return NONE
        return INLINE

    def _terminal_field(self, side: str) -> TerminalChoiceField:
        old = self.fields[f"{side}_terminal"]
        device_id = self._chosen(f"{side}_device")
        terminals = Terminal.objects.filter(device__job=self.job).select_related("device")
        if device_id:
            terminals = terminals.filter(device_id=device_id)
        return TerminalChoiceField(
            queryset=terminals.order_by("device__name", "name"),
            required=False,
            with_device=not device_id,
            label=old.label,
            help_text="Optional; limited to the chosen device's terminals.",
            error_messages={
                "invalid_choice": f"Choose a terminal of the {side} device.",
            },
        )

    def _chosen(self, name: str) -> str | None:
        """The device picked for an end: in the submitted data, else the saved one."""
        if self.is_bound:
            value = self.data.get(self.add_prefix(name))
        else:
            value = getattr(self.instance, f"{name}_id", None) or self.initial.get(name)
        # ASCII digits within 64 bits only: "²" or 10**308 is no device, not a 500.
        device_id = parse_id(value if isinstance(value, int) else str(value or ""))
        return str(device_id) if device_id else None

    def default_voltage(self, role: str | None) -> Decimal | None:
        """Nominal voltage for a blank entry: the vehicle's DC system, or its AC system for
        AC circuits (None when the vehicle has no AC)."""
        vehicle = self.job.vehicle
        if role in AC_ROLES:
            return AC_VOLTS.get(vehicle.ac_system)
        return Decimal(vehicle.dc_voltage)

    def clean_tag(self) -> str:
        tag = self.cleaned_data["tag"].strip()
        clash = Circuit.objects.filter(job=self.job, tag__iexact=tag).exclude(pk=self.instance.pk)
        if clash.exists():
            raise ValidationError(f"This job already has a circuit tagged {tag}.")
        return tag

    def clean_conductor_size(self) -> str:
        text = self.cleaned_data["conductor_size"].strip()
        if not text and self.for_save:
            raise ValidationError(
                "Enter the conductor size to save; the panel beside the form recommends one."
            )
        if text:
            try:
                parse_size(text)
            except SizeNotationError as exc:
                raise ValidationError(str(exc)) from exc
        return text

    def clean(self) -> dict:
        data = super().clean()
        unit = data.get("length_unit") or Circuit.LengthUnit.M
        if "length" in data:
            self._clean_length(data, unit)
        self._clean_protection_distance(data, unit)
        self._clean_protection_home(data)
        if data.get("nominal_voltage") is not None:
            self._check_voltage(data)
        elif "nominal_voltage" not in self.errors:
            volts = self.default_voltage(data.get("role"))
            if volts is None:
                self.add_error(
                    "nominal_voltage",
                    "This vehicle has no AC system recorded; give the circuit's voltage.",
                )
            else:
                data["nominal_voltage"] = volts
        return data

    def _clean_protection_home(self, data: dict) -> None:
        """One home for the protection: the chosen home's fields, and nothing in the other's.
        A post without the choice (a script, an older page) is read from what it fills."""
        home = data.get("protection_home") or ""
        device = data.get("protection_device")
        own_type = data.get("protection_type") or ""
        if not home:
            if device is not None:
                home = DEVICE
            elif own_type in ("", Circuit.ProtectionType.NONE):
                home = NONE if "protection_type" in self.data or self.instance.pk else INLINE
            else:
                home = INLINE
        data["protection_home"] = home
        rating, distance = data.get("protection_a"), data.get("protection_distance_m")
        if home == DEVICE:
            if device is None and "protection_device" not in self.errors:
                self.add_error("protection_device", "Choose the protection device.")
            if rating is not None:
                self.add_error(
                    "protection_a",
                    "The rating is read from the protection device; clear this, or choose "
                    "in-line protection.",
                )
            if distance is not None:
                self.add_error(
                    "protection_distance",
                    "A protection device's position follows from its end of the run; clear "
                    "this, or choose in-line protection.",
                )
            own_type = Circuit.ProtectionType.NONE
            # The errors above stand; the model sees one home only.
            data["protection_a"] = data["protection_distance_m"] = None
            self.instance.protection_a = self.instance.protection_distance_m = None
        elif device is not None:
            self.add_error(
                "protection_device",
                "Choose 'a protection device' above to use it, or clear it.",
            )
        if home == INLINE:
            if own_type in ("", Circuit.ProtectionType.NONE):
                self.add_error("protection_type", "Choose fuse or breaker for in-line protection.")
        elif home == NONE:
            if rating is not None:
                self.add_error("protection_a", "Choose in-line protection to give a rating.")
            own_type = Circuit.ProtectionType.NONE
        data["protection_type"] = own_type
        self.instance.protection_type = own_type
        if home != DEVICE:
            data["protection_device"] = None

    def _check_voltage(self, data: dict) -> None:
        """The range of the circuit's kind (LIMITS["dc_voltage"] or ["ac_voltage"])."""
        field = "ac_voltage" if data.get("role") in AC_ROLES else "dc_voltage"
        volts = data["nominal_voltage"]
        try:
            check_entry(float(volts), field=field, what="nominal voltage", shown=f"{volts} V")
        except ValidationError as exc:
            self.add_error("nominal_voltage", exc)

    def _clean_length(self, data: dict, unit: str) -> None:
        try:
            metres, shown = parse_length_entry(data["length"], unit, what="one-way length")
        except ValidationError as exc:
            self.add_error("length", exc)
            return
        data["length_m"], data["length_unit"] = metres, shown
        self.instance.length_m = metres

    def _clean_protection_distance(self, data: dict, unit: str) -> None:
        text = (data.get("protection_distance") or "").strip()
        if not text:
            data["protection_distance_m"] = None
        else:
            try:
                data["protection_distance_m"], _ = parse_length_entry(
                    text, unit, allow_zero=True, what="protection distance"
                )
            except ValidationError as exc:
                self.add_error("protection_distance", exc)
                return
        self.instance.protection_distance_m = data["protection_distance_m"]

    def circuit_fields(self) -> dict:
        """The model fields to save, for circuits.services.circuit_create/update."""
        data = dict(self.cleaned_data)
        for name in ("length", "protection_distance", "protection_home"):
            data.pop(name, None)
        return data

    def sizing_needed(self) -> list[tuple[str, str]]:
        """(label, why) for each field the sizing engine needs that is missing or wrong."""
        needed = []
        for name in ("design_current_a", "length", "nominal_voltage", "conductor_size"):
            field = self[name]
            if name == "conductor_size" and not (field.value() or "").strip():
                continue  # blank: the engine recommends a size
            if name in self.errors:
                needed.append((field.label, " ".join(self.errors[name])))
            elif name != "conductor_size" and self.cleaned_data.get(name) in (None, ""):
                needed.append((field.label, "Required for sizing."))
        for name in ("parallel", "insulation_c", "bundled"):
            if name in self.errors:
                needed.append((self[name].label, " ".join(self.errors[name])))
        return needed

    def sizing_draft(self) -> Circuit | None:
        """An unsaved circuit carrying what the sizing engine reads, built from the bound
        data even when unrelated fields are still wrong; None when sizing cannot run."""
        if not self.is_bound or self.sizing_needed():
            return None
        data = self.cleaned_data
        protection = data.get("protection_a")
        if data.get("protection_type") == Circuit.ProtectionType.NONE:
            protection = None
        device = data.get("protection_device")
        if isinstance(device, Device) and data.get("protection_home") == DEVICE:
            protection = device.protection_a  # the sizing reads the one home's rating
        return Circuit(
            job=self.job,
            tag=data.get("tag") or self.instance.tag,
            role=data.get("role") or Circuit.Role.DC_BRANCH,
            nominal_voltage=data["nominal_voltage"],
            design_current_a=data["design_current_a"],
            length_m=data["length_m"],
            length_unit=data["length_unit"],
            conductor_size=data.get("conductor_size") or "",
            parallel=data.get("parallel") or 1,
            insulation_c=data.get("insulation_c") or 105,
            engine_space=bool(data.get("engine_space")),
            bundled=data.get("bundled") or 1,
            critical=bool(data.get("critical")),
            continuous=bool(data.get("continuous")),
            tinned=bool(data.get("tinned")),
            protection_a=protection,
        )
