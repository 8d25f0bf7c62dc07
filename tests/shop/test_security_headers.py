"""Response headers and session limits: a strict Content-Security-Policy and a
Permissions-Policy on every page, nothing cached of a signed-in page, sessions that end
after the idle timeout, and request bodies bounded."""

from __future__ import annotations

import os
import re
import subprocess
import sys
import time
from datetime import timedelta
from pathlib import Path

import pytest
from django.conf import settings
from django.contrib.sessions.models import Session
from django.urls import reverse
from django.utils import timezone

from circuits.diagram import job_diagram_svg
from circuits.system import job_system_report
from circuits.views.labels import qr_svg
from shop.middleware import SessionIdleTimeoutMiddleware
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db

ROOT = Path(__file__).resolve().parents[2]
# What the policy blocks: style="" attributes and <style> elements, on*= handlers, inline
# <script> bodies, javascript: links, and hx-on (htmx evaluates it as code, which needs
# 'unsafe-eval'). Presentation attributes such as fill= are fine.
INLINE = re.compile(
    r"""\sstyle\s*=|<style\b|\son[a-z]+\s*=|<script(?![^>]*\ssrc=)|javascript:|\shx-on""",
    re.I,
)
COMMENT = re.compile(r"{#.*?#}|{% comment %}.*?{% endcomment %}", re.S)


def _policy(response) -> dict[str, list[str]]:
    header = response["Content-Security-Policy"]
    directives = {}
    for part in header.split(";"):
        name, *values = part.split()
        directives[name] = values
    return directives


def test_sign_in_page_runs_under_a_strict_content_security_policy(anon_client):
    policy = _policy(anon_client.get(reverse("login")))
    assert policy["default-src"] == ["'self'"]
    assert policy["script-src"] == ["'self'"]
    assert policy["style-src"] == ["'self'"]
    assert policy["img-src"] == ["'self'"]
    assert policy["connect-src"] == ["'self'"]
    assert policy["form-action"] == ["'self'"]
    assert policy["frame-ancestors"] == ["'none'"]
    assert policy["base-uri"] == ["'none'"]
    assert policy["object-src"] == ["'none'"]


def test_no_page_allows_inline_script_or_style(lead_client):
    job = make_job()
    pages = (reverse("job_list"), job.get_absolute_url(), reverse("circuit_new", args=[job.number]))
    for url in pages:
        response = lead_client.get(url)
        assert response.status_code == 200, url
        header = response["Content-Security-Policy"]
        assert "unsafe-inline" not in header and "unsafe-eval" not in header, url
        assert "nonce-" not in header, url  # no page needs an inline exception


def test_permissions_policy_leaves_only_the_camera_to_the_app(anon_client):
    header = anon_client.get(reverse("login"))["Permissions-Policy"]
    features = dict(item.strip().split("=", 1) for item in header.split(","))
    assert features["camera"] == "(self)"  # job photos
    for unused in ("microphone", "geolocation", "payment", "usb", "serial", "hid"):
        assert features[unused] == "()", unused


def test_signed_in_page_is_never_stored(technician_client):
    response = technician_client.get(reverse("job_list"))
    cache_control = {part.strip() for part in response["Cache-Control"].split(",")}
    assert {"no-store", "private"} <= cache_control


def test_signed_in_download_is_never_stored(technician_client):
    job = make_job()
    response = technician_client.get(reverse("circuit_csv_export", args=[job.number]))
    assert response.status_code == 200
    assert "no-store" in response["Cache-Control"]


def test_no_store_is_only_forced_for_signed_in_users(anon_client):
    # Anonymous responses are left to their views: the redirect to the sign-in page (the
    # sign-in page itself is never-cache by Django's LoginView, not by this rule).
    response = anon_client.get(reverse("job_list"))
    assert response.status_code == 302
    assert "no-store" not in response.get("Cache-Control", "")


def test_static_files_stay_cacheable_for_signed_in_users(technician_client):
    response = technician_client.get("/static/css/app.css")
    assert response.status_code == 200
    assert "no-store" not in response.get("Cache-Control", "")


def test_idle_timeout_setting_is_applied_to_the_session(anon_client):
    make_user(username="pat")
    response = anon_client.post(
        reverse("login"), {"username": "pat", "password": "pw-for-tests-only"}
    )
    assert response.status_code == 302
    assert settings.SESSION_IDLE_MINUTES == 30  # the default for shared tablets
    assert anon_client.session.get_expiry_age() == 30 * 60
    assert response.cookies[settings.SESSION_COOKIE_NAME]["max-age"] == 30 * 60
    session = Session.objects.get(session_key=anon_client.session.session_key)
    expected = timezone.now() + timedelta(minutes=30)
    assert abs((session.expire_date - expected).total_seconds()) < 60


def test_idle_session_ends_and_asks_to_sign_in_again(technician_client):
    assert technician_client.get(reverse("job_list")).status_code == 200
    # As if the tablet had been left alone past the idle timeout.
    Session.objects.update(expire_date=timezone.now() - timedelta(seconds=1))
    response = technician_client.get(reverse("job_list"))
    assert response.status_code == 302
    assert response["Location"].startswith(reverse("login"))


def test_activity_keeps_a_session_alive(technician_client):
    technician_client.get(reverse("job_list"))
    key = technician_client.session.session_key
    # Five minutes left, last activity recorded two minutes ago.
    session = Session.objects.get(session_key=key)
    data = session.get_decoded()
    data[SessionIdleTimeoutMiddleware.KEY] = int(time.time()) - 120
    session.session_data = Session.objects.encode(data)
    session.expire_date = timezone.now() + timedelta(minutes=5)
    session.save()

    assert technician_client.get(reverse("job_list")).status_code == 200
    renewed = Session.objects.get(session_key=key).expire_date
    expected = timezone.now() + timedelta(minutes=settings.SESSION_IDLE_MINUTES)
    assert abs((renewed - expected).total_seconds()) < 60


def test_form_post_over_the_memory_limit_is_refused(anon_client):
    big = "x" * (settings.DATA_UPLOAD_MAX_MEMORY_SIZE + 1)
    response = anon_client.post(reverse("login"), {"username": big, "password": "x"})
    assert response.status_code == 400


def test_form_post_with_too_many_fields_is_refused(anon_client):
    fields = {f"f{n}": "1" for n in range(settings.DATA_UPLOAD_MAX_NUMBER_FIELDS + 1)}
    response = anon_client.post(reverse("login"), fields)
    assert response.status_code == 400


def test_idle_timeout_comes_from_the_environment():
    code = "from django.conf import settings; print(settings.SESSION_COOKIE_AGE)"
    env = {k: v for k, v in os.environ.items() if k != "DATABASE_URL"}
    env["SESSION_IDLE_MINUTES"] = "10"
    result = subprocess.run(
        [sys.executable, "manage.py", "shell", "--no-imports", "-c", code],
        cwd=ROOT,
        env=env,
        capture_output=True,
        text=True,
        timeout=120,
    )
    assert result.stdout.strip() == "600", result.stderr


def test_templates_have_no_inline_script_or_style():
    offenders = []
    for template in sorted((ROOT / "templates").rglob("*.html")):
        text = COMMENT.sub("", template.read_text())
        offenders += [f"{template.relative_to(ROOT)}: {m.group(0)}" for m in INLINE.finditer(text)]
    assert offenders == []


def test_diagram_and_qr_svg_carry_no_inline_style():
    job = make_job()
    battery = make_device(job, name="House battery", kind="battery")
    load = make_device(job, name="Fridge")
    make_circuit(job, battery, load, tag="D-01")
    markup = job_diagram_svg(job_system_report(job)) + qr_svg("http://shop.test/jobs/1/")
    assert "<svg" in markup
    assert not INLINE.search(markup)
