"""Error pages: 403 (with the refusal's reason in plain words, logged), 404 and 400.

Wired as handler403/handler404/handler400 in shop/urls.py. A view that finds a tampered
form renders bad_request_page() itself, so the person sees the reason whatever DEBUG is.
"""

from __future__ import annotations

from django.core.exceptions import PermissionDenied
from django.http import HttpRequest, HttpResponse
from django.shortcuts import render

from shop.security import security_log

GENERIC_REFUSAL = (
    "Your role does not let you open this page or make this change. "
    "If your work needs it, ask a lead or the office."
)
GENERIC_BAD_REQUEST = (
    "The page sent something it never sends, so nothing was saved. Open the page again "
    "from the menu and try once more."
)


def _reason(exception) -> str:
    """The message a PermissionDenied/BadRequest was raised with, if any (our own access
    helpers give one, e.g. "You are not assigned to job ...")."""
    if exception is None or not getattr(exception, "args", None):
        return ""
    return str(exception.args[0]) if isinstance(exception.args[0], str) else ""


def forbidden(request: HttpRequest, exception: PermissionDenied | None = None) -> HttpResponse:
    reason = _reason(exception)
    security_log("forbidden", request=request, reason=reason or "no permission")
    context = {"reason": reason or GENERIC_REFUSAL}
    return render(request, "403.html", context, status=403)


def page_not_found(request: HttpRequest, exception: Exception | None = None) -> HttpResponse:
    # The resolver's message names URL patterns; a person needs none of that.
    return render(request, "404.html", {"request_path": request.path}, status=404)


def bad_request(request: HttpRequest, exception: Exception | None = None) -> HttpResponse:
    return bad_request_page(request, _reason(exception))


def bad_request_page(request: HttpRequest, reason: str = "") -> HttpResponse:
    """A 400 for a form or address that was tampered with (or has gone stale): the reason
    in plain words, nothing saved, and a note in the security log."""
    security_log("bad_request", request=request, reason=reason or "malformed request")
    return render(request, "400.html", {"reason": reason or GENERIC_BAD_REQUEST}, status=400)
