"""The return visit's pages: booking one from an approved job (lead or office), and the
lead's decision that a return visit needs no build work. The services decide
(inspections.services.return_visit); the pages show their messages beside the fields."""

from __future__ import annotations

import datetime

from django import forms
from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path
from django.utils import timezone
from django.views.decorators.http import require_http_methods

from inspections.forms_signing import ReasonForm, shape_errors
from inspections.models import Stage
from inspections.services.gates import skip_blockers
from inspections.services.return_visit import (
    BOOK_PERM,
    build_stages_skip,
    final_readings,
    return_visit_create,
)
from inspections.services.signing import REVIEW_PERM
from inspections.views.signing import error_dict
from shop.models import Job
from shop.views.access import _get_job_for_user, job_access

DEFAULT_TITLE = "Yearly re-check"
BOOK_FIELDS = ("title", "description", "booked_in_on")


def split_errors(
    errors: dict[str, list[str]], fields: tuple[str, ...] = ("reason",)
) -> tuple[dict[str, list[str]], list[str]]:
    """(messages beside a form field, every other message: listed above the form)."""
    beside = {key: errors[key] for key in fields if key in errors}
    others = [m for key, msgs in errors.items() if key not in fields for m in msgs]
    return beside, others


class BookForm(forms.Form):
    """Only the shape of the text (CharField refuses NUL); the service decides the rest."""

    title = forms.CharField(required=False, strip=False, max_length=400)
    description = forms.CharField(required=False, strip=False, max_length=8000)
    booked_in_on = forms.DateField(
        required=False,
        error_messages={"invalid": "Give the booking date as a date, e.g. 2026-03-12."},
    )


@login_required
@require_http_methods(["GET", "POST"])
def return_visit_book(request: HttpRequest, number: str) -> HttpResponse:
    """Book a return visit for the vehicle of an approved job: the same system, its last
    readings beside each end, the re-check open first."""
    job = _get_job_for_user(request.user, number, perm=BOOK_PERM)
    access = job_access(request.user, job, request)
    errors: dict[str, list[str]] = {}
    posted = request.POST if request.method == "POST" else {}
    if request.method == "POST":
        form = BookForm(request.POST)
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            data = form.cleaned_data
            visit = _book(job, request.user, data)
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            messages.success(
                request,
                f"Return visit {visit.number} booked; its re-check is open: read each"
                " connection as found before re-tightening anything.",
            )
            return redirect(visit)
    field_errors, problems = split_errors(errors, BOOK_FIELDS)
    context = {
        "job": job,
        "access": access,
        "errors": field_errors,
        "problems": problems,
        "title": posted.get("title", DEFAULT_TITLE),
        "description": posted.get("description", ""),
        "booked_in_on": posted.get("booked_in_on", timezone.localdate().isoformat()),
        "earlier": job.return_visits.order_by("-created_at"),
        "readings": len(final_readings(job)) if access.locked else 0,
    }
    return render(request, "inspections/return_visit_book.html", context)


def _book(job: Job, user, data: dict) -> Job:
    booked: datetime.date | None = data.get("booked_in_on")
    return return_visit_create(
        job=job,
        by=user,
        title=data.get("title", ""),
        description=data.get("description", ""),
        booked_in_on=booked,
    )


@login_required
@require_http_methods(["GET", "POST"])
def build_stages_not_needed(request: HttpRequest, number: str) -> HttpResponse:
    """A lead marks a return visit's build stages not needed (nothing found to put right,
    no new work), with a reason that stays in the record."""
    job = _get_job_for_user(request.user, number, perm=REVIEW_PERM, write=True)
    errors: dict[str, list[str]] = {}
    reason = ""
    if request.method == "POST":
        form = ReasonForm(request.POST)
        reason = request.POST.get("reason", "")
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            build_stages_skip(job=job, lead=request.user, reason=reason)
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            messages.success(
                request, "Build stages marked not needed; the job awaits approval on its re-check."
            )
            return redirect(job)
    field_errors, problems = split_errors(errors)
    context = {
        "job": job,
        "reason": reason,
        "errors": field_errors,
        "problems": problems,
        "blockers": [] if errors else skip_blockers(job),
        "recheck": Stage.objects.filter(job=job, kind=Stage.Kind.RECHECK).first(),
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/build_stages_not_needed.html", context)


urlpatterns = [
    path("jobs/<str:number>/return-visit/", return_visit_book, name="return_visit_book"),
    path(
        "jobs/<str:number>/build-not-needed/",
        build_stages_not_needed,
        name="build_stages_not_needed",
    ),
]
