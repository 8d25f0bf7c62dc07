"""The job in a real browser, the owner's part, on a phone (390 x 844, touch): the private
link the office made opens the record's page without an account, the PDF downloads, and
the downloaded file passes `verify_record` (issued by this shop, unchanged since). The
page passes axe and does not scroll sideways."""

from __future__ import annotations

import datetime
import io
from contextlib import redirect_stdout

import pytest
from django.core.management import call_command
from django.utils import timezone
from playwright.sync_api import expect

from inspections.services import job_approve
from tests.browser.helpers import assert_accessible
from tests.browser.scenario import (
    PASSWORD,
    PHONE,
    issue_record,
    off_the_loop,
    retorqued,
    shots,
    small_system,
)
from tests.inspections.factories import signature
from wiring.models import OwnerLinkVisit
from wiring.services import owner_link_create, owner_link_url

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def _verify(path) -> str:
    out = io.StringIO()
    with redirect_stdout(out):
        call_command("verify_record", str(path), stdout=out)
    return out.getvalue()


def test_owner_opens_the_private_link_on_a_phone_and_the_pdf_verifies(
    live_server, browser, technician, lead, office, signing_key, evidence_cleared, tmp_path
):
    job = retorqued(small_system(technician=technician, lead=lead), technician=technician)
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    revision = issue_record(job, lead=lead)
    link, token = owner_link_create(
        job=job, by=office, expires_on=timezone.localdate() + datetime.timedelta(days=30)
    )

    context = browser.new_context(
        viewport=PHONE, has_touch=True, is_mobile=True, accept_downloads=True
    )
    try:
        page = context.new_page()
        page.goto(owner_link_url(token, live_server.url))
        expect(page.get_by_role("heading", level=1)).to_contain_text("Wiring record of your")
        assert page.evaluate("document.scrollingElement.scrollWidth") <= PHONE["width"]
        assert_accessible(page, "owner record page")
        shots(page, "17-owner-phone")

        with page.expect_download() as info:
            page.get_by_role("link", name=f"Download PDF of revision {revision.number}").tap()
        download = info.value
        path = tmp_path / download.suggested_filename
        download.save_as(path)
    finally:
        context.close()

    assert path.read_bytes()[:5] == b"%PDF-"
    verdict = off_the_loop(_verify, path)  # exits 1 (SystemExit) for anything but a good record
    assert "unchanged since it was signed" in verdict
    assert OwnerLinkVisit.objects.filter(link=link).count() >= 1
