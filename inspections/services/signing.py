"""Signing a stage and sending one back.

How the stages move (each move leaves an audit event, and the job's status follows):

    re-check        open ──sign──▶ signed            (a return visit's: opens the first
                                                      install; inspections.services.
                                                      return_visit)
    first install   open ──sign──▶ signed            (opens the heat-cycle run)
    heat-cycle run  open ──log the run──▶ signed     (opens the retorque; soak follows)
    retorque        open ──sign──▶ signed            (opens the handover)
    handover        open ──approve──▶ signed         (locks the job; the owner signs for
                                                      receipt; reopen ▶ reopened)

A lead sends a signed stage (not the handover: that is reopened) back with a note: it
becomes "sent back" and takes work again, and every later stage that had started goes
back to "not started" (it opens again when the stage before it is signed again; its
records stay, but a retorque counts only readings after the latest run's soak).
"""

from __future__ import annotations

import datetime

from django.core.exceptions import ValidationError
from django.db import transaction
from django.utils import timezone

from inspections.models import AuditEvent, SignOff, Stage, canonical_json, content_hash
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
    stage_name,
)
from inspections.services.gates import stage_blockers
from inspections.services.signatures import clean_signature
from inspections.services.signoffs import STAGE_SIGNOFF_KINDS, signoff_content
from inspections.services.status import check_unlocked, job_status_sync
from shop import roles
from shop.security import security_log

SIGN_PERM = "inspections.sign_stage"
REVIEW_PERM = "inspections.approve_job"
ANY_JOB_PERM = "shop.work_on_any_job"
MIN_NOTE = 10
MAX_NOTE = 2000


def signer_role(user) -> str:
    names = roles.role_names(user)
    if roles.LEAD in names:
        return SignOff.Role.LEAD
    if roles.TECHNICIAN in names:
        return SignOff.Role.TECHNICIAN
    return SignOff.Role.ADMIN


def check_own_password(user, password: object, errors: Errors, *, doing: str) -> None:
    """Tablets are shared: the signature must be the signer's, so they type their own
    password again. Checked outside any transaction (the hasher is slow on purpose and
    SQLite would hold its write lock meanwhile)."""
    if not isinstance(password, str) or not password or not user.check_password(password):
        security_log("signoff_password_refused", user=user, doing=doing)
        add_error(
            errors,
            "password",
            "That is not your password. Type your own password: the signature must be yours.",
        )


def clean_meaning(meaning: object, default: str, errors: Errors) -> str:
    if meaning is None:
        return default
    text = clean_text(meaning, field="meaning", what="meaning", limit=200, errors=errors)
    if not text:
        add_error(errors, "meaning", "Say in plain words what the signature means.")
    return text


def may_sign_for(user, job) -> bool:
    """Assigned to the job (or its lead), or allowed to work on any job."""
    return (
        user.has_perm(ANY_JOB_PERM)
        or job.lead_id == user.pk
        or job.technicians.filter(pk=user.pk).exists()
    )


def set_state(stage: Stage, state: str, *, opened: bool = False) -> str:
    before = stage.state
    stage.state = state
    fields = ["state", "updated_at"]
    if opened:
        stage.opened_at = timezone.now()
        fields.append("opened_at")
    elif state == Stage.State.NOT_STARTED:
        stage.opened_at = None
        fields.append("opened_at")
    stage.save(update_fields=fields)
    return before


def open_next(
    stages: dict[int, Stage], stage: Stage, *, actor, note: str = "", after: dict | None = None
) -> Stage | None:
    """Open the stage after `stage` when it has not started (one sent back and signed
    again finds the next one not started, and opens it again)."""
    following = stages.get(stage.kind + 1)
    if following is None or following.state != Stage.State.NOT_STARTED:
        return None
    set_state(following, Stage.State.OPEN, opened=True)
    audit(
        job=stage.job,
        kind=AuditEvent.Kind.STAGE_OPENED,
        actor=actor,
        summary=f"{following.get_kind_display()} opened: {stage_name(stage)} was signed{note}",
        before={"state": Stage.State.NOT_STARTED},
        after={"state": Stage.State.OPEN, **(after or {})},
        subject=following,
    )
    return following


def create_signoff(
    *,
    stage: Stage,
    kind: str,
    signer,
    role: str,
    printed_name: str,
    meaning: str,
    signature: bytes,
    at: datetime.datetime | None = None,
) -> SignOff:
    content = signoff_content(stage=stage)
    return SignOff.objects.create(
        signed_at=at or timezone.now(),
        job=stage.job,
        stage=stage,
        kind=kind,
        signer=signer,
        printed_name=printed_name,
        role=role,
        meaning=meaning,
        signature_png=signature,
        content=canonical_json(content),
        content_sha256=content_hash(content),
    )


def stage_sign(
    *,
    stage: Stage,
    user,
    password: object,
    signature_png: object,
    meaning: str | None = None,
    at: datetime.datetime | None = None,
) -> SignOff:
    """Sign a return visit's re-check, the first install or the retorque: the signer's
    own password, their role and assignment, a real drawn signature, and the stage's gate
    (inspections.services.gates), every unmet condition listed in one ValidationError.
    Opens the next stage. `at` is for the history the demo loads in the past only (the
    pages never pass it: a signature made on a page is stamped with the moment it is
    made); it may not lie in the future."""
    require_perm(user, SIGN_PERM, "Only technicians and leads sign a stage.")
    errors: Errors = {}
    if at is not None:
        not_in_future(at, field="at", what="time of the signature", errors=errors)
    check_own_password(user, password, errors, doing="stage_sign")
    signature = clean_signature(signature_png, errors)
    with transaction.atomic():
        stages = locked_stages(stage.job_id)
        stage = next(s for s in stages.values() if s.pk == stage.pk)
        job = stage.job
        name = stage_name(stage)
        if stage.kind not in STAGE_SIGNOFF_KINDS:
            how = (
                "by logging its run"
                if stage.kind == Stage.Kind.HEAT_CYCLE
                else "by the lead's approval and the owner's receipt"
            )
            raise ValidationError({"stage": f"The {name} stage is signed {how}."})
        kind = STAGE_SIGNOFF_KINDS[stage.kind]
        meaning = clean_meaning(meaning, SignOff.MEANINGS[kind], errors)
        check_unlocked(job, errors)
        if not stage.accepts_work:
            add_error(
                errors,
                "stage",
                f"The {name} stage is {stage.get_state_display().lower()}; only an open stage"
                " is signed.",
            )
        if not may_sign_for(user, job):
            add_error(
                errors,
                "user",
                f"You are not assigned to job {job.number}; ask its lead to add you before"
                " you sign.",
            )
        for message in stage_blockers(stage):
            add_error(errors, "stage", message)
        raise_if(errors)
        signoff = create_signoff(
            stage=stage,
            kind=kind,
            signer=user,
            role=signer_role(user),
            printed_name=person(user)[:120],
            meaning=meaning,
            signature=signature,
            at=at,
        )
        before = set_state(stage, Stage.State.SIGNED)
        audit(
            at=at,
            job=job,
            kind=AuditEvent.Kind.STAGE_SIGNED,
            actor=user,
            summary=f"{stage.get_kind_display()} signed by {signoff.printed_name}: {meaning}",
            before={"state": before},
            after={
                "state": Stage.State.SIGNED,
                "signoff": signoff.pk,
                "meaning": meaning,
                "content_sha256": signoff.content_sha256,
            },
            subject=signoff,
        )
        open_next(stages, stage, actor=user)
        job_status_sync(job=job)
    return signoff


def stage_send_back(*, stage: Stage, lead, note: str) -> Stage:
    """A lead sends a signed stage back for more work, saying why (the technicians see
    the note in the trail); every later stage that had started goes back to not started."""
    require_perm(lead, REVIEW_PERM, "Only a lead sends a stage back.")
    errors: Errors = {}
    note = clean_text(note, field="note", what="note", limit=MAX_NOTE, errors=errors)
    if len(note) < MIN_NOTE:
        add_error(
            errors,
            "note",
            f"Say what is to be done, in at least {MIN_NOTE} characters: the technicians read it.",
        )
    with transaction.atomic():
        stages = locked_stages(stage.job_id)
        stage = next(s for s in stages.values() if s.pk == stage.pk)
        job = stage.job
        name = stage_name(stage)
        check_unlocked(job, errors)
        if stage.kind == Stage.Kind.HANDOVER:
            add_error(errors, "stage", "The handover is not sent back; reopen the job instead.")
        elif stage.state != Stage.State.SIGNED:
            add_error(
                errors,
                "stage",
                f"Only a signed stage is sent back; the {name} stage is"
                f" {stage.get_state_display().lower()}.",
            )
        raise_if(errors)
        before = set_state(stage, Stage.State.SENT_BACK)
        audit(
            job=job,
            kind=AuditEvent.Kind.SENT_BACK,
            actor=lead,
            summary=f"{stage.get_kind_display()} sent back by {person(lead)}: {note}",
            before={"state": before},
            after={"state": Stage.State.SENT_BACK, "note": note},
            subject=stage,
        )
        for later in sorted(stages.values(), key=lambda s: s.kind):
            if later.kind <= stage.kind or later.state == Stage.State.NOT_STARTED:
                continue
            was = set_state(later, Stage.State.NOT_STARTED)
            audit(
                job=job,
                kind=AuditEvent.Kind.SENT_BACK,
                actor=lead,
                summary=(
                    f"{later.get_kind_display()} set back to not started: the {name} stage"
                    " was sent back"
                ),
                before={"state": was},
                after={"state": Stage.State.NOT_STARTED},
                subject=later,
            )
        job_status_sync(job=job)
    return stage


def send_back_note(stage: Stage) -> str:
    """Why the stage was last sent back (for the technicians' page); empty if never."""
    event = (
        AuditEvent.objects.filter(
            job_id=stage.job_id,
            kind=AuditEvent.Kind.SENT_BACK,
            subject_type=stage._meta.label_lower,
            subject_id=str(stage.pk),
        )
        .filter(after__has_key="note")
        .order_by("-at", "-pk")
        .first()
    )
    return (event.after or {}).get("note", "") if event is not None else ""


__all__ = ["send_back_note", "stage_send_back", "stage_sign"]
