"""The heat-cycle run: logged only with sensible values while its stage is open; the soak
timer counts from its end; a temperature per connection afterwards, classed, with a hot
connection blocking the retorque until it is read again cooler."""

from __future__ import annotations

import datetime
from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.utils import timezone

from inspections.models import HeatCycleRun, Stage, ThermalReading
from inspections.services import (
    heat_cycle_log,
    latest_run,
    soak_remaining,
    stage_send_back,
    thermal_blocking,
    thermal_reading_create,
    thermal_results,
)
from inspections.thermal import ThermalClass
from shop.models import ShopProfile
from tests.factories import make_job
from tests.inspections.factories import make_spec_circuit, new_key

pytestmark = pytest.mark.django_db

HOUR = datetime.timedelta(hours=1)


def _log(job, by, **fields):
    now = timezone.now()
    fields.setdefault("start", now - 3 * HOUR)
    fields.setdefault("end", now - HOUR)
    fields.setdefault("peak_current_a", "180")
    fields.setdefault("ambient_c", "22")
    return heat_cycle_log(job=job, by=by, **fields)


@pytest.fixture
def run(heat_stage, job, technician):
    return _log(job, technician)


def _temperature(run, termination, celsius, by, **kwargs):
    kwargs.setdefault("client_key", new_key())
    return thermal_reading_create(
        run=run, termination=termination, temperature_c=celsius, by=by, **kwargs
    )


# --- logging the run ----------------------------------------------------------------------


def test_a_run_is_logged_with_its_figures(heat_stage, job, technician):
    run = _log(job, technician, notes="Inverter at 2 kW for two hours")
    run.refresh_from_db()
    assert (run.peak_current_a, run.ambient_c, run.logged_by) == (
        Decimal("180"),
        Decimal("22"),
        technician,
    )
    assert latest_run(job) == run


def test_a_run_is_refused_while_its_stage_has_not_started(stages, job, technician):
    with pytest.raises(ValidationError) as exc_info:
        _log(job, technician)
    assert "heat-cycle run is not started" in " ".join(exc_info.value.message_dict["job"])
    assert not HeatCycleRun.objects.exists()


def test_a_run_is_refused_on_a_job_without_stages(technician):
    job = make_job()
    Stage.objects.filter(job=job).delete()  # a job from before stages existed
    with pytest.raises(ValidationError) as exc_info:
        _log(job, technician)
    assert "no stages" in " ".join(exc_info.value.message_dict["job"])


@pytest.mark.parametrize(
    "fields, field, words",
    [
        ({"end": timezone.now() - 4 * HOUR}, "end", "end after it starts"),
        ({"end": timezone.now() + 2 * HOUR}, "end", "in the future"),
        ({"start": timezone.now() - 30 * HOUR}, "end", "longer than a day"),
        ({"start": "yesterday"}, "start", "date and time"),
        ({"peak_current_a": "0"}, "peak_current_a", "outside 0.1 to 2000 A"),
        ({"peak_current_a": "-50"}, "peak_current_a", "outside"),
        ({"peak_current_a": "25000"}, "peak_current_a", "outside"),
        ({"peak_current_a": "nan"}, "peak_current_a", "must be a number"),
        ({"peak_current_a": "lots"}, "peak_current_a", "must be a number"),
        ({"ambient_c": "85"}, "ambient_c", "outside -40 to 60 °C"),
        ({"ambient_c": ""}, "ambient_c", "Enter the ambient temperature"),
    ],
)
def test_a_run_with_impossible_figures_is_refused(
    heat_stage, job, technician, fields, field, words
):
    with pytest.raises(ValidationError) as exc_info:
        _log(job, technician, **fields)
    assert words in " ".join(exc_info.value.message_dict[field])
    assert not HeatCycleRun.objects.exists()


def test_every_problem_with_a_run_is_listed_at_once(stages, job, technician):
    with pytest.raises(ValidationError) as exc_info:
        _log(job, technician, end=timezone.now() - 5 * HOUR, peak_current_a="-1", ambient_c="99")
    assert set(exc_info.value.message_dict) == {"end", "peak_current_a", "ambient_c", "job"}


def test_office_cannot_log_a_run(heat_stage, job, office):
    with pytest.raises(PermissionDenied):
        _log(job, office)


# --- the soak -----------------------------------------------------------------------------


def test_the_soak_counts_down_from_the_end_of_the_latest_run(heat_stage, job, technician, lead):
    profile = ShopProfile.load()
    profile.soak_minutes = 120
    profile.save()
    assert soak_remaining(job) is None  # no run, no soak yet
    ended = timezone.now() - datetime.timedelta(minutes=30)
    _log(job, technician, start=ended - HOUR, end=ended)
    assert soak_remaining(job, now=ended + datetime.timedelta(minutes=30)) == datetime.timedelta(
        minutes=90
    )
    assert soak_remaining(job, now=ended + datetime.timedelta(minutes=120)) == datetime.timedelta(0)
    assert soak_remaining(job, now=ended + datetime.timedelta(days=1)) == datetime.timedelta(0)
    # A later run (the lead sent the heat-cycle stage back for it) starts the soak again.
    stage_send_back(stage=heat_stage, lead=lead, note="Run it again at full inverter load")
    again = timezone.now() - datetime.timedelta(minutes=5)
    _log(job, technician, start=again - HOUR, end=again)
    assert soak_remaining(job, now=again) == datetime.timedelta(minutes=120)


# --- temperatures after the run -----------------------------------------------------------


def test_a_temperature_is_stored_once_per_key(run, termination, technician):
    key = new_key()
    first = _temperature(run, termination, "30.5", technician, client_key=key)
    again = _temperature(run, termination, "30.5", technician, client_key=key)
    assert again.pk == first.pk and ThermalReading.objects.count() == 1
    with pytest.raises(ValidationError):
        _temperature(run, termination, "31", technician, client_key=key)


@pytest.mark.parametrize(
    "celsius, words",
    [("nan", "must be a number"), ("400", "outside -40 to 250 °C"), ("", "Enter the temperature")],
)
def test_an_impossible_temperature_is_refused(run, termination, technician, celsius, words):
    with pytest.raises(ValidationError) as exc_info:
        _temperature(run, termination, celsius, technician)
    assert words in " ".join(exc_info.value.message_dict["temperature_c"])
    assert not ThermalReading.objects.exists()


def test_a_temperature_of_another_jobs_connection_or_before_the_run_is_refused(run, technician):
    elsewhere = make_spec_circuit(make_job()).terminations.first()
    with pytest.raises(ValidationError) as exc_info:
        _temperature(run, elsewhere, "30", technician, at=run.started_at - HOUR)
    assert set(exc_info.value.message_dict) == {"termination", "at"}


def test_a_temperature_is_refused_while_neither_heat_cycle_nor_retorque_is_open(
    run, stages, termination, technician
):
    # Logging the run signed the heat-cycle stage and opened the retorque; with that one
    # not open either, no temperature is taken.
    Stage.objects.filter(pk=stages[Stage.Kind.RETORQUE].pk).update(state=Stage.State.SIGNED)
    with pytest.raises(ValidationError) as exc_info:
        _temperature(run, termination, "30", technician)
    assert "only while its stage is open" in " ".join(exc_info.value.message_dict["job"])
    Stage.objects.filter(pk=stages[Stage.Kind.RETORQUE].pk).update(state=Stage.State.OPEN)
    assert _temperature(run, termination, "30", technician).pk


def test_office_cannot_take_a_temperature(run, termination, office):
    with pytest.raises(PermissionDenied):
        _temperature(run, termination, "30", office)


def test_a_hot_connection_blocks_retorque_until_read_again_cooler(run, terminations, technician):
    # Ambient 22 °C. Same device, same circuit (similar load): the two "from" ends.
    hot, peer = [t for t in terminations if t.end == "from"]
    _temperature(run, peer, "27", technician)  # 5 °C over ambient: possible
    _temperature(run, hot, "45", technician)  # 23 over ambient, 18 over its peer: major
    results = thermal_results(run.job)
    assert results[peer.pk].thermal_class == ThermalClass.POSSIBLE
    assert results[hot.pk].thermal_class == ThermalClass.MAJOR
    assert [r.reading.termination_id for r in thermal_blocking(run.job)] == [hot.pk]
    # Re-made, read again: 28 °C is 6 over ambient, 1 over its peer: possible, not blocking.
    _temperature(run, hot, "28", technician)
    assert thermal_blocking(run.job) == []
