"""The signing gates, enforced in the services whatever the page sends: each refuses
listing every unmet condition in plain words, then allows once they are met; the signer
types their own password; the roles hold."""

from __future__ import annotations

import datetime

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.utils import timezone

from circuits.services import waiver_create
from inspections.models import AuditEvent, ChecklistMark, SignOff, Stage, TorqueWrench
from inspections.services import (
    checklist_item_mark,
    send_back_note,
    stage_blockers,
    stage_send_back,
    thermal_reading_create,
    thermal_waive,
)
from tests.factories import make_user
from tests.inspections.factories import (
    PASSWORD,
    latest_stage,
    log_soaked_run,
    make_spec_circuit,
    mark_all,
    new_key,
    read,
    read_all,
    sign,
    signature,
    through_install,
)

pytestmark = pytest.mark.django_db


@pytest.fixture
def assigned(job, technician):
    job.technicians.add(technician)
    return technician


def _stage_errors(exc_info) -> list[str]:
    return exc_info.value.message_dict.get("stage", [])


def _errors(exc_info) -> dict[str, str]:
    return {field: " ".join(messages) for field, messages in exc_info.value.message_dict.items()}


# --- first install ------------------------------------------------------------------------


def test_first_install_refuses_listing_every_unmet_condition_then_signs(
    install, job, circuit, terminations, wrench, assigned
):
    low, *others = terminations
    read(low, install, "7", technician=assigned, wrench=wrench)  # 30 % low
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned)
    messages = _stage_errors(exc_info)
    assert any(m.startswith("3 terminations not read yet at first install:") for m in messages)
    assert any(f"{low} is out of tolerance: 7 N·m is low" in m for m in messages)
    assert any(m.startswith("4 checklist items not marked yet") for m in messages)
    assert not SignOff.objects.exists()
    assert Stage.objects.get(pk=install.pk).state == Stage.State.OPEN

    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    signoff = sign(install, assigned)
    assert (signoff.kind, signoff.signer, signoff.role) == ("first_install", assigned, "technician")
    assert signoff.meaning == "installed and torqued"
    assert Stage.objects.get(pk=install.pk).state == Stage.State.SIGNED
    assert latest_stage(job, Stage.Kind.HEAT_CYCLE).state == Stage.State.OPEN


def test_a_wrong_password_is_refused_and_the_stage_stays_open(
    install, job, wrench, circuit, assigned
):
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    for password in ("not-my-password", "", None):
        with pytest.raises(ValidationError) as exc_info:
            sign(install, assigned, password=password)
        assert "not your password" in _errors(exc_info)["password"]
    assert not SignOff.objects.exists()
    assert latest_stage(job, Stage.Kind.FIRST_INSTALL).state == Stage.State.OPEN


def test_someone_elses_password_does_not_sign_for_them(install, wrench, circuit, assigned, lead):
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    other = make_user("Technician")
    other.set_password("the-other-password")
    other.save()
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned, password="the-other-password")
    assert "password" in exc_info.value.message_dict


def test_a_wrong_password_and_unmet_conditions_are_listed_together(install, circuit, assigned):
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned, password="wrong", signature_png="")
    assert {"password", "signature", "stage"} <= set(exc_info.value.message_dict)


def test_an_office_user_cannot_sign_a_technicians_stage(install, circuit, office):
    with pytest.raises(PermissionDenied):
        sign(install, office)


def test_a_technician_not_assigned_to_the_job_cannot_sign_it(install, circuit, wrench, technician):
    read_all(install, technician=technician, wrench=wrench)
    mark_all(install, by=technician)
    with pytest.raises(ValidationError) as exc_info:
        sign(install, technician)
    assert "not assigned to job" in _errors(exc_info)["user"]


def test_a_lead_who_did_the_work_signs_as_lead(install, circuit, wrench, lead):
    read_all(install, technician=lead, wrench=wrench)
    mark_all(install, by=lead)
    assert sign(install, lead).role == SignOff.Role.LEAD


def test_a_reading_made_with_a_wrench_whose_calibration_was_recalled_blocks(
    install, circuit, wrench, assigned
):
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    # The office learns the wrench was out of calibration since last week.
    recalled = timezone.localdate() - datetime.timedelta(days=7)
    TorqueWrench.objects.filter(pk=wrench.pk).update(calibration_due=recalled)
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned)
    calibration = [m for m in _stage_errors(exc_info) if "whose calibration was due" in m]
    assert len(calibration) == 4 and "7 days before the reading" in calibration[0]


def test_a_failed_checklist_item_blocks_until_marked_again(install, circuit, wrench, assigned):
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    key = f"circuit:{circuit.pk}:labels"
    checklist_item_mark(
        stage=install,
        item_key=key,
        result="fail",
        note="No label at the far end",
        by=assigned,
        client_key=new_key(),
    )
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned)
    assert any("is marked fail (No label at the far end)" in m for m in _stage_errors(exc_info))
    checklist_item_mark(
        stage=install, item_key=key, result="pass", by=assigned, client_key=new_key()
    )
    assert sign(install, assigned).pk
    assert ChecklistMark.objects.filter(item_key=key).count() == 3


def test_an_unwaived_blocking_finding_blocks_first_install_until_a_lead_waives_it(
    install, job, wrench, assigned, lead
):
    make_spec_circuit(job, protection_a=60)  # PROTECTION_ABOVE_AMPACITY: blocking
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned)
    (message,) = _stage_errors(exc_info)
    assert message.startswith("Blocking finding on ") and "not waived" in message
    finding_subject = message.removeprefix("Blocking finding on ").split(" is open")[0]
    waiver_create(
        job=job,
        code="PROTECTION_ABOVE_AMPACITY",
        subject=finding_subject,
        reason="Fuse sized for the inverter surge per the device manual",
        lead=lead,
    )
    assert sign(install, assigned).pk


def test_a_job_without_a_system_cannot_sign_its_first_install(install, assigned):
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned)
    assert "no terminations recorded" in " ".join(_stage_errors(exc_info))


def test_a_signed_stage_is_not_signed_again(install, job, circuit, wrench, technician):
    through_install(job, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as exc_info:
        sign(install, technician)
    assert "is signed; only an open stage is signed" in " ".join(_stage_errors(exc_info))


def test_the_heat_cycle_and_handover_are_not_signed_on_the_pad(stages, technician):
    for kind, words in (
        (Stage.Kind.HEAT_CYCLE, "logging its run"),
        (Stage.Kind.HANDOVER, "approval"),
    ):
        with pytest.raises(ValidationError) as exc_info:
            sign(stages[kind], technician)
        assert words in " ".join(_stage_errors(exc_info))


def test_a_bad_signature_image_is_refused(install, circuit, wrench, assigned):
    read_all(install, technician=assigned, wrench=wrench)
    mark_all(install, by=assigned)
    with pytest.raises(ValidationError) as exc_info:
        sign(install, assigned, signature_png="data:image/png;base64,bm90IGEgcG5n")
    assert "not a PNG" in _errors(exc_info)["signature"]


# --- heat-cycle run and retorque ----------------------------------------------------------


@pytest.fixture
def installed(job, circuit, wrench, technician):
    through_install(job, technician=technician, wrench=wrench)
    return job


def test_logging_the_run_signs_the_heat_cycle_stage_and_opens_the_retorque(installed, technician):
    log_soaked_run(installed, technician)
    assert latest_stage(installed, Stage.Kind.HEAT_CYCLE).state == Stage.State.SIGNED
    assert latest_stage(installed, Stage.Kind.RETORQUE).state == Stage.State.OPEN


def test_retorque_refuses_before_the_run_and_during_the_soak_then_after_every_reread(
    installed, wrench, technician
):
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    assert "No heat-cycle run is logged yet" in " ".join(stage_blockers(retorque))
    log_soaked_run(installed, technician, minutes_ago=30)  # soak 120 minutes
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    with pytest.raises(ValidationError) as exc_info:
        sign(retorque, technician)
    messages = _stage_errors(exc_info)
    assert messages[0].startswith("The soak after the heat-cycle run lasts until")
    assert "90 minutes left" in messages[0]
    assert any(m.startswith("4 terminations not read again at retorque yet") for m in messages)
    with pytest.raises(ValidationError) as exc_info:  # readings wait for the soak too
        read(
            installed.circuits.get().terminations.first(),
            retorque,
            "10",
            technician=technician,
            wrench=wrench,
        )
    assert "minutes left" in _errors(exc_info)["stage"]


def test_retorque_signs_after_the_soak_with_every_termination_reread(installed, wrench, technician):
    log_soaked_run(installed, technician)
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    first, *rest = installed.circuits.get().terminations.order_by("pk")
    read(first, retorque, "10", found_loose=True, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as exc_info:
        sign(retorque, technician)
    assert _stage_errors(exc_info)[0].startswith("3 terminations not read again at retorque")
    for termination in rest:
        read(termination, retorque, "10", technician=technician, wrench=wrench)
    signoff = sign(retorque, technician)
    assert signoff.meaning == "retorqued after heat cycle"
    assert latest_stage(installed, Stage.Kind.HANDOVER).state == Stage.State.OPEN


def test_a_hot_connection_blocks_the_retorque_until_read_cooler_or_waived_by_a_lead(
    installed, wrench, technician, lead
):
    run = log_soaked_run(installed, technician)  # ambient 20 °C
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    hot = installed.circuits.get().terminations.order_by("pk").first()
    reading = thermal_reading_create(
        run=run, termination=hot, temperature_c="48", by=technician, client_key=new_key()
    )  # 28 °C over ambient: monitor until corrected (ANSI/NETA MTS, from memory)
    with pytest.raises(ValidationError) as exc_info:
        sign(retorque, technician)
    (message,) = _stage_errors(exc_info)
    assert f"{hot} was 48 °C after the heat-cycle run" in message
    with pytest.raises(PermissionDenied):
        thermal_waive(reading=reading, lead=technician, reason="Looks fine to me really")
    with pytest.raises(ValidationError) as exc_info:
        thermal_waive(reading=reading, lead=lead, reason="ok")
    assert "reason" in exc_info.value.message_dict
    waiver = thermal_waive(
        reading=reading, lead=lead, reason="Lug re-made and checked by hand; re-read next visit"
    )
    assert AuditEvent.objects.filter(kind="waiver_granted", subject_id=str(waiver.pk)).exists()
    assert sign(retorque, technician).pk


def test_a_hot_connection_read_again_cooler_clears_without_a_waiver(installed, wrench, technician):
    run = log_soaked_run(installed, technician)
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    hot = installed.circuits.get().terminations.order_by("pk").first()
    for celsius in ("48", "24"):
        thermal_reading_create(
            run=run, termination=hot, temperature_c=celsius, by=technician, client_key=new_key()
        )
    assert sign(retorque, technician).pk


def test_only_a_blocking_latest_reading_is_waived(installed, technician, lead):
    run = log_soaked_run(installed, technician)
    termination = installed.circuits.get().terminations.first()
    cool = thermal_reading_create(
        run=run, termination=termination, temperature_c="22", by=technician, client_key=new_key()
    )
    with pytest.raises(ValidationError) as exc_info:
        thermal_waive(reading=cool, lead=lead, reason="Nothing to see here at all")
    assert "does not block" in _errors(exc_info)["reading"]


def test_readings_made_before_a_new_run_do_not_count_for_the_retorque(
    installed, wrench, technician, lead
):
    log_soaked_run(installed, technician)
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    read_all(retorque, technician=technician, wrench=wrench)
    heat = latest_stage(installed, Stage.Kind.HEAT_CYCLE)
    stage_send_back(stage=heat, lead=lead, note="Run it again at the full design load")
    assert latest_stage(installed, Stage.Kind.RETORQUE).state == Stage.State.NOT_STARTED
    # The new run ends now: the readings above were made before its soak ends, and count
    # for nothing (each is listed to be read again).
    log_soaked_run(installed, technician, minutes_ago=0)
    retorque = latest_stage(installed, Stage.Kind.RETORQUE)
    messages = [m for m in stage_blockers(retorque) if "before the soak ended" in m]
    assert len(messages) == 4


# --- sending back -------------------------------------------------------------------------


def test_a_lead_sends_a_signed_stage_back_with_a_note_and_later_stages_reset(
    installed, technician, lead
):
    log_soaked_run(installed, technician)
    install = latest_stage(installed, Stage.Kind.FIRST_INSTALL)
    heat = latest_stage(installed, Stage.Kind.HEAT_CYCLE)
    with pytest.raises(ValidationError) as exc_info:
        stage_send_back(stage=install, lead=lead, note="redo")
    assert "at least 10 characters" in _errors(exc_info)["note"]
    stage_send_back(stage=heat, lead=lead, note="Peak current too low to count as a run")
    stage_send_back(stage=install, lead=lead, note="Labels on D-01 face the wrong way round")
    states = {s.kind: s.state for s in installed.stages.all()}
    assert states == {
        Stage.Kind.FIRST_INSTALL: Stage.State.SENT_BACK,
        Stage.Kind.HEAT_CYCLE: Stage.State.NOT_STARTED,
        Stage.Kind.RETORQUE: Stage.State.NOT_STARTED,
        Stage.Kind.HANDOVER: Stage.State.NOT_STARTED,
    }
    assert send_back_note(install) == "Labels on D-01 face the wrong way round"
    events = AuditEvent.objects.filter(kind=AuditEvent.Kind.SENT_BACK)
    assert events.filter(subject_id=str(install.pk), before__state="signed").exists()


def test_a_technician_cannot_send_a_stage_back(installed, technician):
    install = latest_stage(installed, Stage.Kind.FIRST_INSTALL)
    with pytest.raises(PermissionDenied):
        stage_send_back(stage=install, lead=technician, note="I would like to redo it")


def test_only_a_signed_stage_is_sent_back(install, lead):
    with pytest.raises(ValidationError) as exc_info:
        stage_send_back(stage=install, lead=lead, note="Nothing to send back yet")
    assert "Only a signed stage is sent back" in _errors(exc_info)["stage"]


def test_a_stage_sent_back_and_done_again_is_signed_again(installed, wrench, technician, lead):
    install = latest_stage(installed, Stage.Kind.FIRST_INSTALL)
    stage_send_back(stage=install, lead=lead, note="Check the fuse rating again please")
    install = latest_stage(installed, Stage.Kind.FIRST_INSTALL)
    assert sign(install, technician, password=PASSWORD, signature_png=signature()).pk
    assert latest_stage(installed, Stage.Kind.HEAT_CYCLE).state == Stage.State.OPEN
    assert SignOff.objects.filter(kind="first_install").count() == 2
