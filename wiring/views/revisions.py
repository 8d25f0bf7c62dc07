"""A job's issued wiring records: the list of revisions and each revision's PDF, for
staff who may read the job. The file served is the one stored when it was issued, never
a fresh render."""

from __future__ import annotations

from django.contrib.auth.decorators import login_required
from django.http import FileResponse, Http404, HttpRequest, HttpResponse
from django.shortcuts import render
from django.urls import path
from django.views.decorators.http import require_GET

from inspections.services import job_is_locked
from shop.views.access import _get_job_for_user
from wiring.models import RecordRevision


def serve_revision(revision: RecordRevision) -> FileResponse:
    """The stored PDF of `revision` as a download; 404 if the store has lost it."""
    try:
        handle = revision.file.open("rb")
    except (FileNotFoundError, OSError):
        raise Http404("The stored file of this revision is missing; tell the office.") from None
    response = FileResponse(
        handle, as_attachment=True, filename=revision.filename, content_type="application/pdf"
    )
    response["Cache-Control"] = "private, no-store"
    return response


@login_required
@require_GET
def revision_list(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number)
    revisions = list(
        RecordRevision.objects.filter(job=job).select_related("approval").order_by("-number")
    )
    approved = job_is_locked(job)
    latest = revisions[0] if revisions else None
    context = {
        "job": job,
        "revisions": revisions,
        "approved": approved,
        # An approval with no record yet: the issue failed or has not run.
        "awaiting": approved and (latest is None or latest.approval_id != _latest_approval_id(job)),
    }
    return render(request, "wiring/revisions.html", context)


def _latest_approval_id(job) -> int | None:
    from inspections.models import SignOff

    approval = (
        SignOff.objects.filter(job=job, kind=SignOff.Kind.APPROVAL)
        .order_by("-signed_at", "-pk")
        .only("pk")
        .first()
    )
    return approval.pk if approval else None


@login_required
@require_GET
def revision_download(request: HttpRequest, number: str, revision: int) -> HttpResponse:
    job = _get_job_for_user(request.user, number)
    found = RecordRevision.objects.filter(job=job, number=revision).select_related("job").first()
    if found is None:
        raise Http404(f"Job {job.number} has no record revision {revision}.")
    return serve_revision(found)


urlpatterns = [
    path("jobs/<str:number>/record/", revision_list, name="revision_list"),
    path(
        "jobs/<str:number>/record/<int:revision>.pdf", revision_download, name="revision_download"
    ),
]
