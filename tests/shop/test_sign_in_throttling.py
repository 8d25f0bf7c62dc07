"""Sign-in throttling: repeated wrong passwords for one name from one device pause that
name on that device for a cool-off, on the app's sign-in and the admin's, and the security
log records each failure and the lock-out without the password."""

from __future__ import annotations

import io
import logging
import os
import subprocess
import sys
from datetime import timedelta
from pathlib import Path

import pytest
from axes.models import AccessAttempt
from django.conf import settings
from django.core.management import call_command
from django.test import Client
from django.urls import reverse
from django.utils import timezone

from shop import roles
from tests.factories import make_user

pytestmark = pytest.mark.django_db

RIGHT = "pw-for-tests-only"  # tests.factories.make_user
WRONG = "not-the-password-3141"
LOCK_MESSAGE = "Too many failed sign-ins for this name from this device"
ROOT = Path(__file__).resolve().parents[2]


@pytest.fixture(autouse=True)
def _quick_password_hashing(settings):
    # Dozens of sign-ins per file at the production hasher's cost would take most of a
    # minute; throttling does not depend on how passwords are hashed.
    settings.PASSWORD_HASHERS = ["django.contrib.auth.hashers.MD5PasswordHasher"]


@pytest.fixture
def security_records(caplog, monkeypatch):
    """The security logger writes to stdout and does not propagate; let caplog see it."""
    monkeypatch.setattr(logging.getLogger("security"), "propagate", True)
    caplog.set_level(logging.INFO, logger="security")

    def records() -> list[str]:
        return [r.getMessage() for r in caplog.records if r.name == "security"]

    return records


def _sign_in(client: Client, username: str, password: str, url: str | None = None):
    return client.post(url or reverse("login"), {"username": username, "password": password})


def _fail(client: Client, username: str, times: int, url: str | None = None):
    response = None
    for _ in range(times):
        response = _sign_in(client, username, WRONG, url)
    return response


def _signed_in(client: Client) -> bool:
    return "_auth_user_id" in client.session


def test_sign_in_locks_after_repeated_failures(anon_client, security_records):
    pat = make_user(username="pat")
    limit = settings.AXES_FAILURE_LIMIT
    assert limit == 5  # the default (SIGN_IN_FAILURE_LIMIT)

    for _ in range(limit - 1):
        response = _sign_in(anon_client, "pat", WRONG)
        assert response.status_code == 200
        assert "correct username and password" in response.content.decode()

    locking = _sign_in(anon_client, "pat", WRONG)
    assert locking.status_code == 429
    assert LOCK_MESSAGE in locking.content.decode()

    refused = _sign_in(anon_client, "pat", RIGHT)
    body = refused.content.decode()
    assert refused.status_code == 429
    assert LOCK_MESSAGE in body
    assert "try again in 15 minutes or ask the office" in body
    assert not _signed_in(anon_client)

    logged = security_records()
    failed = [line for line in logged if "event=sign_in_failed" in line]
    locked = [line for line in logged if "event=locked_out" in line]
    assert len(failed) == limit + 1  # the refused right password counts as a failure too
    assert all("username='pat'" in line and "address=127.0.0.1" in line for line in failed)
    assert locked and all("username='pat'" in line for line in locked)
    assert not any(WRONG in line or RIGHT in line for line in logged)
    pat.refresh_from_db()
    assert pat.last_login is None


def test_another_username_from_the_same_address_is_not_locked(anon_client):
    make_user(username="pat")
    make_user(username="sam")
    _fail(anon_client, "pat", settings.AXES_FAILURE_LIMIT)

    response = _sign_in(anon_client, "sam", RIGHT)
    assert response.status_code == 302
    assert _signed_in(anon_client)


def test_the_same_username_from_another_device_is_not_locked():
    make_user(username="pat")
    _fail(Client(REMOTE_ADDR="10.0.0.21"), "pat", settings.AXES_FAILURE_LIMIT)

    other_tablet = Client(REMOTE_ADDR="10.0.0.22")
    assert _sign_in(other_tablet, "pat", RIGHT).status_code == 302
    assert _signed_in(other_tablet)


def test_admin_sign_in_is_throttled_too(anon_client, security_records):
    make_user(roles.OFFICE, username="olive", is_staff=True)
    admin_login = reverse("admin:login")
    _fail(anon_client, "olive", settings.AXES_FAILURE_LIMIT, admin_login)

    refused = _sign_in(anon_client, "olive", RIGHT, admin_login)
    assert refused.status_code == 429
    assert LOCK_MESSAGE in refused.content.decode()
    assert not _signed_in(anon_client)
    assert any(
        "event=locked_out" in line and "path='/admin/login/'" in line for line in security_records()
    )


def test_lock_lifts_after_the_cool_off(anon_client):
    make_user(username="pat")
    _fail(anon_client, "pat", settings.AXES_FAILURE_LIMIT)
    # As if the cool-off (SIGN_IN_COOLOFF_MINUTES, 15) had passed since the last failure.
    AccessAttempt.objects.update(
        attempt_time=timezone.now() - settings.SIGN_IN_COOLOFF - timedelta(seconds=1)
    )
    assert _sign_in(anon_client, "pat", RIGHT).status_code == 302


def test_tries_during_a_lock_out_do_not_extend_it(anon_client):
    make_user(username="pat")
    _fail(anon_client, "pat", settings.AXES_FAILURE_LIMIT)
    locked_at = timezone.now() - settings.SIGN_IN_COOLOFF + timedelta(seconds=5)
    AccessAttempt.objects.update(attempt_time=locked_at)

    _fail(anon_client, "pat", 3)  # refused, and not recorded as new failures
    attempt = AccessAttempt.objects.get(username="pat")
    assert attempt.attempt_time == locked_at
    assert attempt.failures_since_start == settings.AXES_FAILURE_LIMIT


def test_office_reset_command_lifts_a_lock(anon_client):
    make_user(username="pat")
    _fail(anon_client, "pat", settings.AXES_FAILURE_LIMIT)
    call_command("axes_reset_username", "pat", stdout=io.StringIO())  # README
    assert _sign_in(anon_client, "pat", RIGHT).status_code == 302


def test_a_good_sign_in_clears_earlier_slips(anon_client):
    make_user(username="pat")
    limit = settings.AXES_FAILURE_LIMIT
    _fail(anon_client, "pat", limit - 1)
    assert _sign_in(anon_client, "pat", RIGHT).status_code == 302
    anon_client.post(reverse("logout"))

    _fail(anon_client, "pat", limit - 1)
    assert _sign_in(anon_client, "pat", RIGHT).status_code == 302


def test_limit_and_cool_off_come_from_the_environment():
    code = (
        "from django.conf import settings; "
        "print(settings.AXES_FAILURE_LIMIT, settings.AXES_COOLOFF_TIME.total_seconds())"
    )
    env = {k: v for k, v in os.environ.items() if k not in {"DATABASE_URL"}}
    env.update(SIGN_IN_FAILURE_LIMIT="8", SIGN_IN_COOLOFF_MINUTES="40")
    result = subprocess.run(
        [sys.executable, "manage.py", "shell", "--no-imports", "-c", code],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert result.stdout.split() == ["8", "2400.0"], result.stderr

    env.update(SIGN_IN_FAILURE_LIMIT="five")
    result = subprocess.run(
        [sys.executable, "manage.py", "check"],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert result.returncode != 0
    assert "SIGN_IN_FAILURE_LIMIT must be a whole number" in result.stderr


def test_behind_a_reverse_proxy_the_device_address_is_what_locks(settings, security_records):
    settings.REVERSE_PROXY_COUNT = 1  # read when a client's middleware chain is built
    make_user(username="pat")
    # Every request reaches the app from the proxy's address; the proxy appends the device.
    tablet_a = Client(REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR="10.0.0.21")
    _fail(tablet_a, "pat", settings.AXES_FAILURE_LIMIT)
    assert _sign_in(tablet_a, "pat", RIGHT).status_code == 429
    assert any("address=10.0.0.21" in line for line in security_records())

    # A device cannot pick its address: what it wrote itself stands left of the proxy's.
    spoofing = Client(REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR="10.0.0.99, 10.0.0.21")
    assert _sign_in(spoofing, "pat", RIGHT).status_code == 429

    tablet_b = Client(REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR="10.0.0.22")
    assert _sign_in(tablet_b, "pat", RIGHT).status_code == 302


def test_a_forwarded_value_that_is_no_address_is_ignored(settings, security_records):
    settings.REVERSE_PROXY_COUNT = 1
    make_user(username="pat")
    client = Client(REMOTE_ADDR="127.0.0.1", HTTP_X_FORWARDED_FOR="unknown")
    assert _sign_in(client, "pat", WRONG).status_code == 200  # no server error
    assert any("address=127.0.0.1" in line for line in security_records())
