"""Staff management in the app: the office (and a superuser) adds a staff member with one
role, changes the role, deactivates and reactivates them and sends a password-set link;
nothing more. No staff or superuser flag, no password set for someone else, never
yourself deactivated, never a superuser touched by anyone but a superuser."""

from __future__ import annotations

import re

import pytest
from django.contrib.auth import get_user_model
from django.core import mail
from django.test import Client
from django.urls import reverse

from shop import roles
from tests.factories import make_user

pytestmark = pytest.mark.django_db

User = get_user_model()


def _new(**fields) -> dict:
    data = {
        "username": "sam",
        "first_name": "Sam",
        "last_name": "Example",
        "email": "sam@test.example",
        "role": roles.TECHNICIAN,
        "send_link": "on",
    }
    data.update(fields)
    return data


def _urls(member) -> list[tuple[str, str]]:
    """(method, url) of every staff page."""
    return [
        ("get", reverse("staff_list")),
        ("get", reverse("staff_new")),
        ("post", reverse("staff_new")),
        ("get", reverse("staff_detail", args=[member.pk])),
        ("post", reverse("staff_role", args=[member.pk])),
        ("post", reverse("staff_active", args=[member.pk])),
        ("post", reverse("staff_password_link", args=[member.pk])),
    ]


def _superuser():
    return User.objects.create_superuser("root", "root@test.example", "pw-root-1")


# ---- who may ----


def test_anonymous_is_sent_to_sign_in(anon_client, technician):
    for method, url in _urls(technician):
        response = getattr(anon_client, method)(url)
        assert response.status_code == 302, url
        assert "/login/" in response["Location"]


@pytest.mark.parametrize("client_name", ["technician_client", "lead_client"])
def test_technicians_and_leads_do_not_manage_staff(request, client_name, technician):
    client = request.getfixturevalue(client_name)
    for method, url in _urls(technician):
        data = _new(role=roles.OFFICE, active="0")
        assert getattr(client, method)(url, data if method == "post" else None).status_code == 403
    technician.refresh_from_db()
    assert technician.is_active
    assert roles.role_names(technician) == [roles.TECHNICIAN]
    assert not User.objects.filter(username="sam").exists()
    assert not mail.outbox


def test_the_header_links_to_staff_only_for_those_who_manage_it(office_client, lead_client):
    assert reverse("staff_list") in office_client.get(reverse("job_list")).content.decode()
    assert reverse("staff_list") not in lead_client.get(reverse("job_list")).content.decode()


def test_the_admin_link_is_only_for_those_who_can_see_something_there(
    office_client, lead_client, technician_client
):
    admin_url = reverse("admin:index")
    assert admin_url in office_client.get(reverse("job_list")).content.decode()
    assert admin_url not in lead_client.get(reverse("job_list")).content.decode()
    assert admin_url not in technician_client.get(reverse("job_list")).content.decode()


# ---- list ----


def test_office_lists_staff_with_their_role_and_state(office_client, technician, lead):
    lead.is_active = False
    lead.save()
    body = office_client.get(reverse("staff_list")).content.decode()
    assert technician.username in body and lead.username in body
    assert "Technician" in body and "Lead" in body and "Office" in body
    assert "Deactivated" in body


# ---- add ----


def test_office_adds_a_staff_member_with_a_role(office_client):
    response = office_client.post(reverse("staff_new"), _new())
    member = User.objects.get(username="sam")
    assert response.status_code == 302
    assert response["Location"] == reverse("staff_detail", args=[member.pk])
    assert roles.role_names(member) == [roles.TECHNICIAN]
    assert member.email == "sam@test.example"
    assert member.is_active
    assert not member.is_staff and not member.is_superuser
    # No password until they choose one through the link.
    assert not member.has_usable_password()
    assert len(mail.outbox) == 1
    assert mail.outbox[0].to == ["sam@test.example"]


def test_a_new_office_user_reaches_the_admin_and_a_lead_does_not(office_client):
    office_client.post(reverse("staff_new"), _new(username="ola", role=roles.OFFICE))
    office_client.post(reverse("staff_new"), _new(username="lee", role=roles.LEAD))
    assert User.objects.get(username="ola").is_staff
    assert not User.objects.get(username="lee").is_staff


def test_office_cannot_make_superuser_or_staff_flags(office_client):
    data = _new(is_superuser="on", is_staff="on", groups="1", user_permissions="1")
    office_client.post(reverse("staff_new"), data)
    member = User.objects.get(username="sam")
    assert not member.is_superuser
    assert not member.is_staff
    assert not member.user_permissions.exists()
    assert list(member.groups.values_list("name", flat=True)) == [roles.TECHNICIAN]


def test_office_cannot_set_a_password_for_someone(office_client):
    office_client.post(reverse("staff_new"), _new(password="chosen-by-office-1", password1="x"))
    member = User.objects.get(username="sam")
    assert not member.has_usable_password()
    assert not member.check_password("chosen-by-office-1")


@pytest.mark.parametrize(
    ("fields", "field", "message"),
    [
        ({"username": "SAM"}, "username", "There is already a staff member called SAM."),
        ({"username": "sam smith"}, "username", "Enter a valid username"),
        ({"email": "not-an-address"}, "email", "Enter a valid email address."),
        ({"role": "Superuser"}, "role", "Select a valid choice."),
    ],
)
def test_bad_entries_are_shown_beside_the_field_and_nothing_is_saved(
    office_client, fields, field, message
):
    make_user(roles.LEAD, username="sam")
    before = User.objects.count()
    response = office_client.post(reverse("staff_new"), _new(**fields))
    body = response.content.decode()
    assert response.status_code == 200
    assert f'id="id_{field}_error"' in body
    assert message in body
    assert User.objects.count() == before
    assert not mail.outbox


# ---- change role ----


def test_office_changes_a_role(office_client, technician):
    url = reverse("staff_role", args=[technician.pk])
    response = office_client.post(url, {"role": roles.LEAD})
    assert response.status_code == 302
    technician.refresh_from_db()
    assert roles.role_names(technician) == [roles.LEAD]
    assert not technician.is_staff
    office_client.post(url, {"role": roles.OFFICE})
    technician.refresh_from_db()
    assert roles.role_names(technician) == [roles.OFFICE]
    assert technician.is_staff  # office reads records in the admin
    office_client.post(url, {"role": roles.TECHNICIAN})
    technician.refresh_from_db()
    assert not technician.is_staff


def test_office_cannot_change_its_own_role(office_client, office):
    response = office_client.post(reverse("staff_role", args=[office.pk]), {"role": roles.LEAD})
    assert response.status_code == 200
    assert "You cannot change your own role" in response.content.decode()
    assert roles.role_names(office) == [roles.OFFICE]


def test_an_unknown_role_is_an_error_beside_the_field(office_client, technician):
    url = reverse("staff_role", args=[technician.pk])
    response = office_client.post(url, {"role": "Administrator"})
    assert 'id="id_role_error"' in response.content.decode()
    assert roles.role_names(technician) == [roles.TECHNICIAN]


# ---- deactivate ----


def test_office_deactivates_and_reactivates(office_client, technician, technician_client):
    url = reverse("staff_active", args=[technician.pk])
    assert office_client.post(url, {"active": "0"}).status_code == 302
    technician.refresh_from_db()
    assert not technician.is_active
    # Their open session ends with it: the next page asks them to sign in.
    assert technician_client.get(reverse("job_list")).status_code == 302
    assert office_client.post(url, {"active": "1"}).status_code == 302
    technician.refresh_from_db()
    assert technician.is_active


def test_office_cannot_deactivate_self(office_client, office):
    response = office_client.post(reverse("staff_active", args=[office.pk]), {"active": "0"})
    assert response.status_code == 200
    assert "You cannot deactivate your own account" in response.content.decode()
    office.refresh_from_db()
    assert office.is_active


@pytest.mark.parametrize("value", ["", "yes", "2", "true"])
def test_a_tampered_active_value_is_a_bad_request(office_client, technician, value):
    response = office_client.post(reverse("staff_active", args=[technician.pk]), {"active": value})
    assert response.status_code == 400
    technician.refresh_from_db()
    assert technician.is_active


# ---- superusers ----


def test_office_cannot_touch_a_superuser(office_client):
    root = _superuser()
    detail = office_client.get(reverse("staff_detail", args=[root.pk])).content.decode()
    assert "only a superuser can change it" in detail
    posts = [
        (reverse("staff_role", args=[root.pk]), {"role": roles.TECHNICIAN}),
        (reverse("staff_active", args=[root.pk]), {"active": "0"}),
        (reverse("staff_password_link", args=[root.pk]), {}),
    ]
    for url, data in posts:
        response = office_client.post(url, data)
        assert response.status_code == 403, url
        assert "Only a superuser" in response.content.decode()
    root.refresh_from_db()
    assert root.is_active and root.is_superuser and not root.groups.exists()
    assert not mail.outbox


def test_a_superuser_manages_staff_too(technician):
    client = Client()
    client.force_login(_superuser())
    assert client.get(reverse("staff_list")).status_code == 200
    client.post(reverse("staff_role", args=[technician.pk]), {"role": roles.LEAD})
    assert roles.role_names(technician) == [roles.LEAD]


# ---- password-set link ----


def test_office_sends_a_link_that_lets_the_member_set_a_password(office_client, anon_client):
    office_client.post(reverse("staff_new"), _new(send_link=""))
    member = User.objects.get(username="sam")
    assert not mail.outbox
    response = office_client.post(reverse("staff_password_link", args=[member.pk]))
    assert response.status_code == 302
    assert len(mail.outbox) == 1
    message = mail.outbox[0]
    assert message.to == ["sam@test.example"]
    assert "sam" in message.body
    link = re.search(r"https?://[^/\s]+(/account/set-password/\S+)", message.body).group(1)
    # The link redirects once to a token-free address (Django hides the token from logs).
    form_url = anon_client.get(link)["Location"]
    page = anon_client.get(form_url)
    assert "Set your password" in page.content.decode()
    new_password = "a-long-new-password-2026"
    data = {"new_password1": new_password, "new_password2": new_password}
    done = anon_client.post(form_url, data)
    assert done["Location"] == reverse("password_reset_complete")
    member.refresh_from_db()
    assert member.check_password(new_password)
    # The link works once.
    assert "no longer works" in anon_client.get(link, follow=True).content.decode()


def test_no_link_for_a_member_without_an_email_or_deactivated(office_client):
    silent = make_user(roles.TECHNICIAN, email="")
    response = office_client.post(reverse("staff_password_link", args=[silent.pk]))
    assert "no e-mail address" in response.content.decode()
    gone = make_user(roles.TECHNICIAN, email="gone@test.example", is_active=False)
    response = office_client.post(reverse("staff_password_link", args=[gone.pk]))
    assert "Reactivate" in response.content.decode()
    assert not mail.outbox


def test_a_link_goes_only_to_the_chosen_member(office_client):
    # Two accounts sharing an address: the link names and reaches one of them only.
    chosen = make_user(roles.TECHNICIAN, email="shared@test.example")
    make_user(roles.LEAD, email="shared@test.example")
    office_client.post(reverse("staff_password_link", args=[chosen.pk]))
    assert len(mail.outbox) == 1
    assert chosen.username in mail.outbox[0].body


# ---- the log ----


def test_staff_changes_are_logged(office_client, technician, caplog):
    with caplog.at_level("WARNING", logger="security"):
        office_client.post(reverse("staff_new"), _new())
        office_client.post(reverse("staff_role", args=[technician.pk]), {"role": roles.LEAD})
        office_client.post(reverse("staff_active", args=[technician.pk]), {"active": "0"})
    logged = " ".join(r.getMessage() for r in caplog.records if r.name == "security")
    for event in ["staff_create", "staff_password_link", "staff_role", "staff_deactivate"]:
        assert f"event={event}" in logged, event
    assert "who=office" in logged
