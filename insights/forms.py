"""The insight pages' forms: the period (GET) and a new shop rule (POST, written
through insights.services)."""

from __future__ import annotations

import datetime

from django import forms
from django.utils import timezone

from circuits.models import Device, Mounting, StudSize, TerminationKind
from insights.queries import Period
from insights.services import RULE_STAGES
from inspections.models import Stage

LONGEST = datetime.timedelta(days=3660)  # ten years and a little: more is a typo
EARLIEST = datetime.date(2000, 1, 1)


def default_period(today: datetime.date | None = None) -> Period:
    """The last 12 months, today included."""
    today = today or timezone.localdate()
    try:
        start = today.replace(year=today.year - 1) + datetime.timedelta(days=1)
    except ValueError:  # 29 February
        start = today.replace(year=today.year - 1, day=28) + datetime.timedelta(days=1)
    return Period(start, today)


class DateInput(forms.DateInput):
    input_type = "date"


class PeriodForm(forms.Form):
    start = forms.DateField(
        label="From",
        required=False,
        widget=DateInput(format="%Y-%m-%d"),
        error_messages={"invalid": "Give the first day as a date, e.g. 2025-01-31."},
    )
    end = forms.DateField(
        label="To",
        required=False,
        widget=DateInput(format="%Y-%m-%d"),
        error_messages={"invalid": "Give the last day as a date, e.g. 2025-12-31."},
    )

    def __init__(self, data=None, **kwargs) -> None:
        self.default = default_period()
        # Only the two fields: a page's own parameters (format, by) are not the form's.
        given = {k: data[k] for k in ("start", "end") if data is not None and k in data}
        super().__init__(given or None, **kwargs)
        if not self.is_bound:
            self.initial = {"start": self.default.start, "end": self.default.end}

    def clean(self):
        data = super().clean()
        start = data.get("start") or self.default.start
        end = data.get("end") or self.default.end
        if self.errors:
            return data
        if start < EARLIEST:
            self.add_error("start", f"Start on or after {EARLIEST:%d %b %Y}.")
        elif start > end:
            self.add_error("end", "The last day comes before the first; swap them.")
        elif end - start > LONGEST:
            self.add_error("start", "Choose a period of at most ten years.")
        data["period"] = Period(start, end)
        return data

    @property
    def period(self) -> Period | None:
        """The chosen period (the default when nothing is given); None when the input
        is wrong (the errors say why)."""
        if not self.is_bound:
            return self.default
        return self.cleaned_data["period"] if self.is_valid() else None

    def query(self) -> str:
        period = self.period
        return "" if period is None else f"start={period.start:%Y-%m-%d}&end={period.end:%Y-%m-%d}"


def _blank(choices) -> list[tuple[str, str]]:
    return [("", "Any"), *choices]


class ShopRuleForm(forms.Form):
    stage_kind = forms.TypedChoiceField(
        label="Checked at",
        coerce=int,
        choices=[(k.value, k.label) for k in RULE_STAGES],
        initial=Stage.Kind.RETORQUE,
    )
    device_kind = forms.ChoiceField(
        label="Device kind", choices=_blank(Device.Kind.choices), required=False
    )
    mounting = forms.ChoiceField(
        label="Device mounted on", choices=_blank(Mounting.choices), required=False
    )
    termination_kind = forms.ChoiceField(
        label="Termination kind", choices=_blank(TerminationKind.choices), required=False
    )
    stud_size = forms.ChoiceField(
        label="Stud size", choices=_blank(StudSize.choices), required=False
    )
    text = forms.CharField(
        label="Checklist item",
        max_length=160,
        help_text="What the technician checks, e.g. 'set-screws get a second retorque'.",
    )
    made_from = forms.CharField(
        label="Made from",
        max_length=300,
        required=False,
        help_text="The finding it comes from; filled in from the loosening page.",
    )
