"""The job's one-line diagram as a standalone SVG file."""

from __future__ import annotations

import re

from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.urls import path
from django.views.decorators.http import require_GET

from circuits.diagram import job_diagram_svg
from circuits.system import job_system_report
from circuits.views.access import _get_job_for_user


@login_required
@require_GET
def job_diagram(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.view_circuit")
    # Absolute links, so the file still opens the records once saved elsewhere.
    svg = job_diagram_svg(
        job_system_report(job),
        link=lambda obj: request.build_absolute_uri(obj.get_absolute_url()),
        title=f"{job.number} · {job.title} · one-line diagram",
    )
    response = HttpResponse(
        '<?xml version="1.0" encoding="UTF-8"?>\n' + svg, content_type="image/svg+xml"
    )
    name = re.sub(r"[^A-Za-z0-9._-]", "_", job.number)
    response["Content-Disposition"] = f'inline; filename="{name}-one-line.svg"'
    return response


urlpatterns = [
    path("jobs/<str:number>/diagram.svg", job_diagram, name="job_diagram_svg"),
]
