"""A job has its four stages from the moment it exists, and its status follows them: a new
job stands in its first install (job_create), a job made before stages existed gets them
from inspections/0007, and no code path sets the status by hand."""

from __future__ import annotations

import importlib

import pytest
from django.apps import apps

from inspections.models import Stage
from shop.models import Job
from shop.services import job_update
from tests.factories import make_job, make_vehicle
from tests.inspections.factories import make_wrench, through_install

pytestmark = pytest.mark.django_db

MIGRATION = importlib.import_module("inspections.migrations.0007_stages_for_existing_jobs")


def _states(job) -> dict[int, str]:
    return dict(Stage.objects.filter(job=job).values_list("kind", "state"))


def test_a_new_job_has_four_stages_with_the_first_install_open():
    job = make_job()
    assert _states(job) == {
        Stage.Kind.FIRST_INSTALL: Stage.State.OPEN,
        Stage.Kind.HEAT_CYCLE: Stage.State.NOT_STARTED,
        Stage.Kind.RETORQUE: Stage.State.NOT_STARTED,
        Stage.Kind.HANDOVER: Stage.State.NOT_STARTED,
    }
    assert Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL).opened_at is not None
    assert Job.objects.get(pk=job.pk).status == Job.Status.INSTALL


def test_a_status_handed_to_job_create_is_ignored_with_a_warning():
    with pytest.warns(UserWarning, match="set by the job's stages"):
        job = make_job(make_vehicle(), status=Job.Status.APPROVED)
    assert Job.objects.get(pk=job.pk).status == Job.Status.INSTALL


def test_job_update_refuses_to_set_the_status():
    job = make_job()
    with pytest.raises(TypeError, match="never set by hand"):
        job_update(job=job, status=Job.Status.APPROVED)
    assert Job.objects.get(pk=job.pk).status == Job.Status.INSTALL


def test_editing_a_job_keeps_the_status_its_stages_set(technician):
    job = make_job()
    stale = Job.objects.get(pk=job.pk)  # read before the stage moved
    through_install(job, technician=technician, wrench=make_wrench())
    job_update(job=stale, title="Renamed while the install was signed")
    saved = Job.objects.get(pk=job.pk)
    assert saved.status == Job.Status.HEAT_CYCLE
    assert saved.title == "Renamed while the install was signed"


def test_the_migration_gives_stageless_jobs_their_stages_and_status():
    job = make_job()
    Stage.objects.filter(job=job).delete()
    Job.objects.filter(pk=job.pk).update(status=Job.Status.APPROVED)  # set by hand, before
    MIGRATION.give_stages(apps, None)
    assert _states(job)[Stage.Kind.FIRST_INSTALL] == Stage.State.OPEN
    assert len(_states(job)) == 4
    assert Job.objects.get(pk=job.pk).status == Job.Status.INSTALL


def test_the_migration_leaves_jobs_with_stages_as_they_are(technician):
    job = make_job()
    through_install(job, technician=technician, wrench=make_wrench())
    before = (_states(job), Job.objects.get(pk=job.pk).status)
    MIGRATION.give_stages(apps, None)
    MIGRATION.give_stages(apps, None)  # and running it twice changes nothing
    assert (_states(job), Job.objects.get(pk=job.pk).status) == before
    assert Stage.objects.filter(job=job).count() == 4
