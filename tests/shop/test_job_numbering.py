"""Job numbers: shop prefix + year + sequence, unique, sequential, never reused."""

from __future__ import annotations

import pytest
from django.db import IntegrityError
from django.utils import timezone

from shop.models import Job, ShopProfile
from tests.factories import make_job, make_vehicle

pytestmark = pytest.mark.django_db


def _year() -> int:
    return timezone.localdate().year


def test_numbers_are_prefix_year_and_a_padded_sequence():
    profile = ShopProfile.load()
    profile.job_prefix = "TST"
    profile.save()
    first, second = make_job(), make_job()
    assert first.number == f"TST-{_year()}-0001"
    assert second.number == f"TST-{_year()}-0002"


def test_a_deleted_jobs_number_is_never_reused():
    vehicle = make_vehicle()
    make_job(vehicle)
    last = make_job(vehicle)
    last_number = last.number
    last.delete()
    replacement = make_job(vehicle)
    assert replacement.number != last_number
    assert replacement.number.endswith("-0003")


def test_numbers_are_unique_in_the_database():
    job = make_job()
    clash = Job(vehicle=job.vehicle, title="Copy", number=job.number)
    with pytest.raises(IntegrityError):
        clash.save()


def test_each_prefix_counts_on_its_own():
    make_job()
    profile = ShopProfile.load()
    profile.job_prefix = "NEW"
    profile.save()
    assert make_job().number == f"NEW-{_year()}-0001"


def test_job_number_is_not_editable_in_forms():
    assert not Job._meta.get_field("number").editable
