"""Small access helpers: look a record up for a user, or refuse with 403/404."""

from __future__ import annotations

from django.core.exceptions import PermissionDenied
from django.shortcuts import get_object_or_404

from shop.models import Job


def require_perm(user, perm: str) -> None:
    if not user.has_perm(perm):
        raise PermissionDenied


def _get_job_for_user(user, number: str, *, perm: str = "shop.view_job") -> Job:
    require_perm(user, perm)
    return get_object_or_404(
        Job.objects.select_related("vehicle__owner", "lead").prefetch_related("technicians"),
        number=number,
    )
