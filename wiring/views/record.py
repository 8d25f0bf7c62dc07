"""Wiring record pages: the record's HTML preview, and the stage sheet PDF.

`record_preview`: the record as it would print now, a draft (never the signed file:
revisions serve that), for anyone who may read the job. Drawn signatures and photos are
inlined as data: images, so this page alone allows data: in img-src.

`stage_sheet`: the first-install or retorque stage sheet as PDF (404 for another stage).
"""

from __future__ import annotations

import re

from csp.decorators import csp_update
from django.contrib.auth.decorators import login_required
from django.http import Http404, HttpRequest, HttpResponse
from django.templatetags.static import static
from django.urls import path, reverse
from django.utils import timezone
from django.views.decorators.http import require_GET

from inspections.models import Stage
from shop.views.access import _get_job_for_user
from wiring.render import record_html, stage_sheet_pdf
from wiring.render.stage_sheet import SHEET_KINDS

VIEW_PERM = "shop.view_job"


def _safe_name(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9._-]", "_", text)


@login_required
@require_GET
@csp_update({"img-src": ["data:"]})
def record_preview(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm=VIEW_PERM)
    html = record_html(
        job,
        revision=None,
        draft=True,
        verify_url="",
        issued_at=timezone.now(),
        stylesheet_url=static("css/record.css"),
        back_url=job.get_absolute_url(),
    )
    return HttpResponse(html)


@login_required
@require_GET
def stage_sheet(request: HttpRequest, number: str, kind: int) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm=VIEW_PERM)
    if kind not in SHEET_KINDS:
        raise Http404("Stage sheets are printed for the first install and the retorque.")
    stage = Stage.objects.filter(job=job, kind=kind).select_related("job__vehicle__owner").first()
    if stage is None:
        raise Http404("This job has no such stage.")
    response = HttpResponse(stage_sheet_pdf(stage), content_type="application/pdf")
    name = f"{_safe_name(job.number)}-{Stage.Kind(kind).name.lower().replace('_', '-')}-sheet.pdf"
    response["Content-Disposition"] = f'inline; filename="{name}"'
    return response


def stage_sheet_url(stage: Stage) -> str:
    """Where the stage page links its printable sheet."""
    return reverse("stage_sheet", args=[stage.job.number, stage.kind])


urlpatterns = [
    path("jobs/<str:number>/record/preview/", record_preview, name="record_preview"),
    path("jobs/<str:number>/stages/<int:kind>/sheet.pdf", stage_sheet, name="stage_sheet"),
]
