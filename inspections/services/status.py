"""The job's status, driven by its stages, and the lock approval puts on the job.

Status (shop.models.Job.status) is never set by hand: every service that moves a stage
calls `job_status_sync` in its transaction, which derives the status from the stages:

    no stages yet, or first install not started        booked
    re-check open / sent back (return visits only)      recheck
    first install open / sent back / reopened           install
    first install signed, heat-cycle not yet run        heat_cycle
    run logged, retorque open (soak included)           retorque
    retorque signed, awaiting the lead's approval       handover  ("Awaiting approval")
    approved (handover stage signed)                    approved
    approved and the owner has signed for receipt       handed_over

A return visit's build stages marked "not needed" (nothing to re-tighten, no new work)
are passed over like signed ones; the first install of a return visit not yet started
after a signed re-check is "first install" (the re-tightening and new work come next).

The lock: a job is locked while its handover stage is signed (the lead's approval) until
a lead reopens it. Every inspections write refuses while locked (`check_unlocked`).
"""

from __future__ import annotations

from django.utils import timezone

from inspections.models import SignOff, Stage
from inspections.services.common import Errors, add_error
from shop.models import Job

_STATUS_OF_OPEN_STAGE = {
    Stage.Kind.RECHECK: Job.Status.RECHECK,
    Stage.Kind.FIRST_INSTALL: Job.Status.INSTALL,
    Stage.Kind.HEAT_CYCLE: Job.Status.HEAT_CYCLE,
    Stage.Kind.RETORQUE: Job.Status.RETORQUE,
    Stage.Kind.HANDOVER: Job.Status.HANDOVER,
}


def latest_signoff(job, kind: str) -> SignOff | None:
    return (
        SignOff.objects.filter(job=job, kind=kind)
        .select_related("signer")
        .order_by("-signed_at", "-pk")
        .first()
    )


def receipt_in_force(job) -> SignOff | None:
    """The owner's receipt of the latest approval, if they have signed for it (a receipt
    of an approval since reopened does not count for the approval after it)."""
    approval = latest_signoff(job, SignOff.Kind.APPROVAL)
    if approval is None:
        return None
    return (
        SignOff.objects.filter(job=job, kind=SignOff.Kind.RECEIPT, pk__gt=approval.pk)
        .order_by("-pk")
        .first()
    )


def job_status_for(job) -> str:
    """What the job's status is, given its stages and sign-offs (the table above)."""
    stages = {stage.kind: stage for stage in Stage.objects.filter(job=job)}
    if not stages:
        return Job.Status.BOOKED
    handover = stages.get(Stage.Kind.HANDOVER)
    if handover is not None and handover.state == Stage.State.SIGNED:
        return Job.Status.HANDED_OVER if receipt_in_force(job) else Job.Status.APPROVED
    for kind in Stage.Kind:
        stage = stages.get(kind)
        if kind not in Stage.BUILD_KINDS and stage is None:
            continue  # a re-check stage only on return visits
        if stage is not None and stage.state == Stage.State.NOT_NEEDED:
            continue  # a return visit's build stage the lead marked not needed
        if stage is None or stage.state != Stage.State.SIGNED:
            if kind == Stage.Kind.RECHECK and stage.state == Stage.State.NOT_STARTED:
                return Job.Status.BOOKED
            if (
                kind == Stage.Kind.FIRST_INSTALL
                and (stage is None or stage.state == Stage.State.NOT_STARTED)
                and Stage.Kind.RECHECK not in stages
            ):
                return Job.Status.BOOKED
            return _STATUS_OF_OPEN_STAGE[kind]
    return Job.Status.APPROVED  # every stage signed: only reached through approval


def job_status_sync(*, job) -> str:
    """Set the job's status from its stages; call inside the transaction that moved them.
    Writes only when the status changes (no row lock on the job otherwise)."""
    status = job_status_for(job)
    fields: dict = {"status": status}
    if status == Job.Status.HANDED_OVER:
        receipt = receipt_in_force(job)
        fields["handed_over_on"] = timezone.localdate(receipt.signed_at)
    # An update, not job.save(): the status is the stages' to set, and nothing else on the
    # job (edited on other pages at the same time) may be overwritten by a stale copy.
    Job.objects.filter(pk=job.pk).exclude(status=status).update(**fields)
    job.status = status
    if "handed_over_on" in fields:
        job.handed_over_on = fields["handed_over_on"]
    return status


def job_is_locked(job) -> bool:
    """Approved (its handover stage signed) and not reopened since."""
    return Stage.objects.filter(
        job=job, kind=Stage.Kind.HANDOVER, state=Stage.State.SIGNED
    ).exists()


def lock_message(job) -> str:
    approval = latest_signoff(job, SignOff.Kind.APPROVAL)
    when = (
        f" on {timezone.localtime(approval.signed_at):%d %b %Y at %H:%M}"
        if approval is not None
        else ""
    )
    return f"This job was approved{when}; a lead must reopen it first."


def check_unlocked(job, errors: Errors, *, field: str = "job") -> bool:
    """Add the lock message to `errors` when the job is locked; True when it is not."""
    if job_is_locked(job):
        add_error(errors, field, lock_message(job))
        return False
    return True
