"""The scenario's key screens again, on a tablet turned to landscape (1180 x 820): the job
page, the work list, the torque entry and the lead's review pass axe and do not scroll
sideways; and the entry and review pages work from the keyboard alone: every control is
reached by Tab and shows a visible focus indicator when it has focus."""

from __future__ import annotations

import pytest
from django.urls import reverse
from playwright.sync_api import expect

from circuits.models import Termination
from inspections.models import Stage, TorqueWrench
from tests.browser.helpers import assert_accessible, assert_keyboard_reachable
from tests.browser.scenario import TABLET_LANDSCAPE, installed, shots, small_system
from tests.inspections.factories import log_soaked_run, read

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def _half_read(technician, lead):
    """The scenario's job with two of its four ends read at the first install, one of them
    out of tolerance, so every state of a row shows."""
    job = small_system(technician=technician, lead=lead)
    install = Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL)
    wrench = TorqueWrench.objects.get(code="TW-01")
    ends = list(Termination.objects.filter(circuit__job=job).order_by("pk"))
    read(ends[0], install, "10", technician=technician, wrench=wrench)
    read(ends[1], install, "12.5", technician=technician, wrench=wrench)  # above 11 N·m
    return job, ends


def _fits(page) -> None:
    width = page.evaluate("document.scrollingElement.scrollWidth")
    assert width <= page.viewport_size["width"], (page.url, width)


def test_key_screens_in_landscape(live_server, page, sign_in, technician, lead, evidence_cleared):
    job, ends = _half_read(technician, lead)
    base = live_server.url
    page.set_viewport_size(TABLET_LANDSCAPE)
    sign_in(technician.username)
    screens = {
        "job page": job.get_absolute_url(),
        "work list": reverse("stage_work", args=[job.number]),
        "torque entry": reverse("torque_entry", args=[job.number, ends[2].pk]),
    }
    for name, path in screens.items():
        page.goto(base + path)
        _fits(page)
        assert_accessible(page, f"landscape {name}")
        shots(page, f"landscape-{name.replace(' ', '-')}")
    # The out-of-tolerance row says so in words and a shape, not by colour alone.
    page.goto(base + reverse("stage_work", args=[job.number]))
    expect(page.locator(f"#termination-{ends[1].pk}")).to_contain_text("High")

    page.context.clear_cookies()
    sign_in(lead.username)
    page.goto(base + reverse("job_review", args=[job.number]))
    _fits(page)
    assert_accessible(page, "landscape job review")
    shots(page, "landscape-job-review")


def test_entry_and_review_work_from_the_keyboard(
    live_server, page, sign_in, technician, lead, evidence_cleared
):
    job, ends = _half_read(technician, lead)
    base = live_server.url
    sign_in(technician.username)
    page.goto(base + reverse("torque_entry", args=[job.number, ends[2].pk]))
    page.locator("details.tq-more summary").click()  # the note and photo fields too
    reached = assert_keyboard_reachable(page, "torque entry")
    names = {entry["id"] for entry in reached}
    assert {"id_value", "id_unit", "id_wrench", "id_note", "id_photo"} <= names

    # The reading is saved from the keyboard: type, Enter.
    page.get_by_label("Reading").focus()
    page.keyboard.type("10")
    page.keyboard.press("Enter")
    expect(page.locator(".tq-result")).to_contain_text("Within tolerance: 10 N·m")

    page.context.clear_cookies()
    sign_in(lead.username)
    page.goto(base + reverse("job_review", args=[job.number]))
    page.locator("details.waive summary").first.click()
    assert_keyboard_reachable(page, "job review")


def test_checklist_and_temperatures_work_from_the_keyboard(
    live_server, page, sign_in, technician, lead, evidence_cleared
):
    """Long forms with a sticky save bar: a field reached by Tab is scrolled clear of it."""
    job = installed(small_system(technician=technician, lead=lead), technician=technician)
    log_soaked_run(job, technician)
    base = live_server.url
    sign_in(technician.username)
    page.goto(base + reverse("thermal_readings", args=[job.number]))
    assert_keyboard_reachable(page, "temperatures after the run")
    page.goto(base + reverse("stage_checklist", args=[job.number, 3]))
    assert_keyboard_reachable(page, "retorque checklist")


def test_circuit_editor_works_from_the_keyboard(live_server, page, sign_in, technician, lead):
    """The editor's fields are reached by Tab and never left under its sticky summary."""
    job = small_system(technician=technician, lead=lead)
    sign_in(technician.username)
    page.goto(live_server.url + reverse("circuit_new", args=[job.number]))
    assert_keyboard_reachable(page, "circuit editor")
