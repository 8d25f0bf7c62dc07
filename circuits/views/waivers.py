"""A lead waives a finding in writing, or withdraws the waiver.

Both are forms posted from the finding itself (on the job page or the circuit editor).
With htmx the finding is swapped in place; without it the page the lead came from is
shown again, or, when the reason is missing, a small page with the error beside it.
"""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.utils.http import url_has_allowed_host_and_scheme
from django.views.decorators.http import require_POST

from circuits.forms import WaiverForm
from circuits.models import Waiver
from circuits.services import waiver_create, waiver_withdraw
from circuits.system import SystemFinding, job_system_report
from circuits.views.access import _get_job_for_user


def _next_url(request: HttpRequest, job) -> str:
    wanted = request.POST.get("next", "")
    if wanted and url_has_allowed_host_and_scheme(
        wanted, allowed_hosts={request.get_host()}, require_https=request.is_secure()
    ):
        return wanted
    return job.get_absolute_url()


def _finding(job, code: str, subject: str) -> SystemFinding | None:
    """The finding as the system raises it now (with its waiver, if any)."""
    for finding in job_system_report(job).all_findings:
        if (finding.code, finding.subject) == (code, subject):
            return finding
    return None


def _finding_response(request, job, finding, next_url: str, form=None) -> HttpResponse:
    if finding is None:  # no longer raised: the item simply goes away
        return HttpResponse("")
    context = {
        "job": job,
        "f": finding,
        "next": next_url,
        "can_waive": True,
        "waiver_form": form,
    }
    return render(request, "circuits/_finding.html", context)


@login_required
@require_POST
def waiver_new(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_waiver")
    form = WaiverForm(request.POST)
    next_url = _next_url(request, job)
    if form.is_valid():
        try:
            waiver_create(job=job, lead=request.user, **form.cleaned_data)
        except ValidationError as exc:
            # A message about the finding itself (gone, already waived) goes with the reason.
            form.add_error("reason" if not hasattr(exc, "error_dict") else None, exc)
    code, subject = request.POST.get("code", ""), request.POST.get("subject", "")
    finding = _finding(job, code, subject)
    if form.is_valid():
        if request.htmx:
            return _finding_response(request, job, finding, next_url)
        messages.success(request, f"{code} on {subject} waived.")
        return redirect(next_url)
    if request.htmx:
        return _finding_response(request, job, finding, next_url, form)
    context = {"job": job, "f": finding, "form": form, "next": next_url}
    return render(request, "circuits/waiver_form.html", context)


@login_required
@require_POST
def waiver_delete(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.delete_waiver")
    waiver = get_object_or_404(Waiver, job=job, pk=pk)
    code, subject = waiver.code, waiver.subject
    waiver_withdraw(waiver=waiver, user=request.user)
    next_url = _next_url(request, job)
    if request.htmx:
        return _finding_response(request, job, _finding(job, code, subject), next_url)
    messages.success(request, f"Waiver of {code} on {subject} withdrawn.")
    return redirect(next_url)


urlpatterns = [
    path("jobs/<str:number>/waivers/new/", waiver_new, name="waiver_new"),
    path("jobs/<str:number>/waivers/<int:pk>/delete/", waiver_delete, name="waiver_delete"),
]
