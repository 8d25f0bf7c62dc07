"""Fixtures of the signed-record tests: a signing key and a media store of the test's own
(so no test touches the shop's var/), and an approved job with its first revision.
Import them into a test module with `from tests.wiring.signing_fixtures import *`."""

from __future__ import annotations

import pytest

from tests.factories import make_job
from tests.inspections.factories import approved, make_wrench
from wiring import signing
from wiring.services import record_issue

__all__ = ["approved_job", "issued", "media", "signing_key"]


@pytest.fixture
def signing_key(settings, tmp_path):
    settings.SIGNING_DIR = tmp_path / "signing"
    settings.SIGNING_TIMESTAMP_URL = ""
    return signing.create_key(shop_name="Lakeside Test Conversions")


@pytest.fixture
def media(settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path / "media"
    return settings.MEDIA_ROOT


@pytest.fixture
def approved_job(db, technician, lead):
    job = make_job(lead=lead)
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    return job


@pytest.fixture
def issued(approved_job, signing_key, media, lead):
    """Revision 1 of the approved job's record, and its signed bytes."""
    revision = record_issue(job=approved_job, by=lead)
    with revision.file.open("rb") as handle:
        data = handle.read()
    return revision, data
