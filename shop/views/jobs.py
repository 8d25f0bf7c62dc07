"""Job list, job page, job create and edit.

The job page leads with the stage the work is at (shop.views.jobs_panel): its progress,
one button to carry on, the sign-offs and a summary of the system's findings. The full
schedule, diagram and device list are pages of their own (circuits/views)."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.core.paginator import Paginator
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.views.decorators.http import require_GET, require_http_methods

from circuits.system import job_system_report
from shop.forms import JobForm, JobSearchForm
from shop.models import Job
from shop.services import job_create, job_update
from shop.views.access import _get_job_for_user, job_access, require_perm
from shop.views.jobs_panel import findings_summary, signoff_rows, stage_panel

PAGE_SIZE = 20


@login_required
@require_GET
def job_list(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "shop.view_job")
    form = JobSearchForm(request.GET)
    jobs = Job.objects.for_list()
    if form.is_valid():
        jobs = jobs.search(form.cleaned_data["q"]).with_status(form.cleaned_data["status"])
    page = Paginator(jobs, PAGE_SIZE).get_page(request.GET.get("page"))
    query = request.GET.copy()
    query.pop("page", None)
    context = {"form": form, "page": page, "query": query.urlencode()}
    template = "shop/job_list.html#results" if request.htmx else "shop/job_list.html"
    return render(request, template, context)


@login_required
@require_GET
def job_detail(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number)
    access = job_access(request.user, job, request)
    system = job_system_report(job)
    context = {
        "job": job,
        "access": access,
        "panel": stage_panel(job, request.user, access),
        "signoffs": signoff_rows(job),
        "summary": findings_summary(system),
        "system": system,
    }
    return render(request, "shop/job_detail.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def job_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "shop.add_job")
    initial = {"vehicle": request.GET.get("vehicle")} if request.GET.get("vehicle") else None
    form = JobForm(request.POST or None, initial=initial)
    if request.method == "POST" and form.is_valid():
        data = dict(form.cleaned_data)
        job = job_create(technicians=data.pop("technicians"), **data)
        messages.success(request, f"Job {job.number} created.")
        return redirect(job)
    return render(
        request, "shop/form.html", {"form": form, "title": "New job", "cancel_url": "/jobs/"}
    )


@login_required
@require_http_methods(["GET", "POST"])
def job_edit(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="shop.change_job", write=True)
    form = JobForm(request.POST or None, instance=job)
    if request.method == "POST" and form.is_valid():
        data = dict(form.cleaned_data)
        try:
            job_update(job=job, technicians=data.pop("technicians"), **data)
        except ValidationError as exc:  # approved, so locked: said above the form
            form.add_error(None, exc)
        else:
            messages.success(request, f"Job {job.number} saved.")
            return redirect(job)
    context = {
        "form": form,
        "title": f"Edit job {job.number}",
        "cancel_url": job.get_absolute_url(),
    }
    return render(request, "shop/form.html", context)
