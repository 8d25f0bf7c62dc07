"""The shape of what the heat-cycle, checklist and office pages take; the services decide
everything else (ranges, gates, who may). Numbers stay text here so the services' one
strict parser reads them (NaN, inf, 1e309, "1,5" are refused there with their own
words); dates and times are read by Django's fields in the shop's time zone."""

from __future__ import annotations

from django import forms

from circuits.models import TorqueUnit
from inspections.models import Stage

LOCAL_MINUTE = "%Y-%m-%dT%H:%M"


class LocalDateTimeInput(forms.DateTimeInput):
    """The tablet's own date-and-time picker; the value is the shop's local time."""

    input_type = "datetime-local"

    def __init__(self, attrs=None):
        super().__init__(attrs=attrs, format=LOCAL_MINUTE)


def _number(label: str, *, help_text: str = "") -> forms.CharField:
    return forms.CharField(
        label=label,
        required=False,
        strip=True,
        max_length=40,
        help_text=help_text,
        widget=forms.TextInput(attrs={"inputmode": "decimal", "autocomplete": "off"}),
    )


class HeatCycleForm(forms.Form):
    start = forms.DateTimeField(
        label="Run started",
        required=False,
        input_formats=[LOCAL_MINUTE, "%Y-%m-%dT%H:%M:%S", "%Y-%m-%d %H:%M"],
        widget=LocalDateTimeInput(),
    )
    end = forms.DateTimeField(
        label="Run ended",
        required=False,
        input_formats=[LOCAL_MINUTE, "%Y-%m-%dT%H:%M:%S", "%Y-%m-%d %H:%M"],
        widget=LocalDateTimeInput(),
    )
    peak_current_a = _number("Peak current (A)", help_text="The highest current seen, e.g. 150.")
    ambient_c = _number(
        "Ambient temperature (°C)", help_text="The air around the system during the run."
    )
    notes = forms.CharField(
        required=False, strip=False, widget=forms.Textarea(attrs={"rows": 3}), max_length=4000
    )

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        for name in ("start", "end"):
            self.fields[name].error_messages["invalid"] = (
                "Give the date and time as the picker offers it, e.g. 2025-06-01 14:30."
            )


class WrenchForm(forms.Form):
    code = forms.CharField(
        label="Shop id", required=False, strip=False, help_text="As marked on the wrench."
    )
    description = forms.CharField(required=False, strip=False)
    range_min = _number("Range from")
    range_max = _number("Range to")
    unit = forms.ChoiceField(choices=TorqueUnit.choices, required=False)
    calibration_due = forms.DateField(
        label="Calibration due",
        required=False,
        widget=forms.DateInput(attrs={"type": "date"}, format="%Y-%m-%d"),
        help_text="Readings with this wrench are refused after this date.",
        error_messages={"invalid": "Give the date as the picker offers it, e.g. 2026-03-31."},
    )
    in_service = forms.BooleanField(
        required=False, help_text="Untick when the wrench is lost, broken or retired."
    )
    notes = forms.CharField(required=False, strip=False, widget=forms.Textarea(attrs={"rows": 3}))

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["unit"].error_messages["invalid_choice"] = (
            "Choose the unit the wrench scale reads in."
        )


class ShopChecklistItemForm(forms.Form):
    stage_kind = forms.TypedChoiceField(
        label="Stage", choices=Stage.Kind.choices, coerce=int, required=False, empty_value=None
    )
    text = forms.CharField(label="What is checked", required=False, strip=False)
    order = forms.CharField(
        label="Position",
        required=False,
        max_length=12,
        help_text="Lower numbers come first; leave empty to add at the end.",
        widget=forms.TextInput(attrs={"inputmode": "numeric"}),
    )
    active = forms.BooleanField(
        label="In use", required=False, help_text="Untick to retire the item (marks keep it)."
    )

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self.fields["stage_kind"].error_messages["invalid_choice"] = (
            "Choose the stage the item belongs to."
        )


def shape_errors(form: forms.Form) -> dict[str, list[str]]:
    return {field: list(messages) for field, messages in form.errors.items()}


def merge_errors(form: forms.Form, errors: dict[str, list[str]]) -> None:
    """Put the service's messages beside the fields; a field the form already refused
    keeps the form's own message (it says what was wrong with what was typed)."""
    for field, messages in errors.items():
        target = field if field in form.fields else None
        if target is not None and target in form.errors:
            continue
        for message in messages:
            form.add_error(target, message)
