"""Sign-in events for the security log: every failed sign-in and every lock-out, on the
app's sign-in page and the admin's alike. Only the username tried is recorded, never the
password (Django hands receivers credentials with the password already masked, and none
of them is read here)."""

from __future__ import annotations

from axes.signals import user_locked_out
from django.contrib.auth.signals import user_login_failed
from django.dispatch import receiver

from shop.security import security_log

# A username is whatever was typed; a long one is cut so one post cannot flood the log.
MAX_LOGGED_USERNAME = 150


def _tried(username: object) -> str:
    return str(username or "")[:MAX_LOGGED_USERNAME]


@receiver(user_login_failed, dispatch_uid="shop.security.sign_in_failed")
def log_sign_in_failed(sender, credentials: dict, request=None, **kwargs) -> None:
    security_log(
        "sign_in_failed",
        request=request,
        username=_tried(credentials.get("username")),
        # True when the attempt was refused because the name is locked on this device.
        locked=bool(getattr(request, "axes_locked_out", False)),
    )


@receiver(user_locked_out, dispatch_uid="shop.security.locked_out")
def log_locked_out(sender, request=None, username=None, ip_address=None, **kwargs) -> None:
    security_log("locked_out", request=request, username=_tried(username))
