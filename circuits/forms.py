"""Forms of the electrical-system pages: circuits, devices and their terminals,
terminations, the shop's default torque specs, and waivers.

Lengths are typed with their unit ("10 ft", "3 m", "120 in") and every number is read by
the one strict parser (circuits.sizing.quantity, through circuits.entry) with the ranges
of its LIMITS table; a bad entry is a ValidationError beside the field, never a 500.
Record choices read their ids strictly (shop.fields). Model rules (Circuit.clean, the
unique constraints) still run through the ModelForm's validation.
"""

from __future__ import annotations

from decimal import Decimal

from django import forms
from django.core.exceptions import ValidationError

from circuits.entry import check_entry, number_entry, parse_length_entry
from circuits.form_fields import strict_field
from circuits.models import (
    Circuit,
    Device,
    Terminal,
    Termination,
    TorqueDefault,
    format_length,
)
from circuits.services import MIN_WAIVER_REASON
from circuits.sizing import SizeNotationError, parse_size
from shop.fields import IdChoiceField, parse_id

# Nominal AC voltage of each vehicle AC system, for AC circuits left blank.
AC_VOLTS = {"120_60": Decimal("120"), "230_50": Decimal("230")}
_AC_ROLES = (Circuit.Role.SHORE_SUPPLY, Circuit.Role.AC_BRANCH)


def _check_torque(form: forms.ModelForm, value_name: str, unit_name: str) -> None:
    """A torque typed as a bare number in the unit chosen beside it, within
    LIMITS["torque"] once converted to N·m."""
    value, unit = form.cleaned_data.get(value_name), form.cleaned_data.get(unit_name)
    if value is None or not unit:
        return
    try:
        number_entry(value, unit, kind="torque", field="torque")
    except ValidationError as exc:
        form.add_error(value_name, exc)


class _TerminalChoiceField(IdChoiceField):
    """Terminal choices: 'B+ (DC positive)', prefixed with the device when the list
    spans several devices."""

    def __init__(self, *args, with_device: bool = True, **kwargs):
        self.with_device = with_device
        super().__init__(*args, **kwargs)

    def label_from_instance(self, obj: Terminal) -> str:
        label = f"{obj.name} ({obj.get_polarity_display()})"
        return f"{obj.device.name}: {label}" if self.with_device else label


class CircuitForm(forms.ModelForm):
    length = forms.CharField(
        label="One-way length",
        max_length=40,
        help_text='With its unit: "10 ft", "3 m", "120 in". A bare number is taken in the '
        "unit chosen beside it.",
        widget=forms.TextInput(attrs={"inputmode": "decimal", "autocomplete": "off"}),
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
            "protection_type",
            "protection_a",
            "protection_distance",
            "colour_a",
            "colour_b",
            "colour_earth",
            "splice",
            "colour_after_splice",
            "tape_remarked",
            "service_loop_confirmed",
            "notes",
        ]
        labels = {
            "length_unit": "Unit",
            "nominal_voltage": "Nominal voltage (V)",
            "conductor_size": "Conductor size",
            "insulation_c": "Insulation rating",
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
        field_classes = {"from_device": IdChoiceField, "to_device": IdChoiceField}

    def __init__(self, *args, job, for_save: bool = True, **kwargs):
        super().__init__(*args, **kwargs)
        self.job = job
        self.for_save = for_save
        self.instance.job = job
        devices = Device.objects.filter(job=job).order_by("name")
        self.fields["from_device"].queryset = devices
        self.fields["to_device"].queryset = devices
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
        _as_typed(self, ("design_current_a", "nominal_voltage", "protection_a"))
        if self.instance.pk and not self.is_bound:
            unit = self.instance.length_unit
            self.initial["length"] = format_length(self.instance.length_m, unit)
            self.initial["protection_distance"] = format_length(
                self.instance.protection_distance_m, unit
            )

    def _terminal_field(self, side: str) -> _TerminalChoiceField:
        old = self.fields[f"{side}_terminal"]
        device_id = self._chosen(f"{side}_device")
        terminals = Terminal.objects.filter(device__job=self.job).select_related("device")
        if device_id:
            terminals = terminals.filter(device_id=device_id)
        return _TerminalChoiceField(
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
        if role in _AC_ROLES:
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

    def _check_voltage(self, data: dict) -> None:
        """The range of the circuit's kind (LIMITS["dc_voltage"] or ["ac_voltage"])."""
        field = "ac_voltage" if data.get("role") in _AC_ROLES else "dc_voltage"
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
        for name in ("length", "protection_distance"):
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


class DeviceForm(forms.ModelForm):
    class Meta:
        model = Device
        fields = [
            "name",
            "kind",
            "is_source",
            "mounting",
            "enclosure",
            "location",
            "input_current_a",
            "notes",
        ]
        widgets = {
            "notes": forms.Textarea(attrs={"rows": 3}),
            "input_current_a": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
        }

    def __init__(self, *args, job, **kwargs):
        super().__init__(*args, **kwargs)
        self.job = job
        self.instance.job = job
        strict_field(self, "input_current_a", kind="current", field="input_current")

    def clean_name(self) -> str:
        name = self.cleaned_data["name"].strip()
        clash = Device.objects.filter(job=self.job, name__iexact=name).exclude(pk=self.instance.pk)
        if clash.exists():
            raise ValidationError(f"This job already has a device named {name}.")
        return name


def _as_typed(form: forms.ModelForm, names: tuple[str, ...]) -> None:
    """Show a saved record's decimals as a person types them ("9", not "9.00")."""
    if form.instance.pk and not form.is_bound:
        for name in names:
            value = getattr(form.instance, name)
            if value is not None:
                form.initial[name] = format(Decimal(value).normalize(), "f")


class TerminalForm(forms.ModelForm):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        _as_typed(self, ("manual_torque_value",))
        strict_field(self, "manual_torque_value", kind="number", field="torque_number")

    def clean(self) -> dict:
        data = super().clean()
        _check_torque(self, "manual_torque_value", "manual_torque_unit")
        return data

    class Meta:
        model = Terminal
        fields = ["name", "polarity", "stud_size", "manual_torque_value", "manual_torque_unit"]
        labels = {
            "manual_torque_value": "Torque",
            "manual_torque_unit": "Unit",
            "stud_size": "Stud / screw",
        }
        help_texts = {"name": ""}  # said once above the rows instead
        widgets = {
            "manual_torque_value": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
        }


TerminalFormSet = forms.inlineformset_factory(
    Device, Terminal, form=TerminalForm, extra=2, can_delete=True
)


class TerminationForm(forms.ModelForm):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        _as_typed(self, ("torque_value", "torque_tolerance_pct"))
        strict_field(self, "torque_value", kind="number", field="torque_number")
        strict_field(self, "torque_tolerance_pct", kind="percent", field="tolerance")

    class Meta:
        model = Termination
        fields = [
            "kind",
            "stud_size",
            "torque_value",
            "torque_unit",
            "torque_tolerance_pct",
            "torque_source",
            "torque_source_note",
        ]
        labels = {
            "torque_value": "Torque",
            "torque_unit": "Unit",
            "torque_tolerance_pct": "Tolerance (± %)",
            "torque_source": "Where the value comes from",
            "torque_source_note": "Source note",
        }
        help_texts = {
            "torque_value": "Blank: take the device manual's value or the shop default.",
        }
        widgets = {
            "torque_value": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "torque_tolerance_pct": forms.NumberInput(
                attrs={"step": "any", "inputmode": "decimal"}
            ),
        }

    def clean(self) -> dict:
        data = super().clean()
        _check_torque(self, "torque_value", "torque_unit")
        value, source = data.get("torque_value"), data.get("torque_source")
        if value is not None and source == Termination.SpecSource.NONE:
            self.add_error(
                "torque_source", "Say where this torque value comes from before saving it."
            )
        return data

    @property
    def refill(self) -> bool:
        """A blank torque asks for the manual's value or the shop default."""
        return self.cleaned_data.get("torque_value") is None


class TorqueDefaultForm(forms.ModelForm):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        _as_typed(self, ("value", "tolerance_pct"))
        strict_field(self, "value", kind="number", field="torque_number")
        strict_field(self, "tolerance_pct", kind="percent", field="tolerance")

    def clean(self) -> dict:
        data = super().clean()
        _check_torque(self, "value", "unit")
        return data

    class Meta:
        model = TorqueDefault
        fields = ["stud_size", "kind", "value", "unit", "tolerance_pct", "source"]
        labels = {"value": "Torque", "tolerance_pct": "Tolerance (± %)"}
        widgets = {
            "value": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "tolerance_pct": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
        }


class WaiverForm(forms.Form):
    code = forms.CharField(max_length=60, widget=forms.HiddenInput)
    subject = forms.CharField(max_length=120, widget=forms.HiddenInput)
    reason = forms.CharField(
        label="Reason",
        widget=forms.Textarea(attrs={"rows": 3}),
        help_text=f"At least {MIN_WAIVER_REASON} characters; shown with your name and the time.",
        error_messages={"required": "Write why this finding is accepted."},
    )

    def clean_reason(self) -> str:
        reason = self.cleaned_data["reason"].strip()
        if len(reason) < MIN_WAIVER_REASON:
            raise ValidationError(
                f"Explain the waiver in at least {MIN_WAIVER_REASON} characters "
                f"({len(reason)} so far)."
            )
        return reason


__all__ = [
    "CircuitForm",
    "DeviceForm",
    "TerminalFormSet",
    "TerminationForm",
    "TorqueDefaultForm",
    "WaiverForm",
    "format_length",
]
