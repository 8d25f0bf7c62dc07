"""Benchmark: render the wiring record of a large invented job.

Run: python bench/record.py
Builds, in a throwaway SQLite database, a job of 150 circuits, 600 terminations, 1,800
torque readings (first install and retorque, with re-reads) and 20 photos, through the
services; then, in a child process, times `render_record_pdf` (the whole PDF/A-3b with
its embedded CSV and JSON) and the time WeasyPrint takes for a plain HTML table of the
same rows, and reads the child's peak memory (its maximum resident set size).

Goals on the development machine: the record under 5 s, under 400 MB peak, and no more
than 1.5 × the plain table. Prints the three figures; not a test (no timed tests).
"""

from __future__ import annotations

import datetime
import io
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
import uuid
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

CIRCUITS = 150  # × 2 conductors × 2 ends = 600 terminations
PHOTOS = 20
GOAL_S, GOAL_MB, GOAL_RATIO = 5.0, 400.0, 1.5


def _setup(var_dir: str) -> None:
    os.environ["AMPWRIGHT_VAR_DIR"] = var_dir
    os.environ.pop("DATABASE_URL", None)
    os.environ.setdefault("DJANGO_SETTINGS_MODULE", "shop.settings")
    import django

    django.setup()


def _photo(n: int):
    from django.core.files.uploadedfile import SimpleUploadedFile
    from PIL import Image, ImageDraw

    image = Image.new("RGB", (1600, 1200), (200, 200, 200))
    ImageDraw.Draw(image).rectangle([100 + n * 10, 100, 900, 700], outline=(20, 20, 20), width=12)
    buffer = io.BytesIO()
    image.save(buffer, format="JPEG", quality=85)
    return SimpleUploadedFile(f"lug-{n}.jpg", buffer.getvalue(), content_type="image/jpeg")


def build() -> str:
    """The large job, through the services; returns its number."""
    from django.contrib.auth import get_user_model
    from django.contrib.auth.models import Group
    from django.core.management import call_command
    from django.utils import timezone

    from circuits.models import Device, Terminal, Termination
    from circuits.services import circuit_create
    from inspections.models import Stage, TorqueWrench
    from inspections.services import heat_cycle_log, torque_record_create
    from shop import roles
    from shop.models import Owner, ShopProfile, Vehicle
    from shop.services import job_create

    call_command("migrate", verbosity=0)
    tech = get_user_model().objects.create_user("bench-tech", first_name="Bench", last_name="Tech")
    tech.groups.add(Group.objects.get(name=roles.TECHNICIAN))
    owner = Owner.objects.create(name="Bench Owner")
    vehicle = Vehicle.objects.create(owner=owner, kind="motorhome", make="Benchmark", model="L")
    job = job_create(vehicle=vehicle, title="Large bench build", technicians=[tech])
    wrench = TorqueWrench.objects.create(
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
    for n in range(CIRCUITS):
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

    photos = 0
    for i, end in enumerate(ends):  # first install: every other end low, then re-read
        if i % 2 == 0:
            reading(end, stages[Stage.Kind.FIRST_INSTALL], "8")
        extra = {"photo": _photo(photos)} if photos < PHOTOS // 2 and i % 30 == 0 else {}
        photos += bool(extra)
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
        extra = {"photo": _photo(photos)} if photos < PHOTOS and i % 30 == 1 else {}
        photos += bool(extra)
        reading(end, retorque, "10.2", **extra)
    return job.number


def plain_table_html(data: dict) -> str:
    """The same rows as a bare HTML table: the schedule and the torque log, no styling."""
    from html import escape

    rows = [
        [c["tag"], c["from_device"], c["to_device"], c["size_label"], c["length_display"]]
        for c in data["circuits"]
    ]
    for row in data["torque_log"]:
        cells = [row["termination"], row["spec"]]
        for side in ("first_install", "retorque"):
            r = row[side] or {}
            cells.append(
                f"{r.get('display', '')} {r.get('technician', '')} {r.get('recorded_at', '')}"
            )
        rows.append(cells)
    body = "".join(
        "<tr>" + "".join(f"<td>{escape(str(cell))}</td>" for cell in row) + "</tr>" for row in rows
    )
    return f"<html><body><table>{body}</table></body></html>"


def child(number: str) -> None:
    """Time the record and the plain table; print JSON for the parent."""
    from weasyprint import HTML

    from shop.models import Job
    from wiring.render import record_data, render_record_pdf

    job = Job.objects.get(number=number)
    start = time.perf_counter()
    pdf = render_record_pdf(job, revision=1, draft=False, verify_url="https://shop.example/v/")
    record_s = time.perf_counter() - start
    html = plain_table_html(record_data(job))
    start = time.perf_counter()
    HTML(string=html).write_pdf()
    table_s = time.perf_counter() - start
    print(json.dumps({"record_s": record_s, "table_s": table_s, "bytes": len(pdf)}))


def main() -> None:
    if len(sys.argv) == 3 and sys.argv[1] == "--child":
        _setup(os.environ["AMPWRIGHT_VAR_DIR"])
        child(sys.argv[2])
        return
    with tempfile.TemporaryDirectory(prefix="ampwright-bench-") as var_dir:
        _setup(var_dir)
        started = time.perf_counter()
        number = build()
        print(f"built {number} in {time.perf_counter() - started:.1f} s", file=sys.stderr)
        out = subprocess.run(
            [sys.executable, __file__, "--child", number],
            capture_output=True, text=True, check=True, env={**os.environ},
        )  # fmt: skip
        figures = json.loads(out.stdout.strip().splitlines()[-1])
        peak_mb = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss / 1024  # KiB on Linux
    ratio = figures["record_s"] / figures["table_s"]
    print(f"record render: {figures['record_s']:.2f} s (goal under {GOAL_S:g} s)")
    print(f"peak memory:   {peak_mb:.0f} MB (goal under {GOAL_MB:g} MB)")
    print(
        f"plain table:   {figures['table_s']:.2f} s; record / table = {ratio:.2f}"
        f" (goal at most {GOAL_RATIO:g})"
    )
    print(f"record size:   {figures['bytes'] / 1e6:.1f} MB", file=sys.stderr)


if __name__ == "__main__":
    main()
