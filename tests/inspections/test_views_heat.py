"""The heat-cycle page logs the run and says, live, when the retorque may begin; the
temperatures page takes each connection's temperature after the run and classes it by the
NETA temperature-rise table. Bad input gets a message beside its field and saves nothing."""

from __future__ import annotations

import datetime
import uuid
from decimal import Decimal

import pytest
from django.urls import reverse
from django.utils import timezone

from circuits.models import Termination
from inspections.models import HeatCycleRun, Stage, ThermalReading
from shop.models import ShopProfile
from tests.factories import make_job
from tests.inspections.factories import latest_stage, log_soaked_run, make_spec_circuit

pytestmark = pytest.mark.django_db

LOCAL = "%Y-%m-%dT%H:%M"


def text(response) -> str:
    return response.content.decode()


def local(moment: datetime.datetime) -> str:
    """As the tablet's datetime-local picker posts it: the shop's local time, to the minute."""
    return timezone.localtime(moment).strftime(LOCAL)


@pytest.fixture
def on_job(job, technician, circuit):
    job.technicians.add(technician)
    return job


@pytest.fixture
def heat_open(on_job, heat_stage):
    """The first install done (here: the heat-cycle stage opened directly); the job."""
    return on_job


def run_data(**changes) -> dict[str, str]:
    end = timezone.now() - datetime.timedelta(minutes=30)
    data = {
        "start": local(end - datetime.timedelta(hours=2)),
        "end": local(end),
        "peak_current_a": "150",
        "ambient_c": "21.5",
        "notes": "Inverter at full load, then the water heater.",
    }
    data.update(changes)
    return data


def heat_url(job) -> str:
    return reverse("heat_cycle_log", args=[job.number])


def thermal_url(job) -> str:
    return reverse("thermal_readings", args=[job.number])


# ---- who may open the heat-cycle page ---------------------------------------------------


def test_anonymous_visitors_are_sent_to_sign_in(anon_client, job):
    for url in (heat_url(job), thermal_url(job)):
        for response in (anon_client.get(url), anon_client.post(url)):
            assert response.status_code == 302
            assert response["Location"].startswith(reverse("login"))


def test_the_office_reads_the_run_but_cannot_log_it(office_client, heat_open):
    page = office_client.get(heat_url(heat_open))
    assert page.status_code == 200
    assert 'name="peak_current_a"' not in text(page)
    assert office_client.post(heat_url(heat_open), run_data()).status_code == 403
    assert not HeatCycleRun.objects.exists()


def test_a_technician_not_on_the_job_cannot_log_its_run(heat_open):
    from django.test import Client

    from shop import roles
    from tests.factories import make_user

    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    assert client.get(heat_url(heat_open)).status_code == 200
    assert client.post(heat_url(heat_open), run_data()).status_code == 403
    assert not HeatCycleRun.objects.exists()


def test_the_assigned_technician_logs_the_run_and_the_stage_is_signed(technician_client, heat_open):
    page = technician_client.get(heat_url(heat_open))
    assert 'type="datetime-local"' in text(page)
    response = technician_client.post(heat_url(heat_open), run_data())
    assert response.status_code == 302
    assert response["Location"] == heat_url(heat_open)
    run = HeatCycleRun.objects.get(job=heat_open)
    assert str(run.peak_current_a) == "150.0"
    assert str(run.ambient_c) == "21.5"
    assert latest_stage(heat_open, Stage.Kind.HEAT_CYCLE).state == Stage.State.SIGNED
    page = text(technician_client.get(heat_url(heat_open)))
    assert "150 A" in page and "21.5 °C" in page
    assert 'name="peak_current_a"' not in page  # the stage is signed: no second run here


def test_the_start_and_end_are_read_in_the_shops_time_zone(settings, technician_client, heat_open):
    settings.TIME_ZONE = "Pacific/Auckland"  # far from UTC, so a wrong reading shows
    timezone.activate("Pacific/Auckland")
    try:
        data = run_data()
        technician_client.post(heat_url(heat_open), data)
        run = HeatCycleRun.objects.get(job=heat_open)
        assert timezone.localtime(run.ended_at).strftime(LOCAL) == data["end"]
    finally:
        timezone.deactivate()


# ---- bad input beside its field, nothing saved -------------------------------------------


# The sensible ranges are inspections/services/heat.py's (common practice, not a
# standard's): peak current 0.1–2000 A, ambient −40–60 °C.
@pytest.mark.parametrize(
    "field, value, message",
    [
        ("peak_current_a", "NaN", "The peak current must be a number"),
        ("peak_current_a", "inf", "The peak current must be a number"),
        ("peak_current_a", "1e309", "far too large"),
        ("peak_current_a", "-5", "is outside 0.1 to 2000 A"),
        ("peak_current_a", "", "Enter the peak current"),
        ("peak_current_a", "lots", "The peak current must be a number"),
        ("peak_current_a", "1,5", "with a decimal point"),
        ("ambient_c", "warm", "The ambient temperature must be a number"),
        ("ambient_c", "85", "is outside -40 to 60 °C"),
        ("start", "", "Give the start of the run as a date and time"),
        ("start", "yesterday", "Give the date and time as the picker offers it"),
    ],
)
def test_a_bad_value_is_refused_beside_its_field(
    technician_client, heat_open, field, value, message
):
    response = technician_client.post(heat_url(heat_open), run_data(**{field: value}))
    assert response.status_code == 200
    page = text(response)
    assert f'id="id_{field}_error"' in page
    error = page.split(f'id="id_{field}_error"', 1)[1].split("</p>", 1)[0]
    assert message in error
    assert not HeatCycleRun.objects.exists()
    assert latest_stage(heat_open, Stage.Kind.HEAT_CYCLE).state == Stage.State.OPEN


def test_a_run_that_ends_before_it_starts_is_refused(technician_client, heat_open):
    start = timezone.now() - datetime.timedelta(hours=1)
    data = run_data(start=local(start), end=local(start - datetime.timedelta(hours=1)))
    page = text(technician_client.post(heat_url(heat_open), data))
    assert 'id="id_end_error"' in page
    assert "The run must end after it starts." in page
    assert not HeatCycleRun.objects.exists()


def test_a_run_that_ends_in_the_future_is_refused(technician_client, heat_open):
    later = timezone.now() + datetime.timedelta(hours=3)
    data = run_data(start=local(later - datetime.timedelta(hours=1)), end=local(later))
    page = text(technician_client.post(heat_url(heat_open), data))
    assert 'id="id_end_error"' in page
    assert "is in the future" in page
    assert not HeatCycleRun.objects.exists()


def test_before_the_first_install_is_signed_no_run_is_logged(technician_client, on_job):
    page = text(technician_client.get(heat_url(on_job)))
    assert "the run is logged once the first install is signed" in page
    response = technician_client.post(heat_url(on_job), run_data())
    assert response.status_code == 200
    assert "A run is logged only while its stage is open" in text(response)
    assert not HeatCycleRun.objects.exists()


# ---- the soak ---------------------------------------------------------------------------


def test_the_soak_countdown_is_rendered_by_the_server(technician_client, on_job, technician):
    """A run that ended an hour ago with a 12 h soak: 11 h left (12 h − 1 h, arithmetic)."""
    profile = ShopProfile.load()
    profile.soak_minutes = 12 * 60
    profile.save()
    log_soaked_run(on_job, technician, minutes_ago=60)
    run = HeatCycleRun.objects.get(job=on_job)
    ends = run.ended_at + datetime.timedelta(hours=12)
    page = text(technician_client.get(heat_url(on_job)))
    assert f'data-countdown-until="{ends.isoformat()}"' in page
    assert f'datetime="{ends.isoformat()}">11 h 0 min left</time>' in page
    assert "12 h" in page  # the shop's soak
    assert "js/countdown.js" in page
    assert timezone.localtime(ends).strftime("%H:%M") in page


def test_after_the_soak_the_page_says_the_retorque_may_start(technician_client, on_job, technician):
    log_soaked_run(on_job, technician)
    page = text(technician_client.get(heat_url(on_job)))
    assert "Soak complete" in page
    assert "data-countdown-until" not in page
    assert reverse("stage_work", args=[on_job.number]) in page


def test_with_no_run_the_page_says_the_soak_has_not_begun(technician_client, heat_open):
    page = text(technician_client.get(heat_url(heat_open)))
    assert "No run logged yet" in page


# ---- temperatures after the run ---------------------------------------------------------


@pytest.fixture
def after_run(on_job, technician):
    """The run logged (ambient 20 °C) and soaked: the retorque is open."""
    log_soaked_run(on_job, technician)
    return on_job


def one_per_device(job) -> list[Termination]:
    """The + end at each device of the job's circuit: no two read on the same device, so
    only the rise over ambient classes them."""
    return list(Termination.objects.filter(circuit__job=job, polarity="pos").order_by("end"))


def temps(job, values: dict[Termination, str]) -> dict[str, str]:
    data = {}
    for termination, value in values.items():
        data[f"t-{termination.pk}"] = value
        data[f"k-{termination.pk}"] = str(uuid.uuid4())
    return data


def test_without_a_run_there_is_nothing_to_read(technician_client, on_job, termination):
    page = text(technician_client.get(thermal_url(on_job)))
    assert "No heat-cycle run is logged yet" in page
    response = technician_client.post(thermal_url(on_job), temps(on_job, {termination: "30"}))
    assert response.status_code == 200
    assert "log the run before its temperatures" in text(response)
    assert not ThermalReading.objects.exists()


def test_the_connections_are_grouped_by_device_in_walking_order(
    technician_client, after_run, circuit
):
    second, first = circuit.to_device, circuit.from_device
    second.walking_order, first.walking_order = 1, 2
    second.save()
    first.save()
    page = text(technician_client.get(thermal_url(after_run)))
    assert page.index(f'id="dev-{second.pk}"') < page.index(f'id="dev-{first.pk}"')
    assert "0 of 4 connections read" in page


# ANSI/NETA MTS, thermographic survey temperature-rise table, over ambient air (from
# memory, edition not confirmed, as inspections/thermal.py): 1–10 °C possible deficiency,
# 11–20 °C probable, 21–40 °C monitor until corrected, above 40 °C major discrepancy.
# Ambient 20 °C (log_soaked_run).
@pytest.mark.parametrize(
    "temperature, label, blocks",
    [
        ("20.5", "No deficiency", False),  # rise 0.5 °C: under the table's 1 °C
        ("25", "Possible deficiency", False),  # rise 5 °C: 1–10 °C
        ("35", "Probable deficiency", True),  # rise 15 °C: 11–20 °C
        ("50", "Monitor until corrected", True),  # rise 30 °C: 21–40 °C
        ("65", "Major discrepancy", True),  # rise 45 °C: above 40 °C
    ],
)
def test_each_temperature_is_classed_by_its_rise_over_ambient(
    technician_client, after_run, temperature, label, blocks
):
    termination = one_per_device(after_run)[0]
    response = technician_client.post(
        thermal_url(after_run), temps(after_run, {termination: temperature})
    )
    assert response.status_code == 302
    page = text(technician_client.get(thermal_url(after_run)))
    row = page.split(f'id="term-{termination.pk}"', 1)[1].split("</li>", 1)[0]
    assert label in row
    assert ("Blocks the retorque" in row) is blocks
    assert ThermalReading.objects.get().temperature_c == Decimal(temperature)


def test_the_rise_over_similar_connections_is_shown(technician_client, after_run, circuit):
    """Both ends on one device, same circuit (same load): 32 °C against 24 °C is a rise of
    8 °C over similar, a probable deficiency (NETA table, similar components 4–15 °C;
    from memory, as inspections/thermal.py)."""
    on_one = list(circuit.terminations.filter(end="from").order_by("polarity"))
    technician_client.post(
        thermal_url(after_run), temps(after_run, dict(zip(on_one, ["24", "32"], strict=True)))
    )
    page = text(technician_client.get(thermal_url(after_run)))
    hot = next(t for t in on_one if ThermalReading.objects.get(termination=t).temperature_c == 32)
    row = page.split(f'id="term-{hot.pk}"', 1)[1].split("</li>", 1)[0]
    assert "8.0 °C" in row
    assert "Probable deficiency" in row


def test_a_blocking_connection_links_a_lead_to_the_waiver(
    technician_client, lead_client, after_run
):
    termination = one_per_device(after_run)[0]
    technician_client.post(thermal_url(after_run), temps(after_run, {termination: "65"}))
    reading = ThermalReading.objects.get()
    waive = reverse("thermal_waive", args=[after_run.number, reading.pk])
    assert waive in text(lead_client.get(thermal_url(after_run)))
    tech_page = text(technician_client.get(thermal_url(after_run)))
    assert waive not in tech_page
    assert "ask a lead to waive it" in tech_page
    assert "never replaces" in tech_page  # the caution


@pytest.mark.parametrize(
    "value, message",
    [
        ("NaN", "The temperature must be a number"),
        ("inf", "The temperature must be a number"),
        ("1e309", "far too large"),
        ("hot", "The temperature must be a number"),
        ("300", "is outside -40 to 250 °C"),  # heat.py's IR thermometer range (common practice)
        ("9" * 50, "The temperature must be a number"),
    ],
)
def test_a_bad_temperature_is_refused_beside_it_and_none_is_saved(
    technician_client, after_run, value, message
):
    good, bad = one_per_device(after_run)
    response = technician_client.post(
        thermal_url(after_run), temps(after_run, {good: "30", bad: value})
    )
    assert response.status_code == 200
    page = text(response)
    error = page.split(f'id="t-{bad.pk}_error"', 1)[1].split("</p>", 1)[0]
    assert message in error
    assert f'id="t-{good.pk}_error"' not in page
    assert not ThermalReading.objects.exists()  # the good one neither: all or nothing


def test_the_same_post_sent_twice_is_stored_once(technician_client, after_run):
    termination = one_per_device(after_run)[0]
    data = temps(after_run, {termination: "31.5"})
    technician_client.post(thermal_url(after_run), data)
    technician_client.post(thermal_url(after_run), data)
    assert ThermalReading.objects.count() == 1


def test_another_jobs_connection_cannot_be_posted_here(technician_client, after_run):
    other = make_job()
    foreign = make_spec_circuit(other).terminations.first()
    response = technician_client.post(thermal_url(after_run), temps(after_run, {foreign: "30"}))
    assert response.status_code == 200
    assert "Enter the temperature of at least one connection." in text(response)
    assert not ThermalReading.objects.exists()


def test_the_office_reads_temperatures_but_takes_none(office_client, after_run):
    termination = one_per_device(after_run)[0]
    page = text(office_client.get(thermal_url(after_run)))
    assert f'name="t-{termination.pk}"' not in page
    response = office_client.post(thermal_url(after_run), temps(after_run, {termination: "30"}))
    assert response.status_code == 403
    assert not ThermalReading.objects.exists()
