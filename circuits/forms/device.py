"""The device form with its terminals inline, and how a view hands them to
circuits.services.device_save as plain values (`device_save_values`)."""

from __future__ import annotations

from django import forms
from django.core.exceptions import ValidationError

from circuits.form_fields import strict_field
from circuits.forms.common import as_typed, check_torque
from circuits.models import Device, Mounting, Terminal

TERMINAL_FIELDS = ("name", "polarity", "stud_size", "manual_torque_value", "manual_torque_unit")


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
            "protection_type",
            "protection_a",
            "supply_voltage",
            "notes",
        ]
        help_texts = {
            "protection_type": "Fuse or breaker holder, or external supply: what it holds.",
        }
        widgets = {
            "notes": forms.Textarea(attrs={"rows": 3}),
            "input_current_a": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "protection_a": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
            "supply_voltage": forms.NumberInput(attrs={"step": "any", "inputmode": "decimal"}),
        }

    def __init__(self, *args, job, **kwargs):
        super().__init__(*args, **kwargs)
        self.job = job
        self.instance.job = job
        strict_field(self, "input_current_a", kind="current", field="input_current")
        strict_field(self, "protection_a", kind="current", field="protection")
        strict_field(self, "supply_voltage", kind="voltage", field="ac_voltage", what="voltage")
        as_typed(self, ("input_current_a", "protection_a", "supply_voltage"))

    def clean_name(self) -> str:
        name = self.cleaned_data["name"].strip()
        clash = Device.objects.filter(job=self.job, name__iexact=name).exclude(pk=self.instance.pk)
        if clash.exists():
            raise ValidationError(f"This job already has a device named {name}.")
        return name

    def clean(self) -> dict:
        data = super().clean()
        if data.get("kind") == Device.Kind.EXTERNAL_SUPPLY:
            # An external supply is always a source standing off the vehicle: the form
            # fills both rather than asking for the only possible answers.
            data["is_source"] = True
            data["mounting"] = Mounting.OFF_VEHICLE
        return data


class TerminalForm(forms.ModelForm):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        as_typed(self, ("manual_torque_value",))
        strict_field(self, "manual_torque_value", kind="number", field="torque_number")

    def clean(self) -> dict:
        data = super().clean()
        check_torque(self, "manual_torque_value", "manual_torque_unit")
        return data

    class Meta:
        model = Terminal
        fields = list(TERMINAL_FIELDS)
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


def device_save_values(form: DeviceForm, terminals) -> dict:
    """A valid device form and its terminal formset unpacked into the plain keyword values
    of circuits.services.device_save: the job, the device being edited (None for a new
    one), its fields, the terminal rows to keep or add (each a dict, with "id" for an
    existing terminal) and the ids of the terminals to remove. Untouched empty rows are
    left out."""
    fields = {name: form.cleaned_data[name] for name in form.Meta.fields}
    rows: list[dict] = []
    removed: list[int] = []
    for row in terminals.forms:
        existing = row.instance.pk
        if terminals.can_delete and row.cleaned_data.get("DELETE"):
            if existing:
                removed.append(existing)
            continue
        if not existing and not row.has_changed():
            continue
        values = {name: row.cleaned_data.get(name) for name in TERMINAL_FIELDS}
        if existing:
            values["id"] = existing
        rows.append(values)
    return {
        "job": form.job,
        "device": form.instance if form.instance.pk else None,
        "fields": fields,
        "terminals": rows,
        "remove_terminals": removed,
    }
