"""A job's four stages: created once each, in order, first install open."""

from __future__ import annotations

import pytest
from django.db import IntegrityError

from inspections.models import Stage
from inspections.services import stages_ensure

pytestmark = pytest.mark.django_db


def test_a_job_gets_four_stages_in_order_with_first_install_open(job):
    stages = stages_ensure(job=job)
    assert [(s.kind, s.state) for s in stages] == [
        (Stage.Kind.FIRST_INSTALL, Stage.State.OPEN),
        (Stage.Kind.HEAT_CYCLE, Stage.State.NOT_STARTED),
        (Stage.Kind.RETORQUE, Stage.State.NOT_STARTED),
        (Stage.Kind.HANDOVER, Stage.State.NOT_STARTED),
    ]
    assert stages[0].opened_at is not None and stages[1].opened_at is None


def test_ensuring_stages_again_changes_nothing(job):
    first = stages_ensure(job=job)
    Stage.objects.filter(pk=first[0].pk).update(state=Stage.State.SIGNED)
    again = stages_ensure(job=job)
    assert [s.pk for s in again] == [s.pk for s in first]
    assert again[0].state == Stage.State.SIGNED


def test_the_database_keeps_one_stage_per_job_and_kind(job):
    stages_ensure(job=job)
    with pytest.raises(IntegrityError):
        Stage.objects.create(job=job, kind=Stage.Kind.RETORQUE)
