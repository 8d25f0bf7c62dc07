"""The office's "Re-checks due" page: vehicles due within a window (30 days unless
chosen) or overdue, with owner, vehicle, the approved job the date counts from, the due
date in words and whether the owner was reminded. Leads and office
(`reminders.view_rechecks`); technicians are refused (403). A CSV of what is shown."""

from __future__ import annotations

from django import forms
from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.shortcuts import render
from django.urls import path
from django.utils import timezone
from django.views.decorators.http import require_GET

from insights.views.common import csv_response
from reminders.queries import DEFAULT_WINDOW_DAYS, Recheck, due_within, rechecks
from shop.models import ShopProfile
from shop.views.access import require_perm

VIEW_PERM = "reminders.view_rechecks"
WINDOWS = [
    ("30", "due within 30 days or overdue"),
    ("60", "due within 60 days or overdue"),
    ("90", "due within 90 days or overdue"),
    ("180", "due within 6 months or overdue"),
    ("overdue", "overdue only"),
    ("all", "every approved vehicle"),
]


class RecheckFilterForm(forms.Form):
    window = forms.ChoiceField(
        label="Show", choices=WINDOWS, required=False, initial=str(DEFAULT_WINDOW_DAYS)
    )
    reminded = forms.ChoiceField(
        label="Reminder",
        choices=[("", "sent or not"), ("no", "not reminded yet"), ("yes", "reminded")],
        required=False,
    )
    q = forms.CharField(
        label="Owner, vehicle or job",
        required=False,
        max_length=100,
        widget=forms.TextInput(attrs={"type": "search", "placeholder": "Owner, vehicle or job"}),
    )


def _matches(entry: Recheck, text: str) -> bool:
    vehicle = entry.vehicle
    haystack = " ".join(
        [
            entry.job.number,
            vehicle.owner.name,
            vehicle.owner.email,
            str(vehicle),
            vehicle.identification,
            vehicle.get_kind_display(),
        ]
    ).casefold()
    return all(word in haystack for word in text.casefold().split())


def _filtered(form: RecheckFilterForm, today) -> tuple[list[Recheck], str]:
    data = form.cleaned_data if form.is_valid() else {}
    window = data.get("window") or str(DEFAULT_WINDOW_DAYS)
    entries = rechecks()
    if window == "overdue":
        entries = [e for e in entries if e.days_left(today) < 0]
    elif window != "all":
        entries = due_within(entries, days=int(window), today=today)
    if data.get("reminded") == "yes":
        entries = [e for e in entries if e.reminded is not None]
    elif data.get("reminded") == "no":
        entries = [e for e in entries if e.reminded is None]
    if data.get("q"):
        entries = [e for e in entries if _matches(e, data["q"])]
    return entries, window


def _csv(entries: list[Recheck], today) -> HttpResponse:
    header = [
        "job",
        "owner",
        "owner e-mail",
        "owner phone",
        "vehicle",
        "approved on",
        "months",
        "found loose",
        "due on",
        "due",
        "reminded on",
        "reminded at address",
        "in the shop",
    ]
    rows = [
        [
            e.job.number,
            e.vehicle.owner.name,
            e.vehicle.owner.email,
            e.vehicle.owner.phone,
            str(e.vehicle),
            e.approved_on.isoformat(),
            e.months,
            e.found_loose,
            e.due_on.isoformat(),
            e.words(today),
            timezone.localtime(e.reminded.sent_at).date().isoformat() if e.reminded else "",
            e.reminded.sent_to if e.reminded else "",
            e.in_shop.number if e.in_shop else "",
        ]
        for e in entries
    ]
    return csv_response(f"rechecks-due-{today.isoformat()}.csv", header, rows)


@login_required
@require_GET
def rechecks_due(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, VIEW_PERM)
    today = timezone.localdate()
    form = RecheckFilterForm(request.GET or None)
    entries, window = _filtered(form, today)
    if request.GET.get("format") == "csv":
        return _csv(entries, today)
    query = request.GET.copy()
    query.pop("format", None)
    query["format"] = "csv"
    profile = ShopProfile.load()
    context = {
        "form": form if request.GET else RecheckFilterForm(),
        "rows": [(e, e.words(today), e.days_left(today)) for e in entries],
        "overdue": sum(1 for e in entries if e.days_left(today) < 0),
        "window": window,
        "profile": profile,
        "csv_query": query.urlencode(),
    }
    template = "reminders/rechecks_due.html#results" if request.htmx else None
    return render(request, template or "reminders/rechecks_due.html", context)


urlpatterns = [path("rechecks/", rechecks_due, name="rechecks_due")]
