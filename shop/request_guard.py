"""Refuse requests whose address carries a NUL character.

No page of ours has a use for one, and PostgreSQL refuses NUL in text parameters with a
DataError (a 500) wherever the value reaches a query: a job number in the path, a search
term in the query string. Form fields in a POST body need no guard here: Django's form
fields already refuse NUL with a message beside the field.
"""

from __future__ import annotations

from collections.abc import Callable

from django.http import HttpRequest, HttpResponse, HttpResponseBadRequest

from shop.security import security_log


class RejectNulCharactersMiddleware:
    def __init__(self, get_response: Callable[[HttpRequest], HttpResponse]) -> None:
        self.get_response = get_response

    def __call__(self, request: HttpRequest) -> HttpResponse:
        if "\x00" in request.path or any(
            "\x00" in key or any("\x00" in value for value in request.GET.getlist(key))
            for key in request.GET
        ):
            security_log("bad_request", request=request, reason="NUL character in the address")
            return HttpResponseBadRequest(
                "This address contains a character that cannot be used (NUL).",
                content_type="text/plain; charset=utf-8",
            )
        # HTTP forbids NUL in a header too; the sign-in throttle and the owner-link log
        # store the browser's User-Agent, which PostgreSQL would refuse (a 500).
        if any(
            key.startswith("HTTP_") and isinstance(value, str) and "\x00" in value
            for key, value in request.META.items()
        ):
            security_log("bad_request", request=request, reason="NUL character in a header")
            return HttpResponseBadRequest(
                "A header of this request contains a character that cannot be used (NUL).",
                content_type="text/plain; charset=utf-8",
            )
        return self.get_response(request)
