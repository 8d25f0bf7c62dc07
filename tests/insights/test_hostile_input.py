"""Hostile and careless input on the pages that read the shop's records back: the insight
pages' period and filters (and their CSV), the shop rule form and its retirement, the
re-checks due list, the staff pages and the password change.

The founders' rule on bad input: never a server error or a traceback, markup escaped,
a refused post says why beside the field, nothing saved changes. Runs on SQLite and
PostgreSQL."""

from __future__ import annotations

import pytest
from django.contrib.auth import get_user_model
from django.forms.models import model_to_dict
from django.urls import reverse
from hypothesis import given
from hypothesis import strategies as st

from tests.hostile_web import (
    FUZZ,
    assert_sane,
    client_for,
    fuzz_form,
    fuzz_query,
    hostile_values,
    world_scope,
)

pytestmark = pytest.mark.django_db


@pytest.fixture(scope="module")
def world(django_db_setup, django_db_blocker):
    with world_scope(django_db_blocker) as built:
        yield built


@pytest.fixture
def lead(world):
    return client_for(world.lead)


@pytest.fixture
def office(world):
    return client_for(world.office)


FILTERS = ["start", "end", "by", "format", "kind", "stud_size", "wrench", "tech", "page", "q"]


@pytest.mark.parametrize(
    "name", ["insights_loosening", "insights_wrenches", "insights_technicians", "shop_rules"]
)
@pytest.mark.parametrize("csv", [False, True], ids=["page", "csv"])
def test_no_period_or_filter_of_an_insight_page_gives_a_server_error(name, csv, world, lead):
    """Any start, end or filter (as the page or as its CSV): an answer, never a 500."""
    page = reverse(name) + ("?format=csv" if csv else "")

    @FUZZ
    @given(key=st.sampled_from(FILTERS), value=hostile_values, other=hostile_values)
    def get_one(key: str, value: str, other: str) -> None:
        params = {key: value, "end" if key == "start" else "start": other}
        if csv:
            params["format"] = "csv"
        answer = lead.get(reverse(name), params)
        assert_sane(answer, value + other)
        assert answer.status_code in (200, 400), answer.status_code

    get_one()
    assert_sane(lead.get(page))


def test_shop_rule_form_refuses_hostile_fields(world, lead):
    fuzz_form(
        lead,
        reverse("shop_rules"),
        fill={"text": "Check the lug faces", "device_kind": "busbar"},
        # A rule must apply to something: emptying one filter is refused on the first.
        related={name: ("device_kind",) for name in ("mounting", "stud_size", "termination_kind")},
    )


@pytest.mark.parametrize("pk", ["0", "9223372036854775807", "9223372036854775808", "9" * 30])
def test_retiring_no_such_rule_is_a_plain_404(pk, world, lead):
    answer = lead.post(f"/insights/rules/{pk}/retire/", {"confirm": "yes"})
    assert_sane(answer)
    assert answer.status_code == 404


def test_no_filter_of_the_rechecks_list_gives_a_server_error(world, office):
    fuzz_query(office, reverse("rechecks_due"), ["window", "reminded", "q", "format", "page"])


# --- staff pages and the password -----------------------------------------------------


def _person_snapshot(world):
    return lambda: model_to_dict(
        get_user_model().objects.get(pk=world.tech.pk), exclude=["last_login"]
    )


def test_new_staff_form_refuses_hostile_fields(world, office):
    fuzz_form(
        office,
        reverse("staff_new"),
        fill={
            "username": "newperson",
            "first_name": "New",
            "last_name": "Person",
            "email": "new.person@test.example",
        },
    )


def test_staff_role_refuses_hostile_roles_and_keeps_the_person(world, office):
    page = reverse("staff_detail", args=[world.tech.pk])
    fuzz_form(office, page, action="/role/", snapshot=_person_snapshot(world))


def test_staff_active_refuses_hostile_values_without_a_change(world, office):
    target = reverse("staff_active", args=[world.tech.pk])

    @FUZZ
    @given(value=hostile_values)
    def post_one(value: str) -> None:
        saved = _person_snapshot(world)()
        answer = office.post(target, {"active": value})
        assert_sane(answer, value)
        if answer.status_code == 400:
            assert _person_snapshot(world)() == saved

    post_one()


def test_password_change_refuses_hostile_fields(world):
    from tests.inspections.factories import PASSWORD

    fuzz_form(
        client_for(world.tech),
        reverse("password_change"),
        fill={
            "old_password": PASSWORD,
            "new_password1": "lantern-harbour-copper-41",
            "new_password2": "lantern-harbour-copper-41",
        },
        snapshot=_person_snapshot(world),
        # Django reports a mismatch, and a weak new password, beside the second box.
        related={"new_password1": ("new_password2",)},
    )


@FUZZ
@given(uid=hostile_values, token=hostile_values)
def test_no_set_password_link_gives_a_server_error(uid, token, world):
    from urllib.parse import quote

    address = f"/account/set-password/{quote(uid or 'x', safe='')}/{quote(token or 'x', safe='')}/"
    answer = client_for(world.office).get(address)
    assert_sane(answer, uid + token)


@pytest.mark.parametrize("agent", ["a\x00b", "x" * 5000, "<script>alert(1)</script>"], ids=repr)
def test_a_wrong_password_with_a_hostile_browser_header_is_a_plain_refusal(agent, world):
    """The sign-in throttle logs each failure with the browser's header; a NUL in it
    (PostgreSQL refuses NUL) or a very long one is still a plain refusal, not a 500."""
    from django.test import Client

    answer = Client().post(
        reverse("login"),
        {"username": world.tech.username, "password": "wrong"},
        HTTP_USER_AGENT=agent,
    )
    assert_sane(answer, agent)
    assert answer.status_code in (200, 400, 403, 429)
