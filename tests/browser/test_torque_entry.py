"""On a tablet, a technician records readings in two units, corrects one that was out of
tolerance, and a reading saved while the server cannot be reached waits in the browser's
storage (through a reload) and arrives exactly once when the connection returns."""

from __future__ import annotations

import re

import pytest
from django.urls import reverse
from playwright.sync_api import expect

from circuits.models import Termination
from inspections.models import TorqueRecord
from tests.factories import make_job
from tests.inspections.factories import make_spec_circuit, make_wrench

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]

SYNC = "**/readings/sync/**"


def _walk(job) -> list[Termination]:
    # Both devices at walking order 0 walk by name; within a device by tag, end, polarity.
    circuit = job.circuits.get()
    ends = sorted(
        circuit.terminations.all(),
        key=lambda t: (t.device.name, t.end, t.polarity, t.conductor_index),
    )
    return ends


def test_readings_in_two_units_a_correction_and_one_saved_offline(
    live_server, sign_in, technician, evidence_cleared
):
    job = make_job(technicians=[technician])
    make_spec_circuit(job, tag="M-01")  # four ends at 10 N·m ±10 %
    make_wrench(code="TW-01")
    first, second, third, fourth = _walk(job)
    page = sign_in(technician.username)
    base = live_server.url

    page.goto(base + reverse("stage_work", args=[job.number]))
    expect(page.locator("[data-progress]")).to_have_text(
        "0 of 4 terminations read, 0 out of tolerance"
    )
    page.locator(f"#termination-{first.pk} a").tap()

    # 1: 10 N·m, within tolerance; the next termination opens with the result shown.
    page.get_by_label("Reading").fill("10")
    page.get_by_role("button", name="Save reading").tap()
    result = page.locator(".tq-result")
    expect(result).to_contain_text("Within tolerance: 10 N·m", timeout=5000)
    expect(page).to_have_url(re.compile(rf"/terminations/{second.pk}/torque/"))

    # 2: in lbf·in; the spec follows the unit: 10 N·m / 0.1129848 = 88.51 lbf·in
    # (NIST SP 811, B.9), accepted 79.66–97.36 at ±10 %.
    page.get_by_label("Unit").select_option(label="lbf·in")
    expect(page.locator("[data-spec-in-unit]")).to_have_text("88.51 lbf·in (accepted 79.66–97.36)")
    page.get_by_label("Reading").fill("88.5")
    page.get_by_role("button", name="Save reading").tap()
    expect(result).to_contain_text("Within tolerance: 88.5 lbf·in", timeout=5000)

    # 3: the unit is remembered; 120 lbf·in is 13.56 N·m, above 11 N·m: high.
    expect(page.get_by_label("Unit")).to_have_value("lbf*in")
    page.get_by_label("Reading").fill("120")
    page.get_by_role("button", name="Save reading").tap()
    expect(result).to_contain_text("High by 31.49 lbf·in", timeout=5000)
    result.get_by_role("link", name="Correct this reading").tap()
    page.get_by_label("Correct value").fill("90")
    page.get_by_label("Why is it corrected?").fill("typed 120 for 90")
    page.get_by_role("button", name="Save the correction").tap()
    expect(result).to_contain_text("Within tolerance: 90 lbf·in", timeout=5000)

    # 4: the server cannot be reached; the reading waits on the tablet.
    page.goto(base + reverse("torque_entry", args=[job.number, fourth.pk]))
    page.route(SYNC, lambda route: route.abort())
    page.get_by_label("Reading").fill("10.2")
    page.get_by_label("Unit").select_option(label="N·m")
    page.get_by_role("button", name="Save reading").tap()
    badge = page.locator("[data-pending-count]")
    expect(badge).to_have_text("1 pending", timeout=5000)
    expect(page.locator("[data-entry-status]")).to_contain_text("Saved on this tablet")
    assert not TorqueRecord.objects.filter(termination=fourth).exists()

    page.reload()
    expect(badge).to_have_text("1 pending", timeout=5000)
    assert not TorqueRecord.objects.filter(termination=fourth).exists()

    # The connection returns: the browser says so, and the queue is sent.
    page.unroute(SYNC)
    page.evaluate("window.dispatchEvent(new Event('online'))")
    expect(badge).to_be_hidden(timeout=5000)
    expect(page.locator("[data-entry-status]")).to_contain_text("Sent:")
    assert TorqueRecord.objects.filter(termination=fourth).count() == 1
    assert TorqueRecord.objects.filter(termination=third).count() == 2  # reading + correction
    assert TorqueRecord.objects.count() == 5

    page.goto(base + reverse("stage_work", args=[job.number]))
    expect(page.locator("[data-progress]")).to_have_text(
        "4 of 4 terminations read, 0 out of tolerance"
    )
    expect(page.locator("[data-pending-count]")).to_be_hidden()


def test_a_reading_whose_answer_was_lost_is_sent_again_and_stored_once(
    live_server, sign_in, technician, evidence_cleared
):
    job = make_job(technicians=[technician])
    make_spec_circuit(job, tag="M-01")
    make_wrench(code="TW-01")
    first = _walk(job)[0]
    page = sign_in(technician.username)
    page.goto(live_server.url + reverse("torque_entry", args=[job.number, first.pk]))

    def deliver_then_drop(route):
        route.fetch()  # the server stores the reading...
        route.abort()  # ...and its answer never reaches the tablet

    page.route(SYNC, deliver_then_drop)
    page.get_by_label("Reading").fill("10")
    page.get_by_role("button", name="Save reading").tap()
    badge = page.locator("[data-pending-count]")
    expect(page.locator("[data-entry-status]")).to_contain_text("Saved on this tablet")
    expect(badge).to_have_text("1 pending")
    assert TorqueRecord.objects.filter(termination=first).count() == 1

    page.unroute(SYNC)
    page.evaluate("window.dispatchEvent(new Event('online'))")
    expect(badge).to_be_hidden(timeout=5000)
    assert TorqueRecord.objects.filter(termination=first).count() == 1
