"""A job's issued wiring records: the list of revisions and each revision's PDF, for
staff who may read the job. The file served is the one stored when it was issued, never
a fresh render."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import FileResponse, Http404, HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path, reverse
from django.views.decorators.http import require_GET, require_POST

from inspections.services import job_is_locked
from shop.views.access import _get_job_for_user
from wiring.models import RecordRevision
from wiring.services import record_issue

# Issuing the record belongs to the approval: whoever may approve may (re)start it.
ISSUE_PERM = "inspections.approve_job"


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


def _context(request: HttpRequest, job, *, error: str = "") -> dict:
    revisions = list(
        RecordRevision.objects.filter(job=job).select_related("approval").order_by("-number")
    )
    approved = job_is_locked(job)
    latest = revisions[0] if revisions else None
    return {
        "job": job,
        "revisions": revisions,
        "approved": approved,
        # An approval with no record yet: just approved, or the issue failed.
        "awaiting": approved and (latest is None or latest.approval_id != _latest_approval_id(job)),
        "may_issue": request.user.has_perm(ISSUE_PERM),
        "error": error,
    }


@login_required
@require_GET
def revision_list(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number)
    return render(request, "wiring/revisions.html", _context(request, job))


@login_required
@require_POST
def record_issue_now(request: HttpRequest, number: str) -> HttpResponse:
    """Render, sign and store the record of the job's latest approval. Idempotent: the
    record of an approval is issued once (wiring.services.record_issue), so a repeated
    post, or two leads at once, return the same revision. The page posts here as soon as
    it opens after an approval (htmx, with its progress shown); without JavaScript the
    lead presses the button."""
    job = _get_job_for_user(request.user, number, perm=ISSUE_PERM, write=True)
    error = ""
    try:
        revision = record_issue(job=job, by=request.user, base_url=request.build_absolute_uri("/"))
    except ValidationError as exc:
        error = " ".join(exc.messages)
    if request.htmx:
        return render(
            request, "wiring/revisions.html#revisions", _context(request, job, error=error)
        )
    if error:
        messages.error(request, error)
    else:
        messages.success(request, f"Revision {revision.number} of the record is signed and stored.")
    return redirect(reverse("revision_list", args=[job.number]))


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
    path("jobs/<str:number>/record/issue/", record_issue_now, name="record_issue_now"),
    path(
        "jobs/<str:number>/record/<int:revision>.pdf", revision_download, name="revision_download"
    ),
]
