"""Small access helpers: look a record up for a user, or refuse with 403/404."""

from __future__ import annotations

from django.core.exceptions import PermissionDenied
from django.http import HttpRequest
from django.shortcuts import get_object_or_404
from django.utils.http import url_has_allowed_host_and_scheme

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
