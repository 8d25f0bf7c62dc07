"""The demo's inspections work: the demo jobs stand at different stages with realistic
records, all written through the services; loading twice changes nothing, and a job
whose scenario cannot be played is left as it was."""

from __future__ import annotations

import datetime
import io
from decimal import Decimal

import pytest
from django.apps import apps
from django.contrib.auth import get_user_model
from django.core.management import call_command
from django.test import TestCase
from django.utils import timezone

from inspections import demo_history
from inspections.models import (
    HeatCycleRun,
    SignOff,
    Stage,
    ThermalReading,
    TorqueRecord,
    TorqueWrench,
)
from inspections.services import (
    current_readings,
    job_is_locked,
    job_status_for,
    signoff_is_current,
    soak_remaining,
    stage_send_back,
    thermal_results,
    thermal_unwaived,
    torque_progress,
)
from shop import roles
from shop.models import Job
from tests.factories import make_user

pytestmark = pytest.mark.django_db

VAN = "Full electrical build: lithium bank, solar, inverter/charger"
MOTORHOME = "48 V system with 230 V inverter/charger"
TRUCK = "24 V house system for the box body"
BOAT = "Replace house bank and rewire the DC panel"
RETROFIT = "Retrofit: add second solar string"
COMPACT_BUILD, ADD_ON, RETURN_TITLE = (
    demo_history.COMPACT_BUILD,
    demo_history.ADD_ON,
    demo_history.RETURN_TITLE,
)


def _demo() -> None:
    call_command("demo", stdout=io.StringIO())


def _job(title: str) -> Job:
    return Job.objects.get(title=title)


def _stage(title: str, kind: int) -> Stage:
    return Stage.objects.select_related("job").get(job__title=title, kind=kind)


def _counts() -> dict[str, int]:
    return {
        model.__name__: model.objects.count()
        for model in apps.get_app_config("inspections").get_models()
    }


def test_running_the_demo_twice_changes_no_inspections_record():
    _demo()
    before = _counts()
    stages = list(Stage.objects.order_by("pk").values())
    _demo()
    assert _counts() == before
    assert list(Stage.objects.order_by("pk").values()) == stages


def test_a_job_moved_on_since_is_left_alone():
    _demo()
    lead = get_user_model().objects.get(username="june")
    install = _stage(TRUCK, Stage.Kind.FIRST_INSTALL)
    stage_send_back(stage=install, lead=lead, note="Re-check the fridge circuit's fuse rating.")
    before = _counts()
    states = dict(Stage.objects.filter(job=install.job).values_list("kind", "state"))
    _demo()
    assert _counts() == before
    assert dict(Stage.objects.filter(job=install.job).values_list("kind", "state")) == states


def test_a_scenario_that_cannot_be_played_leaves_its_job_untouched():
    # A technician named like the demo's, with a password of their own: the demo cannot
    # sign as them, so the jobs they sign are not worked; the rest load.
    make_user(roles.TECHNICIAN, username="tessa")
    _demo()
    motorhome = _job(MOTORHOME)
    assert motorhome.status == Job.Status.INSTALL
    assert not TorqueRecord.objects.filter(stage__job=motorhome).exists()
    assert _job(TRUCK).status == Job.Status.RETORQUE
    assert _job(RETROFIT).status == Job.Status.HANDED_OVER


class TestTheLoadedDemo(TestCase):
    """The demo loaded once for the checks that only read it (loading takes seconds)."""

    @classmethod
    def setUpTestData(cls) -> None:
        _demo()

    def test_the_demo_jobs_are_spread_over_the_stages(self) -> None:
        statuses = {job.title: job.status for job in Job.objects.all()}
        assert statuses == {
            VAN: Job.Status.INSTALL,
            MOTORHOME: Job.Status.RETORQUE,  # run logged, waiting out the soak
            TRUCK: Job.Status.RETORQUE,
            BOAT: Job.Status.APPROVED,
            RETROFIT: Job.Status.HANDED_OVER,
            # The shop's history (inspections.demo_history) and the compact van back.
            COMPACT_BUILD: Job.Status.HANDED_OVER,
            ADD_ON: Job.Status.HANDED_OVER,
            RETURN_TITLE: Job.Status.RECHECK,
        }
        # Every stored status is the one the stages give (none was set by hand).
        for job in Job.objects.all():
            assert job_status_for(job) == job.status, job.title

    def test_the_van_is_mid_first_install(self) -> None:
        install = _stage(VAN, Stage.Kind.FIRST_INSTALL)
        progress = torque_progress(install)
        assert 0 < progress.read < progress.total
        assert progress.out_of_tolerance == 1  # the stud that turns in its housing, still low
        # One reading typed wrongly and corrected with a reason; one low, put right, read again.
        [correction] = TorqueRecord.objects.filter(stage=install, supersedes__isnull=False)
        assert correction.supersedes.result == TorqueRecord.Result.HIGH
        assert correction.result == TorqueRecord.Result.WITHIN
        assert "Typed" in correction.correction_reason
        low = TorqueRecord.objects.get(stage=install, result="low", note__contains="paint")
        reread = current_readings(install)[low.termination_id]
        assert reread.result == TorqueRecord.Result.WITHIN
        assert install.state == Stage.State.OPEN

    def test_the_motorhome_waits_out_its_soak(self) -> None:
        job = _job(MOTORHOME)
        left = soak_remaining(job)
        assert left is not None and left > datetime.timedelta(0)
        assert _stage(MOTORHOME, Stage.Kind.FIRST_INSTALL).state == Stage.State.SIGNED
        assert _stage(MOTORHOME, Stage.Kind.RETORQUE).state == Stage.State.OPEN
        assert not TorqueRecord.objects.filter(stage__job=job, stage__kind=Stage.Kind.RETORQUE)

    def test_the_retorque_job_has_two_found_loose_and_one_hot_connection(self) -> None:
        job = _job(TRUCK)
        retorque = _stage(TRUCK, Stage.Kind.RETORQUE)
        assert torque_progress(retorque).found_loose == 2
        [hot] = thermal_unwaived(job)
        # 34.6 °C at 18 °C ambient: 16.6 °C over ambient, a probable deficiency (ANSI/NETA MTS
        # thermographic survey table, 11–20 °C over ambient; from memory).
        assert hot.reading.temperature_c == Decimal("34.6")
        assert hot.thermal_class.name == "PROBABLE"
        assert sum(r.blocks_retorque for r in thermal_results(job).values()) == 1
        # The hot connection was one of the two found loose at retorque.
        assert TorqueRecord.objects.filter(
            stage=retorque, found_loose=True, termination=hot.reading.termination
        ).exists()

    def test_the_approved_and_handed_over_jobs_are_signed_and_locked(self) -> None:
        for title in (BOAT, RETROFIT):
            job = _job(title)
            assert job_is_locked(job)
            for signoff in SignOff.objects.filter(job=job):
                assert signoff_is_current(signoff), (title, signoff.kind)
                assert signoff.signature_png[:8] == b"\x89PNG\r\n\x1a\n"
        receipt = SignOff.objects.get(job=_job(RETROFIT), kind=SignOff.Kind.RECEIPT)
        assert receipt.printed_name == _job(RETROFIT).vehicle.owner.name
        assert not SignOff.objects.filter(job=_job(BOAT), kind=SignOff.Kind.RECEIPT).exists()

    def test_readings_are_realistic_mixed_units_past_times_calibrated_wrenches(self) -> None:
        now = timezone.now()
        records = TorqueRecord.objects.select_related("wrench")
        assert {"N*m", "lbf*in"} <= set(records.values_list("unit", flat=True))
        overdue = TorqueWrench.objects.filter(calibration_due__lt=timezone.localdate())
        assert overdue.count() == 1 and not records.filter(wrench__in=overdue).exists()
        for record in records:
            assert record.recorded_at < now
            assert not record.wrench.days_overdue(timezone.localdate(record.recorded_at))
        # Near the spec: every reading within ±25 % of it, the planted slips aside.
        planted = records.filter(note__gt="") | records.filter(supersedes__isnull=False)
        for record in records.exclude(pk__in=planted.values("pk")).exclude(
            pk__in=TorqueRecord.objects.filter(supersedes__isnull=False).values("supersedes")
        ):
            assert 0.9 <= record.value_nm / record.spec_nm <= 1.1, record
        for run in HeatCycleRun.objects.all():
            assert run.started_at < run.ended_at < now
        assert ThermalReading.objects.exists()


class TestTheDemoHistory(TestCase):
    """The shop's history (inspections.demo_history): approvals over past months, and the
    compact van back for its yearly check, its re-check partly recorded."""

    @classmethod
    def setUpTestData(cls) -> None:
        _demo()

    def test_history_jobs_were_approved_months_ago(self) -> None:
        now = timezone.now()
        ages = sorted(
            round((now - signoff.signed_at).days)
            for signoff in SignOff.objects.filter(
                kind=SignOff.Kind.APPROVAL, job__title__in=[COMPACT_BUILD, ADD_ON]
            )
        )
        # 4 months, 8 months, 11½ months, 13 months (inspections.demo_history.ADD_ONS).
        assert len(ages) == 4 and ages[0] >= 115 and ages[-1] >= 390
        for job in Job.objects.filter(title__in=[COMPACT_BUILD, ADD_ON]):
            assert job_is_locked(job)
            for signoff in SignOff.objects.filter(job=job):
                assert signoff_is_current(signoff), (job.number, signoff.kind)
                assert signoff.signed_at < now

    def test_the_compact_van_is_back_for_its_yearly_re_check(self) -> None:
        from inspections.models import PriorRecord
        from inspections.services.return_visit import last_readings

        visit = _job(RETURN_TITLE)
        earlier = _job(COMPACT_BUILD)
        assert visit.kind == Job.Kind.RETURN_VISIT and visit.follows_id == earlier.pk
        assert PriorRecord.objects.get(job=visit).job_number == earlier.number
        recheck = _stage(RETURN_TITLE, Stage.Kind.RECHECK)
        progress = torque_progress(recheck)
        assert 0 < progress.read < progress.total  # partly recorded
        assert progress.found_loose == 2 and "2 found loose again" in str(progress)
        assert len(last_readings(visit)) == progress.total

    def test_the_insight_and_re_check_pages_show_the_history(self) -> None:
        from django.test import Client

        client = Client()
        client.force_login(get_user_model().objects.get(username="june"))
        for url in ("/insights/loosening/", "/insights/wrenches/", "/insights/technicians/"):
            assert client.get(url).status_code == 200, url
        page = client.get("/rechecks/").content.decode()
        assert "Overdue" in page and _job(RETURN_TITLE).number in page
