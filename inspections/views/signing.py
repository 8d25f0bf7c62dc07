"""Signing a stage, sending it back, approval, reopen and the owner's receipt.

Every write goes through inspections.services, which check the gate and list every unmet
condition in one ValidationError; the page shows those beside the field they are about
(password, signature, note, reason, name) and the rest as the list of what still blocks,
under the signing pad. Nothing is saved when anything is refused.
"""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import Http404, HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path, reverse
from django.views.decorators.http import require_http_methods

from inspections import services
from inspections.forms_signing import NoteForm, ReasonForm, ReceiptForm, shape_errors
from inspections.models import SignOff, Stage
from inspections.services.signoffs import STAGE_SIGNOFF_KINDS
from inspections.services.status import latest_signoff, receipt_in_force
from shop.models import Job
from shop.views.access import _get_job_for_user, job_access, safe_next

SIGN_PERM = "inspections.sign_stage"
REVIEW_PERM = "inspections.approve_job"
REOPEN_PERM = "inspections.reopen_job"
# The fields a page shows its own message beside; anything else is listed as a blocker.
FIELD_KEYS = ("password", "signature", "note", "reason", "printed_name")


def error_dict(exc: ValidationError) -> dict[str, list[str]]:
    if hasattr(exc, "error_dict"):
        return exc.message_dict
    return {"__all__": exc.messages}


def split_errors(errors: dict[str, list[str]]) -> tuple[dict[str, list[str]], list[str]]:
    """(messages per form field, every other message: what blocks the signature)."""
    fields = {key: errors[key] for key in FIELD_KEYS if key in errors}
    others = [m for key, msgs in errors.items() if key not in FIELD_KEYS for m in msgs]
    return fields, others


def _job_stage(user, number: str, kind: int, *, perm: str) -> tuple[Job, Stage]:
    """The job (the user may write it) and its stage of `kind`; 404 for an unknown kind or
    a job without stages."""
    job = _get_job_for_user(user, number, perm=perm, write=True)
    if kind not in Stage.Kind.values:
        raise Http404("No such stage.")
    stage = services.stage_for(job, kind)
    if stage is None:
        raise Http404("This job has no stages yet.")
    return job, stage


def _done(request: HttpRequest, job: Job, text: str) -> HttpResponse:
    messages.success(request, text)
    return redirect(safe_next(request, job.get_absolute_url()))


@login_required
@require_http_methods(["GET", "POST"])
def stage_sign(request: HttpRequest, number: str, kind: int) -> HttpResponse:
    """A technician (or lead) signs the first install or the retorque: their own
    password, a drawn signature, and the stage's gate."""
    job, stage = _job_stage(request.user, number, kind, perm=SIGN_PERM)
    if kind == Stage.Kind.HEAT_CYCLE and request.method == "GET":
        # Logging the run is what signs this stage (inspections.services.heat).
        messages.info(request, "The heat-cycle run stage is signed by logging its run.")
        return redirect("heat_cycle_log", number=job.number)
    errors: dict[str, list[str]] = {}
    if request.method == "POST":
        try:
            services.stage_sign(
                stage=stage,
                user=request.user,
                password=request.POST.get("password", ""),
                signature_png=request.POST.get("signature", ""),
            )
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            return _done(request, job, f"{stage.get_kind_display()} signed.")
        stage.refresh_from_db()
    field_errors, blockers = split_errors(errors)
    signable = kind in STAGE_SIGNOFF_KINDS
    if not errors and signable:
        blockers = services.stage_blockers(stage)
    context = {
        "job": job,
        "stage": stage,
        "signable": signable,
        "meaning": SignOff.MEANINGS[STAGE_SIGNOFF_KINDS[kind]] if signable else "",
        "blockers": blockers,
        "errors": field_errors,
        "refused": bool(errors),
        "note": services.send_back_note(stage) if stage.state == Stage.State.SENT_BACK else "",
        "signoff": services.signoff_in_force(stage) if signable else None,
        "progress": services.torque_progress(stage) if signable else None,
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/sign.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def stage_send_back(request: HttpRequest, number: str, kind: int) -> HttpResponse:
    """A lead sends a signed stage back for more work, with a note the technicians read."""
    job, stage = _job_stage(request.user, number, kind, perm=REVIEW_PERM)
    errors: dict[str, list[str]] = {}
    note = ""
    if request.method == "POST":
        form = NoteForm(request.POST)
        note = request.POST.get("note", "")
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            services.stage_send_back(stage=stage, lead=request.user, note=note)
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            return _done(
                request, job, f"{stage.get_kind_display()} sent back; the technicians see why."
            )
    field_errors, problems = split_errors(errors)
    context = {
        "job": job,
        "stage": stage,
        "note": note,
        "errors": field_errors,
        "problems": problems,
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/send_back.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def job_approve(request: HttpRequest, number: str) -> HttpResponse:
    """The lead reviews and approves the job for handover (locks it)."""
    job = _get_job_for_user(request.user, number, perm=REVIEW_PERM, write=True)
    errors: dict[str, list[str]] = {}
    if request.method == "POST":
        try:
            services.job_approve(
                job=job,
                lead=request.user,
                password=request.POST.get("password", ""),
                signature_png=request.POST.get("signature", ""),
            )
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            # On to the record's page, which renders and signs the record for this
            # approval with its progress shown (wiring.views.revisions.record_issue_now).
            messages.success(request, f"Job {job.number} approved for handover; it is locked.")
            return redirect(reverse("revision_list", args=[job.number]))
    field_errors, blockers = split_errors(errors)
    access = job_access(request.user, job, request)
    if not errors and not access.locked:
        blockers = services.approval_blockers(job)
    context = {
        "job": job,
        "meaning": SignOff.MEANINGS[SignOff.Kind.APPROVAL],
        "blockers": blockers,
        "errors": field_errors,
        "refused": bool(errors),
        "access": access,
        "approval": latest_signoff(job, SignOff.Kind.APPROVAL) if access.locked else None,
    }
    return render(request, "inspections/approve.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def job_reopen(request: HttpRequest, number: str) -> HttpResponse:
    """A lead unlocks an approved job, with a reason that stays in the record."""
    job = _get_job_for_user(request.user, number, perm=REOPEN_PERM, write=True)
    errors: dict[str, list[str]] = {}
    reason = ""
    if request.method == "POST":
        form = ReasonForm(request.POST)
        reason = request.POST.get("reason", "")
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            services.job_reopen(job=job, lead=request.user, reason=reason)
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            return _done(request, job, f"Job {job.number} reopened; the reason is in the record.")
    field_errors, problems = split_errors(errors)
    context = {
        "job": job,
        "reason": reason,
        "errors": field_errors,
        "problems": problems,
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/reopen.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def handover_receipt(request: HttpRequest, number: str) -> HttpResponse:
    """At handover the owner, who has no account, types their name and signs on the
    staff member's tablet; only after the lead's approval. Closes the job."""
    job = _get_job_for_user(request.user, number, write=True)
    errors: dict[str, list[str]] = {}
    printed_name = ""
    if request.method == "POST":
        form = ReceiptForm(request.POST)
        printed_name = request.POST.get("printed_name", "")
        try:
            if not form.is_valid():
                raise ValidationError(shape_errors(form))
            signoff = services.handover_receive(
                job=job,
                printed_name=printed_name,
                signature_png=request.POST.get("signature", ""),
                by=request.user,
            )
        except ValidationError as exc:
            errors = error_dict(exc)
        else:
            return _done(
                request, job, f"Received by {signoff.printed_name}: job {job.number} handed over."
            )
    field_errors, problems = split_errors(errors)
    access = job_access(request.user, job, request)
    context = {
        "job": job,
        "printed_name": printed_name,
        "meaning": SignOff.MEANINGS[SignOff.Kind.RECEIPT],
        "errors": field_errors,
        "problems": problems,
        "refused": bool(errors),
        "access": access,
        "approval": latest_signoff(job, SignOff.Kind.APPROVAL) if access.locked else None,
        "receipt": receipt_in_force(job) if access.locked else None,
    }
    return render(request, "inspections/receipt.html", context)


urlpatterns = [
    path("jobs/<str:number>/stages/<int:kind>/sign/", stage_sign, name="stage_sign"),
    path("jobs/<str:number>/stages/<int:kind>/send-back/", stage_send_back, name="stage_send_back"),
    path("jobs/<str:number>/approve/", job_approve, name="job_approve"),
    path("jobs/<str:number>/reopen/", job_reopen, name="job_reopen"),
    path("jobs/<str:number>/receipt/", handover_receipt, name="handover_receipt"),
]
