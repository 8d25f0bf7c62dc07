"""The job in a real browser, the lead's part, on a tablet (820 x 1180): the review queue
lists the job whose retorque is signed; the lead waives its voltage-drop warning with a
reason, sends the retorque back once, and approves when it is signed again; the signed
record is rendered with its progress shown. Every page passes axe."""

from __future__ import annotations

import re

import pytest
from django.urls import reverse
from playwright.sync_api import expect

from circuits.models import Waiver
from inspections.models import AuditEvent, SignOff, Stage
from tests.browser.helpers import assert_accessible, finger_stroke
from tests.browser.scenario import PASSWORD, retorqued, shots, small_system
from tests.inspections.factories import sign
from wiring.models import RecordRevision

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def test_lead_waives_sends_back_once_and_approves(
    live_server, sign_in, technician, lead, signing_key, evidence_cleared
):
    job = retorqued(small_system(technician=technician, lead=lead), technician=technician)
    base = live_server.url
    page = sign_in(lead.username)

    page.get_by_role("link", name="Review").first.tap()
    expect(page).to_have_url(base + reverse("review_queue"))
    card = page.locator(".queue-card", has_text=job.number)
    expect(card).to_be_visible()
    expect(card.locator(".sg-count", has_text="Open findings").locator("dd")).to_have_text("1")
    assert_accessible(page, "review queue")
    shots(page, "12-review-queue")

    card.get_by_role("link", name="Review").tap()
    expect(page).to_have_url(base + reverse("job_review", args=[job.number]))
    assert_accessible(page, "job review")
    shots(page, "13-job-review")

    # The 15 m run's voltage drop is a warning, named by word and shape; the lead accepts
    # it with a reason.
    finding = page.locator("li.finding", has_text="Voltage drop")
    expect(finding).to_contain_text("Warning")
    finding.get_by_text("Waive this finding").tap()
    finding.get_by_label("Reason for accepting it").fill(
        "Distribution bus feeds lighting only; owner accepts dimming under full load."
    )
    assert_accessible(page, "job review, waiving")
    finding.get_by_role("button", name="Waive").tap()
    expect(finding).to_contain_text("Waived by Test Lead")
    assert Waiver.objects.filter(job=job).count() == 1

    # The retorque goes back once, with a note the technicians read.
    page.goto(base + reverse("job_review", args=[job.number]))
    retorque_row = page.locator("li.review-item", has_text="Retorque").first
    retorque_row.get_by_role("link", name="Send back…").tap()
    expect(page).to_have_url(base + reverse("stage_send_back", args=[job.number, 3]))
    assert_accessible(page, "send back")
    page.get_by_label(re.compile("What is to be done")).fill("Photograph each lug after retorque.")
    page.get_by_role("button", name="Send back").tap()
    expect(page).not_to_have_url(re.compile(r"/send-back/"))
    stage = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    assert stage.state == Stage.State.SENT_BACK
    sent_back = AuditEvent.objects.filter(job=job, kind=AuditEvent.Kind.SENT_BACK)
    assert sent_back.filter(summary__startswith="Retorque sent back").count() == 1

    # The technician signs it again (through the service, as from their tablet).
    sign(stage, technician)

    # Approval with a finger signature; the record page renders and signs the record with
    # its progress shown, then lists revision 1.
    page.goto(base + reverse("job_approve", args=[job.number]))
    expect(page.locator("#blockers")).to_contain_text("Nothing blocks approval")
    assert_accessible(page, "approve")
    finger_stroke(page, page.locator("canvas.sigpad-canvas"))
    page.get_by_label("Your own password").fill(PASSWORD)
    shots(page, "14-approve")
    page.get_by_role("button", name="Approve and lock the job").tap()
    expect(page).to_have_url(base + reverse("revision_list", args=[job.number]))
    progress = page.locator("#record-progress")
    expect(progress).to_be_visible()
    expect(progress).to_contain_text("Rendering and signing the record")
    assert_accessible(page, "record being issued")
    shots(page, "15-record-progress")
    latest = page.locator("table.record-revisions tbody tr").first
    expect(latest).to_contain_text("latest", timeout=60_000)
    expect(progress).to_be_hidden()
    assert_accessible(page, "record issued")
    shots(page, "16-record-issued")

    assert SignOff.objects.filter(job=job, kind=SignOff.Kind.APPROVAL).count() == 1
    assert RecordRevision.objects.filter(job=job).count() == 1
