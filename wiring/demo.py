"""The demo's signed records: each approved demo job gets the signed wiring record of its
latest approval, signed with a demo key made on first use (its certificate says it is a
demo key, and so does every record it signs). Idempotent: a job whose approval already has
its record is left alone (wiring.services.record_issue issues one revision per approval).
"""

from __future__ import annotations

import logging

from django.core.exceptions import ValidationError

from inspections.services import job_is_locked
from shop.models import ShopProfile
from wiring import signing
from wiring.services import record_issue

log = logging.getLogger(__name__)


def load(*, jobs) -> list[str]:
    """Issue the records of the approved ones among `jobs` (the demo's own jobs only);
    returns the numbers of the jobs whose record was issued or already there."""
    issued = []
    for job in jobs:
        if not job_is_locked(job):
            continue
        signing.ensure_demo_key(shop_name=ShopProfile.load().name)
        try:
            record_issue(job=job, by=None)
        except ValidationError as exc:  # changed since its approval: left for a lead
            log.warning("demo record of %s not issued: %s", job.number, " ".join(exc.messages))
            continue
        issued.append(job.number)
    return issued
