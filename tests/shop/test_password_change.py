"""Every staff member changes their own password (and only their own), from a link in the
header; a wrong current password or a weak new one is refused beside the field."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from shop import roles
from tests.factories import make_user

pytestmark = pytest.mark.django_db

OLD = "pw-for-tests-only"  # tests.factories.make_user
NEW = "a-longer-new-password-2026"


def _post(old: str = OLD, new: str = NEW, again: str | None = None) -> dict:
    return {"old_password": old, "new_password1": new, "new_password2": again or new}


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(reverse("password_change"))
    assert response.status_code == 302
    assert "/login/" in response["Location"]


@pytest.mark.parametrize("role", roles.ROLES)
def test_every_role_changes_its_own_password(role):
    user = make_user(role)
    client = Client()
    client.force_login(user)
    assert "Change your password" in client.get(reverse("password_change")).content.decode()
    response = client.post(reverse("password_change"), _post())
    assert response["Location"] == reverse("password_change_done")
    user.refresh_from_db()
    assert user.check_password(NEW)
    # Still signed in on this device after the change.
    assert client.get(reverse("job_list")).status_code == 200


def test_the_header_links_to_change_password(technician_client):
    assert reverse("password_change") in technician_client.get(reverse("job_list")).content.decode()


def test_a_wrong_current_password_is_refused_beside_it(technician_client, technician):
    response = technician_client.post(reverse("password_change"), _post(old="not-my-password"))
    body = response.content.decode()
    assert response.status_code == 200
    assert 'id="id_old_password_error"' in body
    technician.refresh_from_db()
    assert technician.check_password(OLD)


def test_a_weak_or_mismatched_new_password_is_refused(technician_client, technician):
    weak = technician_client.post(reverse("password_change"), _post(new="12345678"))
    assert 'id="id_new_password2_error"' in weak.content.decode()
    mismatch = technician_client.post(reverse("password_change"), _post(again=NEW + "x"))
    assert "didn’t match" in mismatch.content.decode()
    technician.refresh_from_db()
    assert technician.check_password(OLD)


def test_the_page_changes_only_the_signed_in_users_password(technician_client, lead):
    # There is no field to name another person: posting one changes nothing of theirs.
    technician_client.post(reverse("password_change"), {**_post(), "username": lead.username})
    lead.refresh_from_db()
    assert lead.check_password(OLD)


def test_a_password_change_is_logged(technician_client, caplog):
    with caplog.at_level("WARNING", logger="security"):
        technician_client.post(reverse("password_change"), _post())
    assert any("event=password_changed" in r.getMessage() for r in caplog.records)
