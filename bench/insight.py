"""Benchmark: the shop insight pages with 200 jobs and 50,000 torque readings.

Run: python bench/insight.py [--sqlite-only]
Seeds a temporary SQLite database (a file under var/, removed afterwards) and, when a
PostgreSQL server answers on 127.0.0.1:5432 (or at BENCH_PG_URL), a database named
<BENCH_DB_PREFIX>_insight_<pid>, created and dropped here. Times each insight page through
Django's test Client as a lead: one warm-up request, then the median of 5.

Goal (chosen for a shop LAN and a tablet): every page and its CSV under 1 s (median of
5 warm requests) with this data set, on SQLite and on PostgreSQL. Each figure is printed
with the goal beside it, and the load average before and after each database's run (the
figures mean little on a busy machine).

Seeding goes straight to the tables with bulk_create, bypassing inspections.services
(its checks, audit events and one-transaction-per-reading would take minutes): that is
acceptable in this benchmark only, never in the app. The readings are invented: about
a third of retorque readings on set-screws found loose, fewer on lugs, one wrench
reading 8 % high so the drift check has something to flag.
"""

from __future__ import annotations

import datetime
import os
import random
import statistics
import subprocess
import sys
import time
import uuid
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

import _common  # noqa: E402

# BENCH_SCALE=0.1 runs a tenth of the data set (a quick look while working on a query).
SCALE = float(os.environ.get("BENCH_SCALE", "1"))
JOBS = int(200 * SCALE)
READINGS = int(50_000 * SCALE)
RUNS = 5
GOAL_S = 1.0
PAGES = ("insights_loosening", "insights_wrenches", "insights_technicians", "shop_rules")


def seed() -> None:
    from django.utils import timezone

    from circuits.models import Circuit, Device, Termination
    from inspections.models import Stage, TorqueRecord, TorqueWrench
    from shop import roles
    from shop.models import Owner, Vehicle
    from shop.roles import sync_role_groups
    from shop.services import job_create
    from tests.factories import make_user

    sync_role_groups()
    rng = random.Random(12)
    techs = [
        make_user(roles.TECHNICIAN, first_name=f"Tech {i}", last_name="Bench") for i in range(8)
    ]
    today = timezone.localdate()
    wrenches = [
        TorqueWrench.objects.create(
            code=f"TW-{i:02d}",
            range_min=2,
            range_max=60,
            calibration_due=today + datetime.timedelta(days=30 * i),
        )
        for i in range(1, 7)
    ]
    per_job = READINGS // JOBS // 2  # terminations per job: one install, one retorque each
    circuits_per_job = per_job // 4 + 1
    kinds = list(Device.Kind.values)
    now = timezone.now()
    records = []
    for j in range(JOBS):
        owner = Owner.objects.create(name=f"Bench owner {j}", email=f"o{j}@bench.example")
        vehicle = Vehicle.objects.create(owner=owner, kind="van", make="Benchmake", model=f"B{j}")
        job = job_create(vehicle=vehicle, title=f"Bench build {j}")
        devices = Device.objects.bulk_create(
            [
                Device(
                    job=job,
                    name=f"D{d}",
                    kind=kinds[(j + d) % len(kinds)],
                    mounting=rng.choice(["body", "chassis", "battery_box", "engine"]),
                )
                for d in range(8)
            ]
        )
        circuits = Circuit.objects.bulk_create(
            [
                Circuit(
                    job=job,
                    tag=f"B-{c:02d}",
                    name=f"Run {c}",
                    role="dc_branch",
                    from_device=devices[c % 8],
                    to_device=devices[(c + 1) % 8],
                    nominal_voltage=12,
                    design_current_a=20,
                    length_m=3,
                    conductor_size=rng.choice(["6 AWG", "4 AWG", "2 AWG", "16 mm²", "35 mm²"]),
                )
                for c in range(circuits_per_job)
            ]
        )
        ends = Termination.objects.bulk_create(
            [
                Termination(
                    circuit=circuit,
                    end=end,
                    polarity=polarity,
                    kind=rng.choice(["lug", "lug", "set_screw", "clamp"]),
                    stud_size=rng.choice(["M6", "M8", "M10", "screw"]),
                    torque_value=10,
                    torque_source="manual",
                )
                for circuit in circuits
                for end in ("from", "to")
                for polarity in ("pos", "neg")
            ][:per_job]
        )
        # job_create made the job's four stages; their states do not matter here.
        stages = {stage.kind: stage for stage in Stage.objects.filter(job=job)}
        when = now - datetime.timedelta(days=rng.randint(1, 360))
        installer, checker = rng.sample(techs, 2)
        for t in ends:
            for kind in (1, 3):
                wrench = rng.choice(wrenches)
                bias = 0.8 if wrench.code == "TW-03" else 0.0
                loose = kind == 3 and rng.random() < (0.33 if t.kind == "set_screw" else 0.08)
                value = round(10 + bias + rng.gauss(0, 0.4) - (1.5 if loose else 0), 2)
                records.append(
                    TorqueRecord(
                        termination=t,
                        stage=stages[kind],
                        value=value,
                        unit="N*m",
                        value_nm=value,
                        spec_value=10,
                        spec_unit="N*m",
                        spec_tolerance_pct=10,
                        spec_source="manual",
                        spec_nm=10.0,
                        result="within" if 9 <= value <= 11 else ("low" if value < 9 else "high"),
                        wrench=wrench,
                        technician=installer if kind == 1 else checker,
                        recorded_at=when + datetime.timedelta(hours=0 if kind == 1 else 30),
                        found_loose=loose,
                        client_key=str(uuid.uuid4()),
                    )
                )
    TorqueRecord.objects.bulk_create(records, batch_size=2000)
    print(f"  seeded {JOBS} jobs, {TorqueRecord.objects.count()} readings", flush=True)


def time_pages() -> list[tuple[str, float]]:
    from django.test import Client
    from django.urls import reverse

    from shop import roles
    from tests.factories import make_user

    client = Client()
    client.force_login(make_user(roles.LEAD))
    figures = []
    for name in PAGES:
        for query in ("", "?format=csv") if name != "shop_rules" else ("",):
            url = reverse(name) + query
            start = time.perf_counter()
            assert client.get(url).status_code == 200, url  # warm
            print(f"  (warm-up {url}: {time.perf_counter() - start:.2f} s)", flush=True)
            times = []
            for _ in range(RUNS):
                start = time.perf_counter()
                response = client.get(url)
                times.append(time.perf_counter() - start)
                assert response.status_code == 200
            figures.append((url, statistics.median(times)))
    return figures


def _load() -> str:
    one, five, fifteen = os.getloadavg()
    return f"load average {one:.2f}, {five:.2f}, {fifteen:.2f} ({os.cpu_count()} CPUs)"


def child(backend: str) -> None:
    """Runs in its own process: make the database, seed it, time the pages, drop it."""
    os.environ.setdefault("DJANGO_SETTINGS_MODULE", "shop.settings")
    import django
    from django.conf import settings

    django.setup()
    from django.db import connection
    from django.test.utils import setup_test_environment

    name = (
        str(ROOT / "var" / f"bench-insight-{os.getpid()}.sqlite3")
        if backend == "sqlite"
        else _common.scratch_db_name("insight")
    )
    connection.settings_dict["TEST"]["NAME"] = name
    settings.PASSWORD_HASHERS = ["django.contrib.auth.hashers.MD5PasswordHasher"]
    settings.ALLOWED_HOSTS = ["testserver"]
    setup_test_environment()
    old = connection.creation.create_test_db(verbosity=0, autoclobber=True)
    try:
        start = time.perf_counter()
        seed()
        print(f"  seeding took {time.perf_counter() - start:.1f} s", flush=True)
        print(f"  {_load()}", flush=True)
        for url, seconds in time_pages():
            verdict = "ok" if seconds < GOAL_S else "OVER GOAL"
            _common.emit(
                "insight", f"{'SQLite' if backend == 'sqlite' else 'PostgreSQL'}: {url}",
                round(seconds * 1000), "ms", f"< {GOAL_S * 1000:.0f} ms", seconds < GOAL_S,
            )  # fmt: skip
            print(
                f"  {url:40} {seconds * 1000:8.0f} ms   goal < {GOAL_S * 1000:.0f} ms  {verdict}",
                flush=True,
            )
        print(f"  {_load()}", flush=True)
    finally:
        connection.creation.destroy_test_db(old, verbosity=0)


def _postgres_answers(url: str) -> bool:
    import psycopg

    try:
        psycopg.connect(
            url.replace("postgres://", "postgresql://") + "/postgres", connect_timeout=3
        ).close()
    except Exception:
        return False
    return True


def main() -> None:
    if len(sys.argv) > 2 and sys.argv[1] == "--child":
        child(sys.argv[2])
        return
    env = {**os.environ}
    env.pop("DATABASE_URL", None)
    print(f"SQLite ({JOBS} jobs, {READINGS} readings; median of {RUNS}, warm):", flush=True)
    subprocess.run([sys.executable, __file__, "--child", "sqlite"], env=env, check=True)
    pg = os.environ.get("BENCH_PG_URL", "postgres://postgres@127.0.0.1:5432")
    if "--sqlite-only" in sys.argv or not _postgres_answers(pg):
        print("PostgreSQL: skipped (no server answering).", flush=True)
        return
    print(f"PostgreSQL ({JOBS} jobs, {READINGS} readings; median of {RUNS}, warm):", flush=True)
    subprocess.run(
        [sys.executable, __file__, "--child", "postgres"],
        env={**env, "DATABASE_URL": f"{pg}/postgres"},
        check=True,
    )


if __name__ == "__main__":
    main()
