"""The lead's review: the queue, one job's review page, thermal waivers and the timeline.

Who may: the queue is the leads' (inspections.approve_job). A job's review page and its
timeline are read by everyone who reads the job (technicians see why a stage was sent
back, the office answers an owner's question); only leads get its buttons, and every
action is checked again by its own view and service. Waiving a hot connection is a
lead's (inspections.waive_thermal) on a job they may write.
"""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.core.paginator import Paginator
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path, reverse
from django.views.decorators.http import require_GET, require_http_methods

from circuits.system import job_system_report
from inspections import services
from inspections.forms_signing import ReasonForm, shape_errors
from inspections.models import AuditEvent, Stage, ThermalReading
from inspections.services.queries import thermal_waivers
from inspections.services.review import (
    WORK_KINDS,
    checklist_exceptions,
    jobs_awaiting_review,
    notable_readings,
    open_findings,
    queue_rows,
    thermal_lines,
)
from inspections.services.status import latest_signoff, receipt_in_force
from inspections.views.signing import error_dict, split_errors
from shop.views.access import _get_job_for_user, job_access, require_perm, safe_next

REVIEW_PERM = "inspections.approve_job"
WAIVE_PERM = "inspections.waive_thermal"
TIMELINE_PAGE = 25


@login_required
@require_GET
def review_queue(request: HttpRequest) -> HttpResponse:
    """Jobs waiting for the lead's review, the one waiting longest first."""
    require_perm(request.user, REVIEW_PERM)
    rows = queue_rows(jobs_awaiting_review())
    return render(request, "inspections/review_queue.html", {"rows": rows})


@login_required
@require_GET
def job_review(request: HttpRequest, number: str) -> HttpResponse:
    """Everything a lead looks at before approving one job."""
    job = _get_job_for_user(request.user, number)
    access = job_access(request.user, job, request)
    stages = {s.kind: s for s in Stage.objects.filter(job=job).select_related("job")}
    system = job_system_report(job)
    is_lead = request.user.has_perm(REVIEW_PERM) and access.may_write
    stage_rows = []
    for kind, stage in sorted(stages.items()):
        signoff = services.signoff_in_force(stage) if kind in WORK_KINDS else None
        stage_rows.append(
            {
                "stage": stage,
                "signoff": signoff,
                "current": signoff is not None and services.signoff_is_current(signoff),
                "may_send_back": is_lead
                and not access.locked
                and kind != Stage.Kind.HANDOVER
                and stage.state == Stage.State.SIGNED,
                "note": services.send_back_note(stage)
                if stage.state == Stage.State.SENT_BACK
                else "",
            }
        )
    context = {
        "job": job,
        "access": access,
        "is_lead": is_lead,
        "stage_rows": stage_rows,
        "system": system,
        "findings": open_findings(system),
        "waived": [f for f in system.all_findings if f.waived],
        "readings": notable_readings(job),
        "thermal": thermal_lines(job),
        "may_waive_thermal": request.user.has_perm(WAIVE_PERM)
        and access.may_edit
        and stages.get(Stage.Kind.RETORQUE) is not None
        and stages[Stage.Kind.RETORQUE].accepts_work,
        "exceptions": [
            (stages[kind], checklist_exceptions(stages[kind]))
            for kind in WORK_KINDS
            if kind in stages
        ],
        "run": services.latest_run(job),
        "approval": latest_signoff(job, "approval") if access.locked else None,
        "receipt": receipt_in_force(job) if access.locked else None,
        "approval_blockers": services.approval_blockers(job) if not access.locked else [],
    }
    return render(request, "inspections/job_review.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def thermal_waive(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    """A lead accepts a hot connection as it is, with a written reason."""
    job = _get_job_for_user(request.user, number, perm=WAIVE_PERM, write=True)
    reading = get_object_or_404(
        ThermalReading.objects.select_related("run", "termination__circuit", "taken_by"),
        run__job=job,
        pk=pk,
    )
    errors: dict[str, list[str]] = {}
    reason = ""
    if request.method == "POST":
        form = ReasonForm(request.POST)
        reason = request.POST.get("reason", "")
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            services.thermal_waive(reading=reading, lead=request.user, reason=reason)
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            messages.success(request, f"{reading.termination}: hot connection waived.")
            return redirect(safe_next(request, reverse("job_review", args=[job.number])))
    field_errors, problems = split_errors(errors)
    result = services.thermal_results(job).get(reading.termination_id)
    context = {
        "job": job,
        "reading": reading,
        "result": result if result is not None and result.reading.pk == reading.pk else None,
        "waiver": thermal_waivers(job).get(reading.pk),
        "reason": reason,
        "errors": field_errors,
        "problems": problems,
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/thermal_waive.html", context)


@login_required
@require_GET
def job_timeline(request: HttpRequest, number: str) -> HttpResponse:
    """The job's audit trail, newest first, filterable by kind, a page at a time."""
    job = _get_job_for_user(request.user, number, perm="inspections.view_auditevent")
    events = AuditEvent.objects.filter(job=job).select_related("actor").order_by("-at", "-pk")
    wanted = request.GET.get("kind", "")
    kind = wanted if wanted in AuditEvent.Kind.values else ""
    if kind:
        events = events.filter(kind=kind)
    page = Paginator(events, TIMELINE_PAGE).get_page(request.GET.get("page"))
    context = {
        "job": job,
        "page": page,
        "kind": kind,
        "kind_label": AuditEvent.Kind(kind).label if kind else "",
        # An unknown kind (an old bookmark, a typo) is ignored, and the page says so.
        "unknown_kind": wanted if wanted and not kind else "",
        "kinds": AuditEvent.Kind.choices,
        "query": f"kind={kind}" if kind else "",
    }
    template = "inspections/timeline.html#events" if request.htmx else "inspections/timeline.html"
    return render(request, template, context)


urlpatterns = [
    path("review/", review_queue, name="review_queue"),
    path("jobs/<str:number>/review/", job_review, name="job_review"),
    path("jobs/<str:number>/thermal/<int:pk>/waive/", thermal_waive, name="thermal_waive"),
    path("jobs/<str:number>/timeline/", job_timeline, name="job_timeline"),
]
