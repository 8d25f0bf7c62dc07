"""A lead waives a finding in writing, renews a waiver that has lapsed, or withdraws one.

The forms are posted from the finding itself (on the job page or the circuit editor).
With htmx the finding is swapped in place; without it the page the lead came from is
shown again, or, when the reason is missing or a confirmation is asked, a small page.

Renewing is waiving again: when the finding's waiver has lapsed, `waiver_create` keeps the
lapsed one as history and the new one covers the facts as they are now. Withdrawing asks
first (the confirmation posts `confirm`; an empty POST only asks), keeps the row with who
and when, and is logged.
"""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path, reverse
from django.utils.http import urlencode
from django.views.decorators.http import require_http_methods, require_POST
from django_htmx.http import HttpResponseClientRedirect

from circuits.forms import WaiverForm
from circuits.models import Waiver
from circuits.services import waiver_create, waiver_withdraw
from circuits.system import SystemFinding, job_system_report
from circuits.views.access import _get_job_for_user
from circuits.waiver_forms import WaiverWithdrawForm
from shop.security import security_log
from shop.views.access import safe_next


def _next_url(request: HttpRequest, job) -> str:
    # Only a path on this site; anything else ("NaN", another host) is the job page.
    return safe_next(request, job.get_absolute_url())


def _finding(job, code: str, subject: str) -> SystemFinding | None:
    """The finding as the system raises it now (with its waiver, if any)."""
    for finding in job_system_report(job).all_findings:
        if (finding.code, finding.subject) == (code, subject):
            return finding
    return None


def _finding_response(request, job, finding, next_url: str, **extra) -> HttpResponse:
    if finding is None:  # no longer raised: the item simply goes away
        return HttpResponse("")
    context = {"job": job, "f": finding, "next": next_url, "can_waive": True, **extra}
    return render(request, "circuits/_finding.html", context)


@login_required
@require_POST
def waiver_new(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_waiver")
    form = WaiverForm(request.POST)
    next_url = _next_url(request, job)
    waiver = None
    if form.is_valid():
        try:
            waiver = waiver_create(job=job, lead=request.user, **form.cleaned_data)
        except ValidationError as exc:
            # A message about the finding itself (gone, already waived) goes with the reason.
            form.add_error("reason" if not hasattr(exc, "error_dict") else None, exc)
    code, subject = request.POST.get("code", ""), request.POST.get("subject", "")
    finding = _finding(job, code, subject)
    if waiver is not None:
        if request.htmx:
            return _finding_response(request, job, finding, next_url)
        done = "renewed" if waiver.renews_id else "waived"
        messages.success(request, f"{code} on {subject} {done}.")
        return redirect(next_url)
    if request.htmx:
        return _finding_response(request, job, finding, next_url, waiver_form=form)
    context = {"job": job, "f": finding, "form": form, "next": next_url}
    return render(request, "circuits/waiver_form.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def waiver_delete(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    """Withdraw a waiver, once confirmed. (Named for the permission it needs,
    circuits.delete_waiver; nothing is deleted.)"""
    job = _get_job_for_user(request.user, number, perm="circuits.delete_waiver")
    waiver = get_object_or_404(Waiver.objects.select_related("lead"), job=job, pk=pk)
    next_url = _next_url(request, job)
    form = WaiverWithdrawForm(request.POST if request.method == "POST" else None)
    if not waiver.is_active:  # withdrawn or renewed meanwhile: nothing to ask or do
        if request.htmx:
            finding = _finding(job, waiver.code, waiver.subject)
            return _finding_response(request, job, finding, next_url)
        messages.info(request, f"That waiver of {waiver.code} is no longer in force.")
        return redirect(next_url)
    if request.method == "POST" and form.confirmed:
        try:
            waiver_withdraw(waiver=waiver, user=request.user, reason=form.cleaned_data["reason"])
        except ValidationError as exc:
            form.add_error(None, exc)
        else:
            security_log(
                "waiver_withdrawn",
                request=request,
                job=job.number,
                waiver=waiver.pk,
                code=waiver.code,
                subject=waiver.subject,
            )
            finding = _finding(job, waiver.code, waiver.subject)
            if request.htmx:
                return _finding_response(request, job, finding, next_url)
            messages.success(request, f"Waiver of {waiver.code} on {waiver.subject} withdrawn.")
            return redirect(next_url)
    # A GET, an empty POST (no confirmation) or a reason too long: ask; nothing changed.
    finding = _finding(job, waiver.code, waiver.subject)
    if request.htmx:
        if finding is not None and finding.waiver == waiver:
            return _finding_response(
                request, job, finding, next_url, withdraw_form=form, confirm_withdraw=True
            )
        # The finding went meanwhile: ask on the page of its own instead.
        url = reverse("waiver_delete", args=[job.number, waiver.pk])
        return HttpResponseClientRedirect(f"{url}?{urlencode({'next': next_url})}")
    context = {"job": job, "f": finding, "w": waiver, "withdraw_form": form, "next": next_url}
    return render(request, "circuits/waiver_withdraw.html", context)


urlpatterns = [
    path("jobs/<str:number>/waivers/new/", waiver_new, name="waiver_new"),
    path("jobs/<str:number>/waivers/<int:pk>/delete/", waiver_delete, name="waiver_delete"),
]
