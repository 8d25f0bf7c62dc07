"""Small request/response guards that no library covers the way a shop's tablets need:
the device's address behind a reverse proxy, a Permissions-Policy header, no caching of
signed-in pages, and an idle timeout for sessions."""

from __future__ import annotations

import ipaddress
import time
from collections.abc import Callable

from django.conf import settings
from django.http import HttpRequest, HttpResponse
from django.shortcuts import resolve_url
from django.utils.cache import add_never_cache_headers
from django_htmx.http import HttpResponseClientRedirect

GetResponse = Callable[[HttpRequest], HttpResponse]


class ClientAddressMiddleware:
    """Behind REVERSE_PROXY_COUNT reverse proxies, put the device's address in REMOTE_ADDR.

    Each proxy appends the address it received the request from to X-Forwarded-For, so the
    device is the entry that many places from the right; anything to its left was written
    by the client and is ignored. With no proxy configured the header is never read, so a
    client cannot choose the address that sign-in throttling and the security log see."""

    def __init__(self, get_response: GetResponse) -> None:
        self.get_response = get_response
        self.hops = settings.REVERSE_PROXY_COUNT

    def __call__(self, request: HttpRequest) -> HttpResponse:
        if self.hops:
            forwarded = [
                part.strip()
                for part in request.META.get("HTTP_X_FORWARDED_FOR", "").split(",")
                if part.strip()
            ]
            if len(forwarded) >= self.hops and _is_address(forwarded[-self.hops]):
                request.META["REMOTE_ADDR"] = forwarded[-self.hops]
        return self.get_response(request)


def _is_address(text: str) -> bool:
    # Only a real address replaces the proxy's: the throttling table stores it in an
    # address column, which PostgreSQL checks.
    try:
        ipaddress.ip_address(text)
    except ValueError:
        return False
    return True


def permissions_policy_header(policy: dict[str, list[str]]) -> str:
    """`{"camera": ["self"], "usb": []}` -> `camera=(self), usb=()` (the structured-field
    form browsers read: `self` and `*` are tokens, any origin is a quoted string)."""

    def allow(origin: str) -> str:
        return origin if origin in {"self", "*"} else f'"{origin}"'

    return ", ".join(
        f"{feature}=({' '.join(allow(origin) for origin in origins)})"
        for feature, origins in policy.items()
    )


class PermissionsPolicyMiddleware:
    """Switch off browser features the app does not use (settings.PERMISSIONS_POLICY)."""

    def __init__(self, get_response: GetResponse) -> None:
        self.get_response = get_response
        self.header = permissions_policy_header(settings.PERMISSIONS_POLICY)

    def __call__(self, request: HttpRequest) -> HttpResponse:
        response = self.get_response(request)
        response.setdefault("Permissions-Policy", self.header)
        return response


class NoStoreForSignedInMiddleware:
    """A signed-in page holds customers' names and job records: no browser or proxy may keep
    a copy, so the Back button on a shared tablet shows nothing after sign-out."""

    def __init__(self, get_response: GetResponse) -> None:
        self.get_response = get_response

    def __call__(self, request: HttpRequest) -> HttpResponse:
        response = self.get_response(request)
        user = getattr(request, "user", None)
        if user is not None and user.is_authenticated:
            add_never_cache_headers(response)  # no-store, no-cache, private, max-age=0
        return response


class SessionIdleTimeoutMiddleware:
    """A signed-in session ends SESSION_COOKIE_AGE seconds (SESSION_IDLE_MINUTES) after its
    last request. Django sets a session's expiry when it saves it; saving on every request
    (SESSION_SAVE_EVERY_REQUEST) would write to the database on each page and each live
    preview, so this marks the session changed at most once a minute (or a tenth of the
    timeout, when that is shorter), which moves the expiry on for active users."""

    KEY = "_last_activity"

    def __init__(self, get_response: GetResponse) -> None:
        self.get_response = get_response
        self.refresh_after = max(1, min(60, settings.SESSION_COOKIE_AGE // 10))

    def __call__(self, request: HttpRequest) -> HttpResponse:
        if request.user.is_authenticated:
            now = int(time.time())
            last = request.session.get(self.KEY)
            if not isinstance(last, int) or now - last >= self.refresh_after:
                request.session[self.KEY] = now
        return self.get_response(request)


class HtmxSignInRedirectMiddleware:
    """When a session has timed out, an htmx request (a live panel, a search) would follow
    the redirect to the sign-in page and swap that whole page into a small region. Tell
    htmx to load the sign-in page as a full page instead (HX-Redirect)."""

    def __init__(self, get_response: GetResponse) -> None:
        self.get_response = get_response

    def __call__(self, request: HttpRequest) -> HttpResponse:
        response = self.get_response(request)
        if (
            getattr(request, "htmx", False)
            and response.status_code == 302
            and response.get("Location", "").startswith(resolve_url(settings.LOGIN_URL))
        ):
            return HttpResponseClientRedirect(response["Location"])
        return response
