"""Access helpers for the electrical-system pages: look a record up for a user within a
job, or refuse with 403 (no permission, or a write to a job the user is not assigned to)
or 404 (no such record in that job)."""

from __future__ import annotations

from django.shortcuts import get_object_or_404

from circuits.models import Circuit, Device
from shop.models import Job
from shop.views.access import _get_job_for_user, require_job_write, require_perm

__all__ = [
    "_get_circuit_for_user",
    "_get_device_for_user",
    "_get_job_for_user",
    "require_job_write",
    "require_perm",
]


def _get_circuit_for_user(
    user, number: str, pk: int, *, perm: str, write: bool = False
) -> tuple[Job, Circuit]:
    job = _get_job_for_user(user, number, perm=perm, write=write)
    circuit = get_object_or_404(
        Circuit.objects.select_related("from_device", "to_device", "job__vehicle"), job=job, pk=pk
    )
    return job, circuit


def _get_device_for_user(
    user, number: str, pk: int, *, perm: str, write: bool = False
) -> tuple[Job, Device]:
    job = _get_job_for_user(user, number, perm=perm, write=write)
    return job, get_object_or_404(Device.objects.prefetch_related("terminals"), job=job, pk=pk)
