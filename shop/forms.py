"""Forms for the shop's records; model validation (VIN, year, dates) runs through them.

Every record choice reads its id strictly (shop.fields): a tampered id such as 10**308 or
"²" is "Select a valid choice", never a database error."""

from __future__ import annotations

from django import forms
from django.contrib.auth import get_user_model

from shop import roles
from shop.fields import IdChoiceField, IdMultipleChoiceField
from shop.identifiers import normalise
from shop.models import Job, Owner, Vehicle


class OwnerForm(forms.ModelForm):
    class Meta:
        model = Owner
        fields = ["name", "email", "phone", "address", "notes"]
        widgets = {
            "address": forms.Textarea(attrs={"rows": 3}),
            "notes": forms.Textarea(attrs={"rows": 3}),
        }


class VehicleForm(forms.ModelForm):
    class Meta:
        model = Vehicle
        fields = [
            "owner",
            "kind",
            "make",
            "model",
            "year",
            "identification",
            "dc_voltage",
            "ac_system",
            "near_salt_water",
            "notes",
        ]
        widgets = {"notes": forms.Textarea(attrs={"rows": 3})}
        field_classes = {"owner": IdChoiceField}
        error_messages = {
            "dc_voltage": {
                "invalid_choice": (
                    "Nominal DC voltage must be 12, 24 or 48 V; %(value)s V is not one."
                )
            },
            "ac_system": {"invalid_choice": "AC system must be none, 120 V 60 Hz or 230 V 50 Hz."},
        }

    def clean_identification(self) -> str:
        value = normalise(self.cleaned_data.get("identification", ""))
        if value:
            clash = Vehicle.objects.filter(identification=value).exclude(pk=self.instance.pk)
            if clash.exists():
                other = clash.select_related("owner").first()
                raise forms.ValidationError(
                    "Another vehicle already has this identification "
                    f"({other}, owner {other.owner})."
                )
        return value


def _staff_in(role: str):
    return (
        get_user_model()
        .objects.filter(is_active=True, groups__name=role)
        .order_by("first_name", "username")
        .distinct()
    )


class StaffChoiceField(IdChoiceField):
    def label_from_instance(self, obj) -> str:
        return obj.get_full_name() or obj.username


class StaffMultipleChoiceField(IdMultipleChoiceField):
    def label_from_instance(self, obj) -> str:
        return obj.get_full_name() or obj.username


class JobForm(forms.ModelForm):
    lead = StaffChoiceField(queryset=None, required=False)
    technicians = StaffMultipleChoiceField(
        queryset=None, required=False, widget=forms.CheckboxSelectMultiple
    )

    class Meta:
        model = Job
        fields = [
            "vehicle",
            "title",
            "description",
            "lead",
            "technicians",
            "booked_in_on",
            "target_handover_on",
        ]
        widgets = {
            "description": forms.Textarea(attrs={"rows": 4}),
            "booked_in_on": forms.DateInput(attrs={"type": "date"}),
            "target_handover_on": forms.DateInput(attrs={"type": "date"}),
        }
        field_classes = {"vehicle": IdChoiceField}

    def __init__(self, *args, **kwargs) -> None:
        super().__init__(*args, **kwargs)
        self.fields["lead"].queryset = _staff_in(roles.LEAD)
        self.fields["technicians"].queryset = _staff_in(roles.TECHNICIAN)
        self.fields["vehicle"].queryset = Vehicle.objects.select_related("owner")
        self.fields["vehicle"].label_from_instance = lambda v: f"{v} ({v.owner})"


class JobSearchForm(forms.Form):
    q = forms.CharField(
        label="Search",
        required=False,
        widget=forms.TextInput(
            attrs={"type": "search", "placeholder": "Job number, owner, vehicle or VIN"}
        ),
    )
    status = forms.ChoiceField(
        label="Status", required=False, choices=[("", "Any status"), *Job.Status.choices]
    )
