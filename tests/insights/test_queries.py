"""The insight aggregates against figures worked out by hand on the small fixed data set
of tests/insights/data.py (its docstring has the readings)."""

from __future__ import annotations

import datetime

import pytest
from django.utils import timezone

from insights import queries
from inspections.models import Stage
from shop import roles
from tests.factories import make_job, make_user
from tests.insights.data import build
from tests.inspections.factories import (
    make_spec_circuit,
    make_wrench,
    open_stage,
    read,
    stages_by_kind,
)

pytestmark = pytest.mark.django_db


def this_year() -> queries.Period:
    today = timezone.localdate()
    return queries.Period(today - datetime.timedelta(days=364), today)


def by_key(rows):
    return {row["key"]: row for row in rows}


def test_loosening_by_termination_kind():
    build()
    rows = by_key(queries.loosening(this_year(), "termination_kind"))
    # lugs: changes 10-10 = 0 and 9.5-10 = -0.5; median -0.25 N·m, -2.5 % of 10 N·m.
    assert rows["lug"] == {"key": "lug", "n": 2, "loose": 0, "median_nm": -0.25, "median_pct": -2.5}
    # set-screws: to pos loose, re-read 10 (current): change 0; to neg loose at 8: -2;
    # median -1 N·m, -10 % of spec; both found loose.
    assert rows["set_screw"] == {
        "key": "set_screw",
        "n": 2,
        "loose": 2,
        "median_nm": -1.0,
        "median_pct": -10.0,
    }


def test_loosening_by_device_stud_conductor_and_mounting():
    build()
    period = this_year()
    devices = by_key(queries.loosening(period, "device_kind"))
    assert (devices["busbar"]["loose"], devices["charge_controller"]["loose"]) == (0, 2)
    studs = by_key(queries.loosening(period, "stud_size"))
    assert (studs["M8"]["n"], studs["screw"]["n"]) == (2, 2)
    # All four ends: changes 0, -0.5, 0, -2; median of -2, -0.5, 0, 0 is -0.25.
    (cable,) = queries.loosening(period, "conductor_size")
    assert (cable["key"], cable["n"], cable["loose"], cable["median_nm"]) == ("6 AWG", 4, 2, -0.25)
    (body,) = queries.loosening(period, "mounting")
    assert (body["key"], body["n"], body["loose"]) == ("body", 4, 2)


def test_period_before_the_readings_counts_nothing():
    build()
    long_ago = queries.Period(datetime.date(2001, 1, 1), datetime.date(2001, 12, 31))
    assert queries.loosening(long_ago, "termination_kind") == []
    assert queries.wrench_figures(long_ago) == []


def test_wrench_spread_and_corrections():
    data = build()
    rows = {row["wrench"]: row for row in queries.wrench_figures(this_year())}
    a, b = rows[data.wrench_a.pk], rows[data.wrench_b.pk]
    # Wrench A: five readings, the 12 corrected; current ones all 10 (0 % deviation).
    assert (a["n_all"], a["corrected"], a["n"]) == (5, 1, 4)
    assert (a["q1"], a["median"], a["q3"]) == (0, 0, 0)
    # Wrench B: 10, 9.5, 8.5, 10, 8 -> deviations 0, -5, -15, 0, -20 %; quartiles by
    # interpolation at positions 1, 2, 3 of the sorted five: -15, -5, 0.
    assert (b["n_all"], b["corrected"], b["n"]) == (5, 0, 5)
    assert (b["q1"], b["median"], b["q3"]) == (-15, -5, 0)


def test_first_readings_and_found_loose_per_technician():
    data = build()
    first = queries.first_readings(this_year())
    # Installer: first readings 12 (high), 10, 10, 10 -> 3 of 4 within.
    assert (first[data.installer.pk]["n"], first[data.installer.pk]["within"]) == (4, 3)
    # Checker: first retorque readings 10, 9.5, 8.5 (low), 8 (low) -> 2 of 4 within.
    assert (first[data.checker.pk]["n"], first[data.checker.pk]["within"]) == (4, 2)
    loose = queries.loose_by_installer(this_year())
    assert loose == {data.installer.pk: {"installer": data.installer.pk, "n": 4, "loose": 2}}


def _read_job(technician, wrench, value: str, circuits: int = 3) -> None:
    job = make_job()
    for _ in range(circuits):
        make_spec_circuit(job)
    job.technicians.add(technician)
    install = open_stage(stages_by_kind(job)[Stage.Kind.FIRST_INSTALL])
    for termination in job.circuits.all().values_list("terminations", flat=True):
        from circuits.models import Termination

        read(
            Termination.objects.get(pk=termination),
            install,
            value,
            technician=technician,
            wrench=wrench,
        )


def test_a_wrench_reading_high_against_the_others_on_the_same_kind_is_flagged():
    from insights.views.wrenches import _drift

    tech = make_user(roles.TECHNICIAN)
    a, b, c = make_wrench(code="TW-1"), make_wrench(code="TW-2"), make_wrench(code="TW-3")
    _read_job(tech, a, "10")  # 12 lug readings at 0 %
    _read_job(tech, b, "10.8")  # 12 at +8 %
    _read_job(tech, c, "10")  # 12 at 0 %
    drift = _drift(timezone.localdate())
    (window_b,) = drift[b.pk]
    # B: +8 % against C's 0 % since B's first reading: 8 points > 5: flagged.
    assert (window_b["median"], window_b["others_median"], window_b["flagged"]) == (
        pytest.approx(8.0),
        0.0,
        True,
    )
    # A: 0 % against B and C since A's first (12 at +8, 12 at 0: median 4): 4 points.
    (window_a,) = drift[a.pk]
    assert window_a["others_median"] == pytest.approx(4.0)
    assert not window_a["flagged"]
    # C: no other wrench read lugs after C began: nothing to compare, not flagged.
    (window_c,) = drift[c.pk]
    assert window_c["others_n"] == 0 and not window_c["flagged"]


# A period counts the readings whose local date (in the current time zone) falls in it,
# as Django's `__date` lookup compares them (Django 5.2 documentation, QuerySet API
# reference, "date": with USE_TZ the value is converted to the current time zone first).
# Santiago de Chile skipped the midnight of 8 September 2024 (00:00 at UTC-4 became
# 01:00 at UTC-3; IANA time zone database, zone America/Santiago): the day began at
# 04:00 UTC.
MIDNIGHTS = [
    ("Pacific/Auckland", datetime.date(2025, 1, 15), "2025-01-14T11:00:00+00:00"),  # UTC+13
    ("America/Santiago", datetime.date(2024, 9, 8), "2024-09-08T04:00:00+00:00"),
]


@pytest.mark.parametrize(("zone", "day", "first_instant"), MIDNIGHTS)
def test_a_period_starts_at_the_first_instant_of_its_local_day(zone, day, first_instant):
    import zoneinfo

    from circuits.models import Termination
    from inspections.models import TorqueRecord

    start = datetime.datetime.fromisoformat(first_instant)
    second = datetime.timedelta(seconds=1)
    day_after = start + datetime.timedelta(days=1)
    if zone == "America/Santiago":
        day_after -= datetime.timedelta(hours=1)  # the 8th was 23 hours long
    moments = [start - second, start, day_after - second, day_after]
    tech = make_user(roles.TECHNICIAN)
    wrench = make_wrench(calibration_due=datetime.date(2099, 1, 1))
    job = make_job()
    make_spec_circuit(job)
    job.technicians.add(tech)
    install = open_stage(stages_by_kind(job)[Stage.Kind.FIRST_INSTALL])
    termination = Termination.objects.filter(circuit__job=job).first()
    with timezone.override(zoneinfo.ZoneInfo(zone)):
        made = [
            read(termination, install, "10", technician=tech, wrench=wrench, at=m) for m in moments
        ]
        by_period = set(
            TorqueRecord.objects.filter(queries.Period(day, day).q()).values_list("pk", flat=True)
        )
        by_date = set(
            TorqueRecord.objects.filter(recorded_at__date=day).values_list("pk", flat=True)
        )
    # The second before midnight and the first instant of the next day are not in it.
    assert by_period == by_date == {made[1].pk, made[2].pk}
