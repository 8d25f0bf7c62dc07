"""Small access helpers: look a record up for a user, or refuse with 403/404."""

from __future__ import annotations

from dataclasses import dataclass

from django.core.exceptions import PermissionDenied
from django.http import HttpRequest
from django.shortcuts import get_object_or_404
from django.utils.http import url_has_allowed_host_and_scheme

from inspections.services.status import job_is_locked, lock_message
from shop.models import Job

# Leads and office hold it (shop/roles.py); everyone else writes only to their own jobs.
ANY_JOB_PERM = "shop.work_on_any_job"


def require_perm(user, perm: str) -> None:
    if not user.has_perm(perm):
        raise PermissionDenied


def may_write_job(user, job: Job) -> bool:
    """Whether the user may change this job's records: leads, office and superusers on
    any job; anyone else only on a job they are assigned to (as a technician or its lead)."""
    if not user.is_authenticated or not user.is_active:
        return False
    if user.has_perm(ANY_JOB_PERM) or job.lead_id == user.pk:
        return True
    # Uses the prefetched technicians when the job came from _get_job_for_user.
    return any(person.pk == user.pk for person in job.technicians.all())


def require_job_write(user, job: Job) -> None:
    """Refuse (403, with the reason in plain words) a write to a job the user is not on."""
    if not may_write_job(user, job):
        raise PermissionDenied(
            f"You are not assigned to job {job.number}; ask a lead to add you to this job."
        )


def _get_job_for_user(
    user, number: str, *, perm: str = "shop.view_job", write: bool = False
) -> Job:
    """The job `number` for a user holding `perm`: 403 without the permission, 404 for no
    such job, and, when `write`, 403 for a user who is not assigned to the job."""
    require_perm(user, perm)
    job = get_object_or_404(
        Job.objects.select_related("vehicle__owner", "lead").prefetch_related("technicians"),
        number=number,
    )
    if write:
        require_job_write(user, job)
    return job


@dataclass(frozen=True)
class JobAccess:
    """What a page may offer a user on one job: `may_write` (assigned, or a lead or
    office), `locked` (approved: every write refused until a lead reopens it) and
    `may_edit`, both together: show write buttons only when it is true. The role's own
    permission (perms.circuits.add_circuit, ...) is still checked beside it."""

    may_write: bool
    locked: bool
    lock_message: str

    @property
    def may_edit(self) -> bool:
        return self.may_write and not self.locked


def job_access(user, job: Job, request: HttpRequest | None = None) -> JobAccess:
    """The JobAccess of `user` on `job`, worked out once per request (templates ask for it
    in several partials)."""
    cache = getattr(request, "_job_access", None) if request is not None else None
    if cache is not None and job.pk in cache:
        return cache[job.pk]
    locked = job_is_locked(job)
    access = JobAccess(
        may_write=may_write_job(user, job),
        locked=locked,
        lock_message=lock_message(job) if locked else "",
    )
    if request is not None:
        if cache is None:
            cache = request._job_access = {}
        cache[job.pk] = access
    return access


def safe_next(request: HttpRequest, fallback: str) -> str:
    """The `next` address a form or link asks to return to, when it is a path on this site
    (it starts with one "/", carries no scheme or host); otherwise `fallback`.

    Never treated as a view name: a `next` of "NaN" or "job_list" falls back."""
    wanted = request.POST.get("next") or request.GET.get("next") or ""
    if (
        isinstance(wanted, str)
        and wanted.startswith("/")
        and not wanted.startswith("//")
        and "\\" not in wanted
        and "\x00" not in wanted
        and url_has_allowed_host_and_scheme(
            wanted, allowed_hosts={request.get_host()}, require_https=request.is_secure()
        )
    ):
        return wanted
    return fallback
