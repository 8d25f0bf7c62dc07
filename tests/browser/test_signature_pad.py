"""The signing pad on a tablet with touch: a finger drawn across the canvas signs the
stage (the PNG it sends passes the server's checks), and a cleared pad signs nothing."""

from __future__ import annotations

import io

import pytest
from django.urls import reverse
from PIL import Image
from playwright.sync_api import expect

from inspections.models import SignOff, Stage
from tests.browser.helpers import finger_stroke
from tests.factories import make_job
from tests.inspections.factories import (
    PASSWORD,
    latest_stage,
    make_spec_circuit,
    make_wrench,
    mark_all,
    read_all,
)
from tests.inspections.guards import clear_evidence

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


@pytest.fixture
def ready_job(transactional_db, technician):
    """A first install with every end read and every item marked; clears the evidence
    afterwards (the append-only triggers refuse the runner's flush)."""
    job = make_job()
    make_spec_circuit(job)
    job.technicians.add(technician)
    install = latest_stage(job, Stage.Kind.FIRST_INSTALL)
    read_all(install, technician=technician, wrench=make_wrench())
    mark_all(install, by=technician)
    yield job
    clear_evidence()


def test_a_technician_signs_with_a_finger(live_server, sign_in, technician, ready_job):
    page = sign_in(technician.username)
    page.goto(live_server.url + reverse("stage_sign", args=[ready_job.number, 1]))
    canvas = page.locator("canvas.sigpad-canvas")
    box = canvas.bounding_box()
    # Big enough for a finger signature: the card's full width, 220 px tall.
    assert box["width"] >= 700 and box["height"] >= 200
    assert (
        page.locator(".sigpad-nojs").count() == 0 or not page.locator(".sigpad-nojs").is_visible()
    )
    finger_stroke(page, canvas)
    expect(page.locator("[data-signature-state]")).to_have_text("Signature drawn.")
    page.get_by_label("Your own password").fill(PASSWORD)
    page.get_by_role("button", name="Sign: installed and torqued").tap()
    expect(page).to_have_url(live_server.url + ready_job.get_absolute_url())

    signoff = SignOff.objects.get(job=ready_job, kind=SignOff.Kind.FIRST_INSTALL)
    assert signoff.signer == technician
    with Image.open(io.BytesIO(bytes(signoff.signature_png))) as image:
        assert image.format == "PNG"
        assert image.width >= 700 and image.height >= 200


def test_a_cleared_pad_signs_nothing(live_server, sign_in, technician, ready_job):
    page = sign_in(technician.username)
    page.goto(live_server.url + reverse("stage_sign", args=[ready_job.number, 1]))
    finger_stroke(page, page.locator("canvas.sigpad-canvas"))
    page.get_by_role("button", name="Clear").tap()
    expect(page.locator("[data-signature-state]")).to_have_text("Nothing drawn yet.")
    page.get_by_label("Your own password").fill(PASSWORD)
    page.get_by_role("button", name="Sign: installed and torqued").tap()
    expect(page.locator("#signature_error")).to_contain_text("no signature was drawn")
    assert not SignOff.objects.filter(job=ready_job).exists()
