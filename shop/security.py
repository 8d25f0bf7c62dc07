"""The `security` logger: failed and locked sign-ins, refusals (403), imports and deletions,
each with who and when. It writes to stdout by default (settings.LOGGING); a shop that
keeps its logs elsewhere points the `security` logger at its own handler."""

from __future__ import annotations

import logging

from django.utils import timezone

logger = logging.getLogger("security")


def _who(user) -> str:
    if user is None or not getattr(user, "is_authenticated", False):
        return "anonymous"
    return f"{user.get_username()} (id {user.pk})"


def security_log(event: str, *, user=None, request=None, **details: object) -> None:
    """Record one security event: `event` is a short stable word ("delete", "import",
    "forbidden", "sign_in_failed", "locked_out"...), `details` plain values."""
    if user is None and request is not None:
        user = getattr(request, "user", None)
    parts = [f"event={event}", f"who={_who(user)}", f"when={timezone.now().isoformat()}"]
    if request is not None:
        parts.append(f"address={request.META.get('REMOTE_ADDR', '?')}")
        parts.append(f"path={request.path!r}")
    parts.extend(f"{key}={value!r}" for key, value in sorted(details.items()))
    logger.warning(" ".join(parts))
