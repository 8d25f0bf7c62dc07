"""Writes that touch several records: creating and updating jobs."""

from __future__ import annotations

from collections.abc import Iterable

from django.db import transaction
from django.utils import timezone

from shop.models import Job, JobSequence, ShopProfile


def job_number_next(*, prefix: str, year: int) -> str:
    """Hand out the next number for (prefix, year). Call inside a transaction.

    The counter row only moves forward, so a deleted job's number is never issued again.
    """
    seq, _ = JobSequence.objects.select_for_update().get_or_create(prefix=prefix, year=year)
    seq.last += 1
    seq.save(update_fields=["last"])
    return f"{prefix}-{year}-{seq.last:04d}"


def job_create(*, technicians: Iterable = (), **fields) -> Job:
    """Create a job with a fresh number. `fields` are Job model fields (vehicle, title, ...)."""
    with transaction.atomic():
        job = Job(**fields)
        job.full_clean(exclude=["number"])
        prefix = ShopProfile.load().job_prefix
        job.number = job_number_next(prefix=prefix, year=timezone.localdate().year)
        job.save()
        job.technicians.set(technicians)
    return job


def job_update(*, job: Job, technicians: Iterable | None = None, **fields) -> Job:
    with transaction.atomic():
        for name, value in fields.items():
            setattr(job, name, value)
        job.full_clean()
        job.save()
        if technicians is not None:
            job.technicians.set(technicians)
    return job
