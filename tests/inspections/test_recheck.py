"""The re-check of a return visit: each connection read as found, once, before anything
is re-tightened (a reading below the band is found loose again); the re-check run for
the thermal check; the gate and its signature; the first install then re-tightens only
what was found wrong; with nothing found and no new work a lead marks the build stages
not needed and approves on the re-check.

Figures: spec 10 N·m ±10 % (the tests' device manual value at the shop's default
tolerance, common practice), so the accepted band is 9–11 N·m; 8.2 N·m is below it. The
thermal classes are inspections.thermal's (NETA temperature-rise table, from memory):
35 °C over a 20 °C ambient is a rise of 15 °C, a probable deficiency."""

from __future__ import annotations

import pytest
from django.core.exceptions import ValidationError
from django.urls import reverse

from inspections.models import SignOff, Stage, TorqueRecord
from inspections.services import (
    job_approve,
    stage_blockers,
    stage_send_back,
    thermal_reading_create,
    torque_record_correct,
)
from inspections.services.gates import skip_blockers
from inspections.services.return_visit import build_stages_skip
from inspections.views.torque_rows import work_groups
from shop.models import Job
from tests.factories import make_job
from tests.inspections.factories import PASSWORD, mark_all, new_key, read, sign, signature
from tests.inspections.return_visits import (
    approved_job,
    book,
    ends,
    log_recheck_run,
    read_as_found,
    recheck_of,
)

ALL_GOOD = ["10", "9.6", "10.4", "10"]
ONE_LOOSE = ["8.2", "10", "10", "10"]  # 8.2 N·m: below the 9–11 N·m band


@pytest.fixture
def wrench(db):
    from tests.inspections.factories import make_wrench

    return make_wrench()


@pytest.fixture
def visit(db, technician, lead, office, wrench):
    earlier = make_job()
    approved_job(earlier, technician=technician, lead=lead, wrench=wrench)
    visit = book(earlier, by=office)
    visit.technicians.add(technician)
    return visit


def _state(job, kind) -> str:
    return Stage.objects.get(job=job, kind=kind).state


def _status(job) -> str:
    return Job.objects.get(pk=job.pk).status


def signed_recheck(visit, values, *, technician, wrench):
    read_as_found(visit, values, technician=technician, wrench=wrench)
    log_recheck_run(visit, technician)
    mark_all(recheck_of(visit), by=technician)
    return sign(recheck_of(visit), technician)


def test_an_end_is_read_once_as_found(visit, technician, wrench):
    stage = recheck_of(visit)
    first = ends(visit)[0]
    read(first, stage, "8.2", technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as caught:
        read(first, stage, "10", technician=technician, wrench=wrench)
    assert "already read as found" in str(caught.value)
    assert TorqueRecord.objects.filter(stage=stage, termination=first).count() == 1


def test_a_mistyped_as_found_reading_is_corrected_not_re_read(visit, technician, wrench):
    stage = recheck_of(visit)
    record = read(ends(visit)[0], stage, "28", technician=technician, wrench=wrench)
    corrected = torque_record_correct(
        record=record,
        value="8.2",
        unit="N*m",
        wrench=wrench,
        technician=technician,
        reason="typed 28 for 8.2",
        client_key=new_key(),
    )
    assert corrected.result == TorqueRecord.Result.LOW
    assert corrected.recorded_at == record.recorded_at  # the time it was found


def test_a_resend_of_the_same_reading_is_stored_once(visit, technician, wrench):
    stage = recheck_of(visit)
    key = new_key()
    a = read(ends(visit)[0], stage, "10", technician=technician, wrench=wrench, client_key=key)
    b = read(ends(visit)[0], stage, "10", technician=technician, wrench=wrench, client_key=key)
    assert a.pk == b.pk


def test_found_loose_may_be_recorded_at_the_re_check(visit, technician, wrench):
    record = read(
        ends(visit)[0],
        recheck_of(visit),
        "10",
        technician=technician,
        wrench=wrench,
        found_loose=True,
    )
    assert record.found_loose


def test_below_the_band_as_found_is_found_loose_again_on_the_work_list(visit, technician, wrench):
    read_as_found(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    rows = [row for group in work_groups(visit, recheck_of(visit)) for row in group.rows]
    loose = [row for row in rows if row.loose_again]
    assert len(loose) == 1 and loose[0].termination == ends(visit)[0]
    assert "found loose again" in loose[0].state_words


def test_the_re_check_gate_lists_unread_ends_and_the_missing_run(visit, technician, wrench):
    blockers = stage_blockers(recheck_of(visit))
    assert any("4 terminations not read as found yet" in b for b in blockers)
    assert any("No re-check run is logged" in b for b in blockers)


def test_out_of_tolerance_as_found_does_not_block_the_re_check(visit, technician, wrench):
    # As found is a fact to record, not a fault of the re-check: it is put right later.
    read_as_found(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    log_recheck_run(visit, technician)
    mark_all(recheck_of(visit), by=technician)
    assert stage_blockers(recheck_of(visit)) == []


def test_signing_the_re_check_opens_the_first_install(visit, technician, wrench):
    assert _status(visit) == Job.Status.RECHECK
    signoff = signed_recheck(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    assert signoff.kind == SignOff.Kind.RECHECK
    assert signoff.meaning == SignOff.MEANINGS[SignOff.Kind.RECHECK]
    assert _state(visit, Stage.Kind.FIRST_INSTALL) == Stage.State.OPEN
    assert _status(visit) == Job.Status.INSTALL


def test_the_re_check_run_signs_nothing_and_starts_no_soak(visit, technician):
    from inspections.services import latest_run, soak_ends_at

    run = log_recheck_run(visit, technician)
    assert run.recheck
    assert _state(visit, Stage.Kind.HEAT_CYCLE) == Stage.State.NOT_STARTED
    assert latest_run(visit) is None and soak_ends_at(visit) is None


def test_first_install_re_tightens_only_what_was_found_wrong(visit, technician, wrench):
    signed_recheck(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    install = Stage.objects.get(job=visit, kind=Stage.Kind.FIRST_INSTALL)
    blockers = stage_blockers(install)
    loose_end = str(ends(visit)[0])
    assert any(f"1 termination not read yet at first install: {loose_end}." in b for b in blockers)
    read(ends(visit)[0], install, "10", technician=technician, wrench=wrench)
    mark_all(install, by=technician)
    assert stage_blockers(install) == []


def test_a_hot_connection_at_the_re_check_is_re_made_too(visit, technician, wrench):
    read_as_found(visit, ALL_GOOD, technician=technician, wrench=wrench)
    run = log_recheck_run(visit, technician)
    hot = ends(visit)[1]
    for termination, temperature in zip(ends(visit), ["21", "35", "21", "21"], strict=True):
        thermal_reading_create(
            run=run,
            termination=termination,
            temperature_c=temperature,
            by=technician,
            client_key=new_key(),
        )
    mark_all(recheck_of(visit), by=technician)
    sign(recheck_of(visit), technician)
    assert any(str(hot) in b and "hot at the re-check run" in b for b in skip_blockers(visit))
    install = Stage.objects.get(job=visit, kind=Stage.Kind.FIRST_INSTALL)
    assert any(str(hot) in b for b in stage_blockers(install))


def test_build_stages_cannot_be_skipped_when_something_was_found_loose(
    visit, technician, wrench, lead
):
    signed_recheck(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as caught:
        build_stages_skip(job=visit, lead=lead, reason="Nothing to do on this one.")
    assert "found loose again" in str(caught.value)
    assert _state(visit, Stage.Kind.FIRST_INSTALL) == Stage.State.OPEN


def test_nor_before_the_re_check_is_signed(visit, lead):
    with pytest.raises(ValidationError) as caught:
        build_stages_skip(job=visit, lead=lead, reason="Nothing to do on this one.")
    assert "sign it before deciding" in str(caught.value)


def test_nothing_found_and_no_new_work_approves_on_the_re_check(visit, technician, wrench, lead):
    signed_recheck(visit, ALL_GOOD, technician=technician, wrench=wrench)
    build_stages_skip(
        job=visit, lead=lead, reason="Yearly check: all within tolerance, no new work."
    )
    for kind in (Stage.Kind.FIRST_INSTALL, Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE):
        assert _state(visit, kind) == Stage.State.NOT_NEEDED
    assert _state(visit, Stage.Kind.HANDOVER) == Stage.State.OPEN
    assert _status(visit) == Job.Status.HANDOVER
    job_approve(job=visit, lead=lead, password=PASSWORD, signature_png=signature())
    assert _status(visit) == Job.Status.APPROVED


def test_a_short_reason_is_refused_and_nothing_moves(visit, technician, wrench, lead):
    signed_recheck(visit, ALL_GOOD, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as caught:
        build_stages_skip(job=visit, lead=lead, reason="ok")
    assert "reason" in caught.value.message_dict
    assert _state(visit, Stage.Kind.FIRST_INSTALL) == Stage.State.OPEN


def test_approval_needs_the_re_check_unchanged(visit, technician, wrench, lead):
    signed_recheck(visit, ALL_GOOD, technician=technician, wrench=wrench)
    build_stages_skip(job=visit, lead=lead, reason="Yearly check: all within tolerance.")
    stage_send_back(stage=recheck_of(visit), lead=lead, note="Read D-01 again, wrong wrench.")
    # The skipped stages go back to not started with the rest.
    assert _state(visit, Stage.Kind.FIRST_INSTALL) == Stage.State.NOT_STARTED
    assert _state(visit, Stage.Kind.HANDOVER) == Stage.State.NOT_STARTED
    assert _status(visit) == Job.Status.RECHECK


def test_the_skip_page_as_each_role(
    visit, technician, wrench, lead, anon_client, technician_client, lead_client
):
    url = reverse("build_stages_not_needed", args=[visit.number])
    assert anon_client.get(url).status_code == 302
    assert technician_client.get(url).status_code == 403
    page = lead_client.get(url)
    assert page.status_code == 200 and b"sign it before deciding" in page.content
    signed_recheck(visit, ALL_GOOD, technician=technician, wrench=wrench)
    response = lead_client.post(url, {"reason": "Yearly check: all within tolerance."})
    assert response.status_code == 302
    assert _state(visit, Stage.Kind.RETORQUE) == Stage.State.NOT_NEEDED


def test_the_re_check_run_page_logs_a_run_at_the_re_check(visit, technician_client):
    url = reverse("heat_cycle_log", args=[visit.number])
    page = technician_client.get(url)
    assert page.status_code == 200 and b"Re-check run" in page.content


def test_the_re_check_is_signed_on_its_page(visit, technician, wrench, technician_client):
    url = reverse("stage_sign", args=[visit.number, int(Stage.Kind.RECHECK)])
    page = technician_client.get(url)
    assert page.status_code == 200
    assert SignOff.MEANINGS[SignOff.Kind.RECHECK].encode() in page.content
    assert b"not read as found yet" in page.content  # the gate, listed under the pad


def test_a_return_visit_with_no_build_work_waits_in_the_review_queue(
    visit, technician, wrench, lead
):
    from inspections.services.review import jobs_awaiting_review

    signed_recheck(visit, ALL_GOOD, technician=technician, wrench=wrench)
    assert visit not in jobs_awaiting_review()
    build_stages_skip(job=visit, lead=lead, reason="Yearly check: all within tolerance.")
    assert visit in jobs_awaiting_review()


def test_found_loose_goes_through_re_tightening_heat_and_retorque_to_approval(
    visit, technician, wrench, lead
):
    from tests.inspections.factories import log_soaked_run, read_all

    signed_recheck(visit, ONE_LOOSE, technician=technician, wrench=wrench)
    install = Stage.objects.get(job=visit, kind=Stage.Kind.FIRST_INSTALL)
    read(ends(visit)[0], install, "10", technician=technician, wrench=wrench)
    mark_all(install, by=technician)
    sign(install, technician)
    log_soaked_run(visit, technician)
    retorque = Stage.objects.get(job=visit, kind=Stage.Kind.RETORQUE)
    assert _status(visit) == Job.Status.RETORQUE
    read_all(retorque, technician=technician, wrench=wrench)  # every end, after the soak
    mark_all(retorque, by=technician)
    sign(retorque, technician)
    approval = job_approve(job=visit, lead=lead, password=PASSWORD, signature_png=signature())
    assert _status(visit) == Job.Status.APPROVED
    # The approval covers the re-check too: its sign-off is named in what was approved.
    assert '"recheck"' in approval.content
