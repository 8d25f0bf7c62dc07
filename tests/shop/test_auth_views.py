"""Sign in and sign out."""

from __future__ import annotations

import pytest
from django.urls import reverse

from tests.factories import make_user

pytestmark = pytest.mark.django_db


def test_sign_in_page_shows_the_caution_and_the_form(anon_client):
    body = anon_client.get(reverse("login")).content.decode()
    assert 'name="username"' in body
    assert "never replaces" in body


def test_wrong_password_is_refused_with_a_message(anon_client):
    make_user(username="pat")
    response = anon_client.post(reverse("login"), {"username": "pat", "password": "wrong"})
    assert response.status_code == 200
    assert "correct username and password" in response.content.decode()


def test_sign_in_lands_on_the_job_list(anon_client):
    make_user(username="pat")
    response = anon_client.post(
        reverse("login"), {"username": "pat", "password": "pw-for-tests-only"}
    )
    assert response["Location"] == reverse("job_list")


def test_sign_out_is_a_post_and_ends_the_session(technician_client):
    response = technician_client.post(reverse("logout"))
    assert response["Location"] == reverse("login")
    assert technician_client.get(reverse("job_list")).status_code == 302
