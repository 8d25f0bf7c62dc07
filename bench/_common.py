"""What the benches share: the large invented job, scratch databases, gunicorn on loopback,
and the figures file that bench/all.py collects.

Each bench stays runnable alone (`python bench/<name>.py`): Python puts bench/ first on
the path, so `import _common` finds this module from any of them.

The figures file: when BENCH_FIGURES names a file, `emit()` appends one JSON line per
figure (figure, value, unit, goal, met) to it; bench/all.py sets it and prints them all
in one table. Child processes inherit the variable, so a figure may be emitted from
whichever process measured it.
"""

from __future__ import annotations

import datetime
import io
import json
import os
import signal
import socket
import subprocess
import sys
import time
import urllib.error
import urllib.request
import uuid
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

GUNICORN = str(ROOT / ".venv" / "bin" / "gunicorn")
PG_SERVER = os.environ.get("BENCH_PG_URL", "postgres://postgres@127.0.0.1:5432")
# Scratch databases are named <prefix>_<what>_<pid>; a prefix of one's own keeps two
# people benchmarking on one server apart (e.g. BENCH_DB_PREFIX=ampwright_bench_alice).
DB_PREFIX = os.environ.get("BENCH_DB_PREFIX", "ampwright_bench")

LARGE_CIRCUITS = 150  # × 2 conductors × 2 ends = 600 terminations
LARGE_PHOTOS = 20


# --- figures --------------------------------------------------------------------------------


def emit(
    bench: str, figure: str, value: object, unit: str = "", goal: str = "", met: bool | None = None
) -> None:
    """One figure for bench/all.py's table (nothing happens when run alone)."""
    path = os.environ.get("BENCH_FIGURES")
    if not path:
        return
    row = {"bench": bench, "figure": figure, "value": value, "unit": unit, "goal": goal}
    row["met"] = met
    with open(path, "a", encoding="utf-8") as out:
        out.write(json.dumps(row) + "\n")


def load_average() -> str:
    one, five, fifteen = os.getloadavg()
    return f"load average {one:.2f}, {five:.2f}, {fifteen:.2f} ({os.cpu_count()} CPUs)"


def percentile(sorted_values: list[float], share: float) -> float:
    """Nearest-rank percentile of an already sorted list (share 0.95 for the 95th)."""
    if not sorted_values:
        return float("nan")
    return sorted_values[min(len(sorted_values) - 1, int(share * (len(sorted_values) - 1) + 0.5))]


# --- PostgreSQL scratch databases -------------------------------------------------------------


def scratch_db_name(what: str) -> str:
    return f"{DB_PREFIX}_{what}_{os.getpid()}"


def pg_url(name: str) -> str:
    return f"{PG_SERVER.rstrip('/')}/{name}"


def pg_admin(sql: str) -> None:
    import psycopg

    url = pg_url("postgres").replace("postgres://", "postgresql://", 1)
    with psycopg.connect(url, autocommit=True) as connection:
        connection.execute(sql)


def postgres_answers() -> bool:
    try:
        pg_admin("SELECT 1")
    except Exception:
        return False
    return True


# --- gunicorn on loopback -------------------------------------------------------------------


def free_port() -> int:
    with socket.socket() as sock:
        sock.bind(("127.0.0.1", 0))
        return sock.getsockname()[1]


def wait_for(base: str, proc: subprocess.Popen, seconds: float = 30) -> bool:
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline:
        if proc.poll() is not None:
            return False
        try:
            with urllib.request.urlopen(f"{base}/login/", timeout=2) as response:
                if response.status == 200:
                    return True
        except (OSError, urllib.error.URLError):
            time.sleep(0.2)
    return False


def start_gunicorn(env: dict, port: int, workers: int, log) -> subprocess.Popen:
    """Gunicorn serving the app on 127.0.0.1:port in a session of its own (see stop)."""
    return subprocess.Popen(
        [GUNICORN, "shop.wsgi:application", "--workers", str(workers)]
        + ["--bind", f"127.0.0.1:{port}", "--chdir", str(ROOT), "--timeout", "60"],
        env=env,
        stdout=log,
        stderr=subprocess.STDOUT,
        start_new_session=True,
    )


def stop(proc: subprocess.Popen | None) -> None:
    """Gunicorn's master stops its workers on SIGTERM; the group is killed if it hangs."""
    if proc is None or proc.poll() is not None:
        return
    proc.send_signal(signal.SIGTERM)
    try:
        proc.wait(timeout=15)
    except subprocess.TimeoutExpired:
        os.killpg(proc.pid, signal.SIGKILL)
        proc.wait()


def production_env(var_dir: Path, secret: str) -> dict:
    """The environment of an app server as the README runs it (DEBUG off, static files
    collected), on plain HTTP over loopback, its own var/ and media, no DATABASE_URL."""
    env = {k: v for k, v in os.environ.items() if k not in ("DATABASE_URL", "BENCH_FIGURES")}
    env.update(
        DJANGO_SETTINGS_MODULE="shop.settings",
        DEBUG="0",
        SECRET_KEY=secret,
        ALLOWED_HOSTS="127.0.0.1,testserver",
        SECURE_SSL_REDIRECT="0",
        AMPWRIGHT_VAR_DIR=str(var_dir),
        STATIC_ROOT=str(var_dir / "static"),
        MEDIA_ROOT=str(var_dir / "media"),
        LOG_LEVEL="ERROR",
        SECURITY_LOG_LEVEL="ERROR",
    )
    if os.environ.get("BENCH_FIGURES"):
        env["BENCH_FIGURES"] = os.environ["BENCH_FIGURES"]
    var_dir.mkdir(parents=True, exist_ok=True)
    return env


# --- the large invented job (inside a process where Django is set up) -------------------------


def _photo(n: int):
    from django.core.files.uploadedfile import SimpleUploadedFile
    from PIL import Image, ImageDraw

    image = Image.new("RGB", (1600, 1200), (200, 200, 200))
    ImageDraw.Draw(image).rectangle([100 + n * 10, 100, 900, 700], outline=(20, 20, 20), width=12)
    buffer = io.BytesIO()
    image.save(buffer, format="JPEG", quality=85)
    return SimpleUploadedFile(f"lug-{n}.jpg", buffer.getvalue(), content_type="image/jpeg")


def build_large_job(
    *, circuits: int = LARGE_CIRCUITS, photos: int = LARGE_PHOTOS, title: str = "Large bench build"
) -> str:
    """A job of `circuits` circuits (4 terminations each), every end read at first install
    (every other one low, then re-read), the heat-cycle run logged, every end read again at
    retorque (every other one found loose, then re-read), `photos` photos on the readings;
    all through the services, in a migrated database. Returns the job's number."""
    from django.contrib.auth import get_user_model
    from django.contrib.auth.models import Group
    from django.utils import timezone

    from circuits.models import Device, Terminal, Termination
    from circuits.services import circuit_create
    from inspections.models import Stage, TorqueWrench
    from inspections.services import heat_cycle_log, torque_record_create
    from shop import roles
    from shop.models import Owner, ShopProfile, Vehicle
    from shop.services import job_create

    users = get_user_model().objects
    tech = users.filter(username="bench-tech").first() or users.create_user(
        "bench-tech", first_name="Bench", last_name="Tech"
    )
    tech.groups.add(Group.objects.get(name=roles.TECHNICIAN))
    owner = Owner.objects.create(name="Bench Owner")
    vehicle = Vehicle.objects.create(owner=owner, kind="motorhome", make="Benchmark", model="L")
    job = job_create(vehicle=vehicle, title=title, technicians=[tech])
    wrench = TorqueWrench.objects.filter(code="TW-B1").first() or TorqueWrench.objects.create(
        code="TW-B1",
        range_min=2,
        range_max=60,
        calibration_due=timezone.localdate() + datetime.timedelta(days=90),
    )
    devices = []
    for n in range(16):
        device = Device.objects.create(job=job, name=f"Bus {n:02d}", kind="busbar")
        for name, polarity in (("+", "pos"), ("-", "neg")):
            Terminal.objects.create(
                device=device, name=name, polarity=polarity, stud_size="M8",
                manual_torque_value=10, manual_torque_unit="N*m",
            )  # fmt: skip
        devices.append(device)
    for n in range(circuits):
        a, b = devices[n % 16], devices[(n * 7 + 3) % 16]
        if a == b:
            b = devices[(n + 1) % 16]
        circuit_create(
            job=job, tag=f"D-{n + 1:03d}", name=f"Branch {n + 1}", role="dc_branch",
            from_device=a, to_device=b, nominal_voltage=12, design_current_a=5 + n % 40,
            length_m=1 + (n % 9), conductor_size=("10 AWG", "8 AWG", "6 AWG", "4 AWG")[n % 4],
            protection_type="fuse", protection_a=(15, 25, 40, 60)[n % 4],
            colour_a="red", colour_b="black",
        )  # fmt: skip
    ends = list(Termination.objects.filter(circuit__job=job).order_by("pk"))
    stages = {s.kind: s for s in Stage.objects.filter(job=job)}

    def reading(end, stage, value, **extra):
        return torque_record_create(
            termination=end, stage=stage, value=value, unit="N*m", wrench=wrench,
            technician=tech, client_key=str(uuid.uuid4()), **extra,
        )  # fmt: skip

    taken = 0
    for i, end in enumerate(ends):  # first install: every other end low, then re-read
        if i % 2 == 0:
            reading(end, stages[Stage.Kind.FIRST_INSTALL], "8")
        extra = {"photo": _photo(taken)} if taken < photos // 2 and i % 30 == 0 else {}
        taken += bool(extra)
        reading(end, stages[Stage.Kind.FIRST_INSTALL], "10", **extra)
    heat = stages[Stage.Kind.HEAT_CYCLE]
    heat.state, heat.opened_at = Stage.State.OPEN, timezone.now()
    heat.save()
    end_at = timezone.now() - datetime.timedelta(minutes=ShopProfile.load().soak_minutes + 5)
    heat_cycle_log(
        job=job, start=end_at - datetime.timedelta(hours=1), end=end_at,
        peak_current_a="120", ambient_c="21", by=tech,
    )  # fmt: skip
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    for i, end in enumerate(ends):  # retorque: every other end found loose, then re-read
        if i % 2 == 1:
            reading(end, retorque, "9.6", found_loose=True)
        extra = {"photo": _photo(taken)} if taken < photos and i % 30 == 1 else {}
        taken += bool(extra)
        reading(end, retorque, "10.2", **extra)
    return job.number


def add_page_extras(number: str) -> str:
    """What the pages bench also wants on the job: thermal readings on every fourth end,
    the first install's hand-marked checklist items all marked, a lead and office staff,
    and an owner's link. Returns the link's token."""
    from django.contrib.auth import get_user_model
    from django.contrib.auth.models import Group
    from django.core.exceptions import ValidationError

    from circuits.models import Termination
    from inspections.models import HeatCycleRun, Stage
    from inspections.services import (
        checklist_item_mark,
        checklist_items_for,
        thermal_reading_create,
    )
    from shop import roles
    from shop.models import Job
    from wiring.services import owner_link_create

    job = Job.objects.get(number=number)
    users = get_user_model().objects
    tech = users.get(username="bench-tech")
    for name, role, staff in (
        ("bench-lead", roles.LEAD, False),
        ("bench-office", roles.OFFICE, True),
    ):
        user = users.filter(username=name).first() or users.create_user(
            name, first_name="Bench", last_name=role.title(), is_staff=staff
        )
        user.groups.add(Group.objects.get(name=role))
    job.lead = users.get(username="bench-lead")
    job.save(update_fields=["lead"])
    run = HeatCycleRun.objects.filter(job=job).latest("pk")
    ends = Termination.objects.filter(circuit__job=job).order_by("pk")
    for i, end in enumerate(ends):
        if i % 4 == 0:
            thermal_reading_create(
                run=run, termination=end, temperature_c=str(30 + i % 25), by=tech,
                client_key=str(uuid.uuid4()),
            )  # fmt: skip
    first = Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL)
    for item in checklist_items_for(stage=first):
        if item.derived:
            continue
        try:
            checklist_item_mark(
                stage=first, item_key=item.key, result="pass", by=tech,
                client_key=str(uuid.uuid4()),
            )  # fmt: skip
        except ValidationError:  # an item this stage takes no mark for now: leave it
            continue
    office = users.get(username="bench-office")
    _link, token = owner_link_create(
        job=job, by=office, expires_on=datetime.date.today() + datetime.timedelta(days=30)
    )
    return token
