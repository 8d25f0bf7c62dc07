"""A wrench's calibration history: everyone who reads the wrenches reads it (a
technician checks a wrench before picking it up); whoever may change wrenches
(`inspections.change_torquewrench`: the office) records a calibration, which moves the
wrench's due date (inspections.services.calibration)."""

from __future__ import annotations

import datetime

from django import forms
from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.utils import timezone
from django.views.decorators.http import require_http_methods

from inspections.forms_checks import merge_errors
from inspections.models import TorqueWrench
from inspections.services.calibration import (
    AS_FOUND_LIMIT_PCT,
    calibration_history,
    wrench_calibration_record,
)
from shop.views.access import require_perm

WRENCH_VIEW = "inspections.view_torquewrench"
WRENCH_CHANGE = "inspections.change_torquewrench"
_DATE = {"invalid": "Give the date as the picker offers it, e.g. 2026-03-31."}


def _date_field(label: str, help_text: str) -> forms.DateField:
    return forms.DateField(
        label=label,
        required=False,
        widget=forms.DateInput(attrs={"type": "date"}, format="%Y-%m-%d"),
        help_text=help_text,
        error_messages=_DATE,
    )


class CalibrationForm(forms.Form):
    calibrated_on = _date_field("Calibrated on", "The date on the certificate.")
    due_on = _date_field("Next due", "Readings with the wrench are refused after this date.")
    done_by = forms.CharField(
        label="Calibrated by", required=False, strip=False, help_text="Laboratory or person."
    )
    certificate = forms.CharField(label="Certificate number", required=False, strip=False)
    as_found_error_pct = forms.CharField(
        label="As-found error (%)",
        required=False,
        max_length=12,
        widget=forms.TextInput(attrs={"inputmode": "decimal"}),
        help_text="Deviation before any adjustment, e.g. -2.5; leave empty when not stated.",
    )
    adjusted = forms.BooleanField(
        label="Adjusted", required=False, help_text="Tick when the laboratory adjusted it."
    )
    notes = forms.CharField(required=False, strip=False, widget=forms.Textarea(attrs={"rows": 2}))


@login_required
@require_http_methods(["GET", "POST"])
def wrench_calibrations(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, WRENCH_CHANGE if request.method == "POST" else WRENCH_VIEW)
    wrench = get_object_or_404(TorqueWrench, pk=pk)
    today = timezone.localdate()
    form = CalibrationForm(
        request.POST if request.method == "POST" else None,
        # The usual case: calibrated today, due again in a year (common practice).
        initial={"calibrated_on": today, "due_on": today + datetime.timedelta(days=365)},
    )
    if request.method == "POST" and form.is_valid():
        try:
            calibration = wrench_calibration_record(
                wrench=wrench, by=request.user, **form.cleaned_data
            )
        except ValidationError as exc:
            errors = exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}
            merge_errors(form, errors)
        else:
            wrench.refresh_from_db()
            moved = wrench.calibration_due == calibration.due_on
            messages.success(
                request,
                f"Calibration of {wrench.code} on {calibration.calibrated_on:%d %b %Y} recorded"
                + (
                    f"; due again {wrench.calibration_due:%d %b %Y}."
                    if moved
                    else "; a later calibration sets the due date, which stays as it was."
                ),
            )
            return redirect("wrench_calibrations", pk=wrench.pk)
    days = (wrench.calibration_due - today).days
    context = {
        "wrench": wrench,
        "rows": calibration_history(wrench),
        "form": form,
        "limit": AS_FOUND_LIMIT_PCT,
        "days": days,
        "overdue_days": -days,
    }
    return render(request, "inspections/calibration.html", context)


urlpatterns = [
    path("wrenches/<int:pk>/calibrations/", wrench_calibrations, name="wrench_calibrations"),
]
