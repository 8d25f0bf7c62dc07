"""Forms for terminations, the shop's default torque specs, and waivers."""

from __future__ import annotations

from django import forms
from django.core.exceptions import ValidationError

from circuits.form_fields import strict_field
from circuits.forms.common import as_typed, check_torque
from circuits.models import Termination, TorqueDefault
from circuits.services import MIN_WAIVER_REASON


class TerminationForm(forms.ModelForm):
    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        as_typed(self, ("torque_value", "torque_tolerance_pct"))
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
        check_torque(self, "torque_value", "torque_unit")
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
        as_typed(self, ("value", "tolerance_pct"))
        strict_field(self, "value", kind="number", field="torque_number")
        strict_field(self, "tolerance_pct", kind="percent", field="tolerance")

    def clean(self) -> dict:
        data = super().clean()
        check_torque(self, "value", "unit")
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
