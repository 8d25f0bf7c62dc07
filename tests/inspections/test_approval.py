"""Handover: the lead's approval (lead only, after the retorque sign-off, with what each
sign-off covers unchanged) locks the job; every inspections write refuses while locked; a
reopen needs a reason and is in the trail; the owner's receipt closes the job."""

from __future__ import annotations

import pytest
from django.core.exceptions import PermissionDenied, ValidationError

from circuits.models import Circuit
from inspections.models import AuditEvent, SignOff, Stage
from inspections.services import (
    checklist_item_mark,
    handover_receive,
    heat_cycle_log,
    job_approve,
    job_is_locked,
    job_reopen,
    stage_send_back,
    thermal_reading_create,
    torque_record_correct,
)
from tests.inspections.factories import (
    PASSWORD,
    approved,
    latest_stage,
    make_spec_circuit,
    new_key,
    read,
    sign,
    signature,
    through_install,
    through_retorque,
)

pytestmark = pytest.mark.django_db


def _approve(job, lead, **kwargs):
    kwargs.setdefault("password", PASSWORD)
    kwargs.setdefault("signature_png", signature())
    return job_approve(job=job, lead=lead, **kwargs)


def _errors(exc_info) -> dict[str, str]:
    return {field: " ".join(messages) for field, messages in exc_info.value.message_dict.items()}


@pytest.fixture
def retorqued(job, circuit, wrench, technician):
    through_install(job, technician=technician, wrench=wrench)
    through_retorque(job, technician=technician, wrench=wrench)
    return job


@pytest.fixture
def approved_job(job, circuit, wrench, technician, lead):
    approved(job, technician=technician, lead=lead, wrench=wrench)
    return job


# --- approval -----------------------------------------------------------------------------


def test_approval_refuses_before_the_retorque_is_signed_listing_why(
    job, circuit, wrench, technician, lead
):
    through_install(job, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as exc_info:
        _approve(job, lead)
    assert exc_info.value.message_dict["stage"] == [
        "The retorque stage is not started; it must be signed before approval."
    ]
    assert not job_is_locked(job)


def test_the_lead_approves_after_the_retorque_and_the_job_is_locked(retorqued, lead):
    signoff = _approve(retorqued, lead)
    assert (signoff.kind, signoff.role, signoff.meaning) == (
        "approval",
        "lead",
        "reviewed and approved",
    )
    assert job_is_locked(retorqued)
    event = AuditEvent.objects.get(kind=AuditEvent.Kind.APPROVAL)
    assert event.before["locked"] is False and event.after["locked"] is True


def test_a_technician_cannot_approve(retorqued, technician):
    with pytest.raises(PermissionDenied):
        _approve(retorqued, technician)


def test_an_office_user_cannot_approve(retorqued, office):
    with pytest.raises(PermissionDenied):
        _approve(retorqued, office)


def test_approval_needs_the_leads_own_password_and_a_drawn_signature(retorqued, lead):
    with pytest.raises(ValidationError) as exc_info:
        _approve(retorqued, lead, password="guess", signature_png="")
    assert set(exc_info.value.message_dict) == {"password", "signature"}
    assert not job_is_locked(retorqued)


def test_approval_refuses_when_a_signed_stage_no_longer_matches_what_it_covers(retorqued, lead):
    make_spec_circuit(retorqued)  # a circuit added after both stages were signed
    with pytest.raises(ValidationError) as exc_info:
        _approve(retorqued, lead)
    messages = exc_info.value.message_dict["stage"]
    assert len(messages) == 2
    assert all("no longer matches what it covers" in m for m in messages)


def test_a_job_is_approved_once(approved_job, lead):
    with pytest.raises(ValidationError) as exc_info:
        _approve(approved_job, lead)
    assert "This job was approved on" in _errors(exc_info)["job"]


# --- the lock -----------------------------------------------------------------------------


def test_every_inspections_write_refuses_while_the_job_is_locked(
    approved_job, wrench, technician, lead
):
    install = latest_stage(approved_job, Stage.Kind.FIRST_INSTALL)
    retorque = latest_stage(approved_job, Stage.Kind.RETORQUE)
    termination = approved_job.circuits.get().terminations.first()
    record = retorque.torque_records.first()
    run = approved_job.heat_cycle_runs.get()
    attempts = [
        lambda: read(termination, retorque, "10", technician=technician, wrench=wrench),
        lambda: torque_record_correct(
            record=record,
            value="10.2",
            unit="N*m",
            wrench=wrench,
            technician=technician,
            reason="typed 10 for 10.2 on the pad",
            client_key=new_key(),
        ),
        lambda: checklist_item_mark(
            stage=install,
            item_key=f"circuit:{termination.circuit_id}:labels",
            result="pass",
            by=technician,
            client_key=new_key(),
        ),
        lambda: heat_cycle_log(
            job=approved_job,
            start=run.started_at,
            end=run.ended_at,
            peak_current_a="100",
            ambient_c="20",
            by=technician,
        ),
        lambda: thermal_reading_create(
            run=run,
            termination=termination,
            temperature_c="25",
            by=technician,
            client_key=new_key(),
        ),
        lambda: stage_send_back(stage=retorque, lead=lead, note="One more look at D-01"),
    ]
    events = AuditEvent.objects.count()
    for attempt in attempts:
        with pytest.raises(ValidationError) as exc_info:
            attempt()
        assert "a lead must reopen it first" in _errors(exc_info)["job"]
    assert AuditEvent.objects.count() == events


def test_a_reopen_needs_a_lead_and_a_reason_and_is_in_the_trail(approved_job, technician, lead):
    with pytest.raises(PermissionDenied):
        job_reopen(job=approved_job, lead=technician, reason="I want to change a lug")
    with pytest.raises(ValidationError) as exc_info:
        job_reopen(job=approved_job, lead=lead, reason="fix")
    assert "at least 10 characters" in _errors(exc_info)["reason"]
    assert job_is_locked(approved_job)
    handover = job_reopen(
        job=approved_job, lead=lead, reason="Owner asked for a second USB outlet on D-04"
    )
    assert handover.state == Stage.State.REOPENED and not job_is_locked(approved_job)
    event = AuditEvent.objects.get(kind=AuditEvent.Kind.REOPEN)
    assert event.actor == lead
    assert event.after["reason"] == "Owner asked for a second USB outlet on D-04"
    assert (event.before["locked"], event.after["locked"]) == (True, False)


def test_a_job_that_is_not_approved_is_not_reopened(retorqued, lead):
    with pytest.raises(ValidationError) as exc_info:
        job_reopen(job=retorqued, lead=lead, reason="Nothing to reopen at all")
    assert "not approved" in _errors(exc_info)["job"]


def test_after_a_reopen_work_is_sent_back_redone_and_approved_again(
    approved_job, wrench, technician, lead
):
    job_reopen(job=approved_job, lead=lead, reason="D-01 lug replaced after a drop test")
    retorque = latest_stage(approved_job, Stage.Kind.RETORQUE)
    stage_send_back(stage=retorque, lead=lead, note="Re-read D-01 after the new lug")
    assert latest_stage(approved_job, Stage.Kind.HANDOVER).state == Stage.State.NOT_STARTED
    termination = approved_job.circuits.get().terminations.order_by("pk").first()
    read(termination, retorque, "10.5", technician=technician, wrench=wrench)
    sign(latest_stage(approved_job, Stage.Kind.RETORQUE), technician)
    assert _approve(approved_job, lead).pk and job_is_locked(approved_job)
    assert SignOff.objects.filter(kind="approval").count() == 2


# --- the owner's receipt ------------------------------------------------------------------


def test_the_owners_receipt_closes_the_job(approved_job, lead):
    receipt = handover_receive(
        job=approved_job, printed_name="Sam Owner", signature_png=signature(), by=lead
    )
    approval = SignOff.objects.get(kind="approval")
    assert (receipt.signer, receipt.role, receipt.printed_name) == (None, "owner", "Sam Owner")
    assert receipt.meaning == "received by the owner"
    # Receipt and approval cover the same content: the owner received what was approved.
    assert receipt.content_sha256 == approval.content_sha256
    approved_job.refresh_from_db()
    assert approved_job.status == "handed_over" and approved_job.handed_over_on is not None
    event = AuditEvent.objects.get(kind=AuditEvent.Kind.RECEIVED)
    assert event.actor == lead and "Sam Owner" in event.summary


def test_the_owner_signs_only_after_approval_and_only_once(retorqued, lead):
    with pytest.raises(ValidationError) as exc_info:
        handover_receive(job=retorqued, printed_name="Sam Owner", signature_png=signature())
    assert "not approved yet" in _errors(exc_info)["job"]
    _approve(retorqued, lead)
    handover_receive(job=retorqued, printed_name="Sam Owner", signature_png=signature())
    with pytest.raises(ValidationError) as exc_info:
        handover_receive(job=retorqued, printed_name="Sam Owner", signature_png=signature())
    assert "already signed for receipt" in _errors(exc_info)["job"]


def test_the_owner_types_a_name_and_draws_a_signature(approved_job):
    with pytest.raises(ValidationError) as exc_info:
        handover_receive(job=approved_job, printed_name=" ", signature_png="data:text/plain,hi")
    assert set(exc_info.value.message_dict) == {"printed_name", "signature"}
    assert not SignOff.objects.filter(kind="receipt").exists()


def test_the_owner_does_not_sign_a_record_changed_since_approval(approved_job):
    # A circuit made far thinner behind the lock's back, straight in the database (every
    # service refuses while the job is locked): its findings, and so the content, change.
    Circuit.objects.filter(job=approved_job).update(conductor_size="18")
    with pytest.raises(ValidationError) as exc_info:
        handover_receive(job=approved_job, printed_name="Sam Owner", signature_png=signature())
    assert "changed since it was approved" in _errors(exc_info)["job"]
