"""Handover: the lead's approval (which locks the job), a reopen with a reason (which
unlocks it), and the owner's receipt (which closes it).

* `job_approve`: lead only, with their own password and drawn signature, once the first
  install and retorque are signed and what they cover is unchanged, and no blocking
  finding is open. The handover stage is signed: the job is locked, and every
  inspections write refuses until a lead reopens it.
* `job_reopen`: lead only, with a reason (in the trail, and later in the record). The
  handover stage becomes "reopened" (awaiting approval again); the signed stages stay
  signed: the lead sends back whichever needs work, and approval checks that what each
  sign-off covers is still as signed. An owner's earlier receipt no longer counts.
* `handover_receive`: the owner, who has no account, types their name and signs; only
  after approval, once per approval, and only while the record is as approved.
"""

from __future__ import annotations

import datetime

from django.db import transaction
from django.utils import timezone

from inspections.models import AuditEvent, SignOff, Stage
from inspections.services.common import (
    Errors,
    add_error,
    audit,
    clean_text,
    locked_stages,
    not_in_future,
    person,
    raise_if,
    require_perm,
)
from inspections.services.gates import approval_blockers
from inspections.services.signatures import clean_signature
from inspections.services.signing import (
    REVIEW_PERM,
    check_own_password,
    create_signoff,
    set_state,
    signer_role,
)
from inspections.services.signoffs import signoff_is_current
from inspections.services.status import (
    job_is_locked,
    job_status_sync,
    latest_signoff,
    lock_message,
    receipt_in_force,
)

REOPEN_PERM = "inspections.reopen_job"
MIN_REASON = 10
MAX_REASON = 2000


def _stages_or_error(job, errors: Errors) -> dict[int, Stage]:
    stages = locked_stages(job.pk)
    if not all(kind in stages for kind in Stage.BUILD_KINDS):
        add_error(errors, "job", f"Job {job.number} has no stages yet; open its first install.")
        return {}
    return stages


def job_approve(
    *, job, lead, password: object, signature_png: object, at: datetime.datetime | None = None
) -> SignOff:
    """The lead reviews and approves the job for handover; the job is locked. `at`: the
    demo's history only (as inspections.services.signing.stage_sign says)."""
    require_perm(lead, REVIEW_PERM, "Only a lead approves a job for handover.")
    errors: Errors = {}
    if at is not None:
        not_in_future(at, field="at", what="time of the approval", errors=errors)
    check_own_password(lead, password, errors, doing="job_approve")
    signature = clean_signature(signature_png, errors)
    with transaction.atomic():
        stages = _stages_or_error(job, errors)
        if stages:
            job = stages[Stage.Kind.FIRST_INSTALL].job
        if job_is_locked(job):
            add_error(errors, "job", lock_message(job).replace("; a lead must reopen it first", ""))
        elif stages:
            for message in approval_blockers(job, stages):
                add_error(errors, "stage", message)
        raise_if(errors)
        handover = stages[Stage.Kind.HANDOVER]
        status_before = job.status
        signoff = create_signoff(
            stage=handover,
            kind=SignOff.Kind.APPROVAL,
            signer=lead,
            role=signer_role(lead),
            printed_name=person(lead)[:120],
            meaning=SignOff.MEANINGS[SignOff.Kind.APPROVAL],
            signature=signature,
            at=at,
        )
        set_state(handover, Stage.State.SIGNED)
        status = job_status_sync(job=job)
        audit(
            at=at,
            job=job,
            kind=AuditEvent.Kind.APPROVAL,
            actor=lead,
            summary=f"Reviewed and approved for handover by {signoff.printed_name}; job locked",
            before={"status": status_before, "locked": False},
            after={
                "status": status,
                "locked": True,
                "signoff": signoff.pk,
                "content_sha256": signoff.content_sha256,
            },
            subject=signoff,
        )
    return signoff


def job_reopen(*, job, lead, reason: str) -> Stage:
    """Unlock an approved job so it can be changed; the reason stays in the trail."""
    require_perm(lead, REOPEN_PERM, "Only a lead reopens an approved job.")
    errors: Errors = {}
    reason = clean_text(reason, field="reason", what="reason", limit=MAX_REASON, errors=errors)
    if len(reason) < MIN_REASON:
        add_error(
            errors,
            "reason",
            f"Say why the job is reopened, in at least {MIN_REASON} characters: it stays in"
            " the record.",
        )
    with transaction.atomic():
        stages = _stages_or_error(job, errors)
        if stages:
            job = stages[Stage.Kind.FIRST_INSTALL].job
        if stages and not job_is_locked(job):
            add_error(
                errors, "job", f"Job {job.number} is not approved; there is nothing to reopen."
            )
        raise_if(errors)
        handover = stages[Stage.Kind.HANDOVER]
        status_before = job.status
        set_state(handover, Stage.State.REOPENED, opened=True)
        status = job_status_sync(job=job)
        audit(
            job=job,
            kind=AuditEvent.Kind.REOPEN,
            actor=lead,
            summary=f"Reopened by {person(lead)}: {reason}",
            before={"status": status_before, "locked": True, "handover": Stage.State.SIGNED},
            after={
                "status": status,
                "locked": False,
                "handover": Stage.State.REOPENED,
                "reason": reason,
            },
            subject=handover,
        )
    return handover


def handover_receive(
    *, job, printed_name: str, signature_png: object, by=None, at: datetime.datetime | None = None
) -> SignOff:
    """The owner signs for receipt of the approved record; the job is handed over.
    `by` is the staff member handing over (the trail names them beside the owner); `at`
    the demo's history only."""
    errors: Errors = {}
    if at is not None:
        not_in_future(at, field="at", what="time of the receipt", errors=errors)
    name = clean_text(printed_name, field="printed_name", what="name", limit=120, errors=errors)
    if len(name) < 2:
        add_error(errors, "printed_name", "Type your name as you sign.")
    signature = clean_signature(signature_png, errors)
    with transaction.atomic():
        stages = _stages_or_error(job, errors)
        if stages:
            job = stages[Stage.Kind.FIRST_INSTALL].job
        approval = latest_signoff(job, SignOff.Kind.APPROVAL)
        receipt = receipt_in_force(job)
        if stages and not job_is_locked(job):
            add_error(
                errors,
                "job",
                f"Job {job.number} is not approved yet; the owner signs for receipt after"
                " the lead's approval.",
            )
        elif receipt is not None:
            add_error(
                errors,
                "job",
                f"{receipt.printed_name} already signed for receipt on"
                f" {timezone.localtime(receipt.signed_at):%d %b %Y at %H:%M}.",
            )
        elif approval is not None and not signoff_is_current(approval):
            add_error(
                errors,
                "job",
                "The record has changed since it was approved; a lead must reopen and"
                " approve it again before the owner signs.",
            )
        raise_if(errors)
        handover = stages[Stage.Kind.HANDOVER]
        signoff = create_signoff(
            stage=handover,
            kind=SignOff.Kind.RECEIPT,
            signer=None,
            role=SignOff.Role.OWNER,
            printed_name=name,
            meaning=SignOff.MEANINGS[SignOff.Kind.RECEIPT],
            signature=signature,
            at=at,
        )
        status_before = job.status
        status = job_status_sync(job=job)
        audit(
            at=at,
            job=job,
            kind=AuditEvent.Kind.RECEIVED,
            actor=by if getattr(by, "is_authenticated", False) else None,
            summary=f"Received by the owner, {name}" + (f", from {person(by)}" if by else ""),
            before={"status": status_before},
            after={
                "status": status,
                "signoff": signoff.pk,
                "printed_name": name,
                "content_sha256": signoff.content_sha256,
            },
            subject=signoff,
        )
    return signoff


__all__ = ["handover_receive", "job_approve", "job_reopen"]
