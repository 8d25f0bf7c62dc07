"""The job's status is driven by its stages: each service that moves a stage sets it, in
the same transaction, and nothing else does."""

from __future__ import annotations

import pytest
from django.core.exceptions import ValidationError

from inspections.models import Stage
from inspections.services import (
    handover_receive,
    job_approve,
    job_reopen,
    job_status_for,
    job_status_sync,
    stage_send_back,
    stages_ensure,
)
from shop.models import Job
from tests.factories import make_job
from tests.inspections.factories import (
    PASSWORD,
    latest_stage,
    log_soaked_run,
    mark_all,
    read_all,
    sign,
    signature,
    through_install,
    through_retorque,
)

pytestmark = pytest.mark.django_db


def _status(job) -> str:
    return Job.objects.get(pk=job.pk).status


def test_a_new_job_starts_in_first_install_and_one_without_stages_is_booked():
    job = make_job()  # job_create gives a new job its four stages
    assert _status(job) == Job.Status.INSTALL
    Stage.objects.filter(job=job).delete()
    job_status_sync(job=job)
    assert _status(job) == Job.Status.BOOKED
    stages_ensure(job=job)
    assert _status(job) == Job.Status.INSTALL


def test_the_status_follows_the_stages_from_install_to_handed_over(
    job, circuit, wrench, technician, lead
):
    stages_ensure(job=job)
    through_install(job, technician=technician, wrench=wrench)
    assert _status(job) == Job.Status.HEAT_CYCLE
    log_soaked_run(job, technician)
    assert _status(job) == Job.Status.RETORQUE
    retorque = latest_stage(job, Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    assert _status(job) == Job.Status.HANDOVER
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    assert _status(job) == Job.Status.APPROVED
    handover_receive(job=job, printed_name="Sam Owner", signature_png=signature())
    assert _status(job) == Job.Status.HANDED_OVER


def test_a_retorque_waiting_out_its_soak_counts_as_retorque(job, circuit, wrench, technician):
    through_install(job, technician=technician, wrench=wrench)
    log_soaked_run(job, technician, minutes_ago=10)
    assert _status(job) == Job.Status.RETORQUE


def test_sending_a_stage_back_moves_the_status_back(job, circuit, wrench, technician, lead):
    through_install(job, technician=technician, wrench=wrench)
    through_retorque(job, technician=technician, wrench=wrench)
    stage_send_back(
        stage=latest_stage(job, Stage.Kind.FIRST_INSTALL),
        lead=lead,
        note="Colours on D-01 do not match the schedule",
    )
    assert _status(job) == Job.Status.INSTALL


def test_a_reopen_sets_the_job_back_to_awaiting_approval(job, circuit, wrench, technician, lead):
    through_install(job, technician=technician, wrench=wrench)
    through_retorque(job, technician=technician, wrench=wrench)
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    handover_receive(job=job, printed_name="Sam Owner", signature_png=signature())
    job_reopen(job=job, lead=lead, reason="Record shows the wrong fuse on D-02")
    assert _status(job) == Job.Status.HANDOVER
    # The owner's earlier receipt belongs to the earlier approval: after approving again,
    # the job is approved, not handed over, until the owner signs again.
    job_approve(job=job, lead=lead, password=PASSWORD, signature_png=signature())
    assert _status(job) == Job.Status.APPROVED


def test_a_status_set_by_hand_is_put_right_by_the_next_sync(job, stages):
    Job.objects.filter(pk=job.pk).update(status=Job.Status.APPROVED)
    assert job_status_for(job) == Job.Status.INSTALL
    job_status_sync(job=job)
    assert _status(job) == Job.Status.INSTALL


def test_a_refused_sign_off_leaves_the_status_as_it_was(job, circuit, technician):
    stages_ensure(job=job)
    job.technicians.add(technician)
    with pytest.raises(ValidationError):
        sign(latest_stage(job, Stage.Kind.FIRST_INSTALL), technician)
    assert _status(job) == Job.Status.INSTALL
