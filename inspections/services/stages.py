"""A job's four stages (five on a return visit: the re-check first)."""

from __future__ import annotations

from django.db import transaction
from django.utils import timezone

from inspections.models import Stage
from inspections.services.status import job_status_sync
from shop.models import Job


def stages_ensure(*, job) -> list[Stage]:
    """Give the job its four stages, first install open and the rest not started;
    idempotent, and safe when two requests do it at once (the unique constraint on job
    and kind keeps one of each; ignore_conflicts skips the ones already there).

    No audit event: creating the empty stages is bookkeeping, not a change anyone made,
    and an event would make the job undeletable (its trail is PROTECTed) before any
    work was recorded on it. The job's status follows (booked becomes first install)."""
    now = timezone.now()
    # A return visit opens with its re-check (as found, before any re-tightening); the
    # build stages wait for it to be signed.
    kinds: tuple = Stage.BUILD_KINDS
    first = Stage.Kind.FIRST_INSTALL
    if getattr(job, "kind", None) == Job.Kind.RETURN_VISIT:
        kinds, first = (Stage.Kind.RECHECK, *Stage.BUILD_KINDS), Stage.Kind.RECHECK
    with transaction.atomic():
        Stage.objects.bulk_create(
            [
                Stage(
                    job=job,
                    kind=kind,
                    state=Stage.State.OPEN if kind == first else Stage.State.NOT_STARTED,
                    opened_at=now if kind == first else None,
                )
                for kind in kinds
            ],
            ignore_conflicts=True,
        )
        job_status_sync(job=job)
        return list(Stage.objects.filter(job=job).order_by("kind"))


def stage_for(job, kind: int) -> Stage | None:
    return Stage.objects.filter(job=job, kind=kind).first()
