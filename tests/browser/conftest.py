"""Real-browser harness: Playwright drives Debian's Chromium against the live test server,
at a tablet viewport with touch (820 x 1180, portrait)."""

from __future__ import annotations

import os
import shutil
import subprocess

import pytest
from django.db import connection

from tests.inspections.guards import clear_evidence

CHROMIUM = "/usr/bin/chromium"
TABLET = {"width": 820, "height": 1180}


def _ensure_chromium() -> None:
    """Install Debian's chromium package when it is missing (no browser download)."""
    if os.path.exists(CHROMIUM):
        return
    if os.geteuid() != 0 or not shutil.which("apt-get"):
        pytest.exit(f"{CHROMIUM} is missing; install Debian's 'chromium' package", returncode=3)
    env = {**os.environ, "DEBIAN_FRONTEND": "noninteractive"}
    subprocess.run(["apt-get", "update", "-qq"], check=True, env=env)
    subprocess.run(["apt-get", "install", "-y", "-qq", "chromium"], check=True, env=env)


@pytest.fixture(scope="session", autouse=True)
def _orm_beside_playwright_loop():
    # Playwright's sync API keeps an event loop in the main thread; Django then refuses ORM
    # calls from the test body (and the database flush after it) unless told the loop is
    # not ours. Session scope so it outlives each test's database teardown.
    previous = os.environ.get("DJANGO_ALLOW_ASYNC_UNSAFE")
    os.environ["DJANGO_ALLOW_ASYNC_UNSAFE"] = "true"
    yield
    if previous is None:
        os.environ.pop("DJANGO_ALLOW_ASYNC_UNSAFE", None)
    else:
        os.environ["DJANGO_ALLOW_ASYNC_UNSAFE"] = previous


@pytest.fixture(scope="session")
def browser_type_launch_args(browser_type_launch_args):
    _ensure_chromium()
    return {
        **browser_type_launch_args,
        "executable_path": CHROMIUM,
        "args": [
            "--no-sandbox",
            "--disable-gpu",
            "--disable-quic",
            "--no-first-run",
            "--disable-background-networking",
            "--disable-component-update",
            "--disable-sync",
        ],
    }


@pytest.fixture(scope="session")
def browser_context_args(browser_context_args):
    return {**browser_context_args, "viewport": TABLET, "has_touch": True, "is_mobile": False}


@pytest.fixture
def sign_in(live_server, page):
    """Sign in through the real form, as a person would."""

    def _sign_in(username: str, password: str = "pw-for-tests-only"):
        page.goto(f"{live_server.url}/login/")
        page.get_by_label("Username").fill(username)
        page.get_by_label("Password").fill(password)
        page.get_by_role("button", name="Sign in").click()
        page.wait_for_url(f"{live_server.url}/jobs/**")
        return page

    return _sign_in


@pytest.fixture
def evidence_cleared(transactional_db):
    """Readings, marks and sign-offs are append-only (database triggers): on SQLite, whose
    flush deletes row by row, clear them first; PostgreSQL's flush truncates, which row
    triggers do not see."""
    yield
    if connection.vendor == "sqlite":
        clear_evidence()


@pytest.fixture
def signing_key(settings, tmp_path):
    """The shop's record-signing key and a media store in folders of this test's own (the
    live server reads the same settings)."""
    from wiring import signing

    settings.SIGNING_DIR = tmp_path / "signing"
    settings.MEDIA_ROOT = tmp_path / "media"
    settings.SIGNING_TIMESTAMP_URL = ""
    return signing.create_key(shop_name="Scenario Test Conversions")
