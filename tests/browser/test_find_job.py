"""A technician signs in on a tablet, finds a job by its number and opens it."""

from __future__ import annotations

import re

import pytest
from playwright.sync_api import expect

from tests.factories import make_job, make_owner, make_vehicle

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def test_technician_finds_a_job_by_number_and_opens_it(live_server, sign_in, technician):
    owner = make_owner(name="Wren Browserowner")
    wanted = make_job(make_vehicle(owner), title="Lithium bank and shore inlet")
    for _ in range(3):
        make_job(title="Some other build")

    page = sign_in(technician.username)
    page.get_by_role("searchbox").fill(wanted.number)
    # htmx swaps the results in place while typing; only the wanted job remains.
    rows = page.locator("#job-results tbody tr")
    expect(rows).to_have_count(1)
    expect(page).to_have_url(re.compile(rf"q={wanted.number}"))

    page.get_by_role("link", name=wanted.number).tap()
    expect(page).to_have_url(f"{live_server.url}{wanted.get_absolute_url()}")
    expect(page.get_by_role("heading", level=1)).to_have_text("Lithium bank and shore inlet")
    expect(page.get_by_text("Wren Browserowner")).to_be_visible()


def test_touch_targets_are_at_least_44_px(live_server, sign_in, technician):
    make_job()
    page = sign_in(technician.username)
    for locator in [
        page.get_by_role("button", name="Search"),
        page.get_by_role("searchbox"),
        page.locator("a.rowlink").first,
        page.get_by_role("button", name="Sign out"),
        page.get_by_role("link", name="Change password"),
    ]:
        box = locator.bounding_box()
        assert box is not None
        assert box["height"] >= 44, locator
