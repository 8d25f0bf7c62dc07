"""Benchmark: torque readings from concurrent tablets through the offline queue's endpoint.

Run by hand (never in the test suite):

    .venv/bin/python bench/torque.py                      # both databases, 10 clients, 30 s
    .venv/bin/python bench/torque.py --db sqlite --seconds 10 --clients 4

For each database (a SQLite file in a temporary directory; PostgreSQL: a scratch database
<BENCH_DB_PREFIX>_torque_<pid> on BENCH_PG_URL, default postgres://postgres@127.0.0.1:5432,
created and dropped here) it
migrates, sets up a technician, a calibrated wrench and a job with 200 terminations (a
spec of 10 N·m each) through the services, starts gunicorn with 3 workers on a free
loopback port (DEBUG off, static files collected, as in production), signs in the clients
through the sign-in page, and for the given time has each client POST one reading per
request to `torque_sync` (/jobs/<number>/readings/sync/), resending about 5 % of its
readings under the same key (the server must not store them twice). Then it counts the
rows stored and prints, beside each figure, its goal:

    errors 0 (non-200, "refused", "database is locked", or a resend answered with another
    record), p95 under 100 ms, stored = sent (unique keys).

Gunicorn is stopped at the end whatever happens; a gunicorn that does not start ends the
bench with one line on stderr and exit status 1.

Notes. The production settings mark the session and CSRF cookies Secure; over plain HTTP
on loopback the clients send them anyway (a cookie policy of this file's own), which is
what a TLS-terminating proxy in front of gunicorn amounts to. Latencies are measured by
the clients (Python threads), so they include the client's own overhead.
"""

from __future__ import annotations

import argparse
import http.cookiejar
import json
import os
import random
import secrets
import statistics
import subprocess
import sys
import tempfile
import threading
import time
import urllib.error
import urllib.parse
import urllib.request
from dataclasses import dataclass, field
from pathlib import Path

import _common
from _common import free_port, pg_admin, stop, wait_for

ROOT = _common.ROOT
PYTHON = sys.executable
WORKERS = 3
CIRCUITS = 50  # 4 terminations each
RESEND_SHARE = 0.05
P95_GOAL_MS = 100.0
KEY_PREFIX = "bench-"
USERNAME = "bench-tech"


# --- run inside a child process with the database in the environment ---------------------


def _django() -> None:
    sys.path.insert(0, str(ROOT))
    os.environ.setdefault("DJANGO_SETTINGS_MODULE", "shop.settings")
    import django

    django.setup()


def child_setup(password: str) -> None:
    """Migrate and create the technician, wrench and job; print what the clients need."""
    _django()
    import datetime
    from decimal import Decimal

    from django.contrib.auth import get_user_model
    from django.contrib.auth.models import Group
    from django.core.management import call_command
    from django.utils import timezone

    call_command("migrate", interactive=False, verbosity=0)
    call_command("collectstatic", interactive=False, verbosity=0)

    from circuits.models import Circuit, Device, Terminal, Termination
    from circuits.services import circuit_create
    from inspections.models import Stage, TorqueWrench
    from shop import roles
    from shop.models import Owner, Vehicle
    from shop.services import job_create

    tech = get_user_model().objects.create_user(username=USERNAME, password=password)
    tech.groups.add(Group.objects.get(name=roles.TECHNICIAN))
    lead = get_user_model().objects.create_user(username="bench-lead", password=password)
    lead.groups.add(Group.objects.get(name=roles.LEAD))
    wrench = TorqueWrench(
        code="BENCH-1",
        description="Click wrench",
        range_min=Decimal("2"),
        range_max=Decimal("50"),
        unit="N*m",
        calibration_due=timezone.localdate() + datetime.timedelta(days=180),
    )
    wrench.full_clean()
    wrench.save()
    owner = Owner.objects.create(name="Bench Owner", email="bench@owners.example")
    vehicle = Vehicle.objects.create(owner=owner, kind="van", make="Benchmake", model="One")
    job = job_create(vehicle=vehicle, title="Bench build", lead=lead, technicians=[tech])
    devices = []
    for name in ("Bus A", "Bus B"):
        device = Device(job=job, name=name, kind=Device.Kind.BUSBAR, mounting="body")
        device.full_clean()
        device.save()
        for terminal, polarity in (("+", "pos"), ("-", "neg")):
            t = Terminal(
                device=device,
                name=terminal,
                polarity=polarity,
                manual_torque_value=Decimal("10"),
                manual_torque_unit="N*m",
            )
            t.full_clean()
            t.save()
        devices.append(device)
    for n in range(1, CIRCUITS + 1):
        circuit_create(
            job=job,
            tag=f"B-{n:02d}",
            name=f"Bench circuit {n}",
            role=Circuit.Role.DC_BRANCH,
            from_device=devices[0],
            to_device=devices[1],
            nominal_voltage=Decimal("12"),
            design_current_a=Decimal("10"),
            length_m=2.0,
            conductor_size="12 AWG",
            conductors=Circuit.Conductors.PAIR,
            colour_a="red",
            colour_b="black",
            protection_type=Circuit.ProtectionType.FUSE,
            protection_a=Decimal("15"),
        )
    terminations = list(
        Termination.objects.filter(circuit__job=job, torque_value__isnull=False).values_list(
            "pk", flat=True
        )
    )
    print(
        json.dumps(
            {
                "job": job.number,
                "stage": int(Stage.Kind.FIRST_INSTALL),
                "wrench": wrench.pk,
                "terminations": terminations,
            }
        )
    )


def child_count() -> None:
    _django()
    from inspections.models import TorqueRecord

    print(TorqueRecord.objects.filter(client_key__startswith=KEY_PREFIX).count())


# --- the bench ------------------------------------------------------------------------------


class LoopbackCookies(http.cookiejar.DefaultCookiePolicy):
    """Send Secure cookies over plain HTTP, to loopback only (see the module's notes)."""

    def return_ok_secure(self, cookie, request) -> bool:
        return urllib.parse.urlsplit(request.get_full_url()).hostname == "127.0.0.1"


@dataclass
class Tally:
    latencies_ms: list[float] = field(default_factory=list)
    errors: list[str] = field(default_factory=list)
    keys: set[str] = field(default_factory=set)
    resends: int = 0


class Client:
    def __init__(self, base: str, job: dict, n: int) -> None:
        self.base = base
        self.job = job
        self.n = n
        self.jar = http.cookiejar.CookieJar(policy=LoopbackCookies())
        self.opener = urllib.request.build_opener(urllib.request.HTTPCookieProcessor(self.jar))
        self.rng = random.Random(n)

    def cookie(self, name: str) -> str:
        return next((c.value for c in self.jar if c.name == name), "")

    def sign_in(self, password: str) -> None:
        self.opener.open(f"{self.base}/login/", timeout=30).read()
        form = urllib.parse.urlencode(
            {
                "username": USERNAME,
                "password": password,
                "csrfmiddlewaretoken": self.cookie("csrftoken"),
            }
        ).encode()
        request = urllib.request.Request(f"{self.base}/login/", data=form)
        with self.opener.open(request, timeout=30) as response:
            if "/login/" in response.geturl():
                raise RuntimeError(f"client {self.n} could not sign in")

    def post(self, reading: dict, tally: Tally) -> int | None:
        body = json.dumps({"readings": [reading]}).encode()
        request = urllib.request.Request(
            f"{self.base}/jobs/{self.job['job']}/readings/sync/",
            data=body,
            headers={
                "Content-Type": "application/json",
                "X-CSRFToken": self.cookie("csrftoken"),
            },
        )
        start = time.perf_counter()
        try:
            with self.opener.open(request, timeout=60) as response:
                status, text = response.status, response.read().decode()
        except urllib.error.HTTPError as exc:
            status, text = exc.code, exc.read().decode(errors="replace")
        except OSError as exc:
            tally.latencies_ms.append((time.perf_counter() - start) * 1000)
            tally.errors.append(f"connection: {exc}")
            return None
        tally.latencies_ms.append((time.perf_counter() - start) * 1000)
        if "database is locked" in text:
            tally.errors.append("database is locked")
            return None
        if status != 200:
            tally.errors.append(f"HTTP {status}: {text[:120]}")
            return None
        [result] = json.loads(text)["results"]
        if result["status"] != "stored":
            tally.errors.append(f"refused: {result['message'][:120]}")
            return None
        return result["record"]

    def run(self, until: float, tally: Tally) -> None:
        terminations = self.job["terminations"]
        i = 0
        while time.perf_counter() < until:
            reading = {
                "key": f"{KEY_PREFIX}{self.n}-{i}-{secrets.token_hex(4)}",
                "termination": terminations[(self.n * 17 + i) % len(terminations)],
                "stage": self.job["stage"],
                "value": f"{self.rng.uniform(9.6, 10.5):.1f}",
                "unit": "N*m",
                "wrench": self.job["wrench"],
                "found_loose": False,
                "note": "",
            }
            i += 1
            record = self.post(reading, tally)
            tally.keys.add(reading["key"])
            if record is not None and self.rng.random() < RESEND_SHARE:
                tally.resends += 1
                again = self.post(reading, tally)
                if again is not None and again != record:
                    tally.errors.append(f"resend stored twice: {record} and {again}")


def child(env: dict, *args: str) -> str:
    done = subprocess.run(
        [PYTHON, __file__, *args], env=env, cwd=ROOT, capture_output=True, text=True
    )
    if done.returncode:
        raise RuntimeError(f"{' '.join(args)} failed:\n{done.stderr[-2000:]}")
    return done.stdout.strip().splitlines()[-1]


def bench(name: str, env: dict, *, seconds: float, clients: int) -> dict:
    password = secrets.token_urlsafe(12)
    job = json.loads(child(env, "--child-setup", password))
    port = free_port()
    base = f"http://127.0.0.1:{port}"
    proc = None
    with open(Path(env["AMPWRIGHT_VAR_DIR"]) / "gunicorn.log", "w") as log:
        try:
            try:
                proc = _common.start_gunicorn(env, port, WORKERS, log)
            except OSError as exc:
                print(f"bench/torque.py: gunicorn did not start ({name}): {exc}", file=sys.stderr)
                raise SystemExit(1) from None
            if not wait_for(base, proc):
                tail = Path(log.name).read_text()[-300:].strip().splitlines()
                print(
                    f"bench/torque.py: gunicorn did not start on {base} ({name}):"
                    f" {tail[-1] if tail else 'no output'}",
                    file=sys.stderr,
                )
                raise SystemExit(1)
            people = [Client(base, job, n) for n in range(clients)]
            for person in people:
                person.sign_in(password)
            tallies = [Tally() for _ in people]
            until = time.perf_counter() + seconds
            started = time.perf_counter()
            threads = [
                threading.Thread(target=p.run, args=(until, t))
                for p, t in zip(people, tallies, strict=True)
            ]
            for thread in threads:
                thread.start()
            for thread in threads:
                thread.join()
            elapsed = time.perf_counter() - started
        finally:
            stop(proc)
    stored = int(child(env, "--child-count"))
    latencies = sorted(ms for t in tallies for ms in t.latencies_ms)
    errors = [e for t in tallies for e in t.errors]
    return {
        "name": name,
        "requests": len(latencies),
        "rps": len(latencies) / elapsed,
        "p50": statistics.median(latencies) if latencies else float("nan"),
        "p95": latencies[int(0.95 * (len(latencies) - 1))] if latencies else float("nan"),
        "errors": errors,
        "sent": sum(len(t.keys) for t in tallies),
        "resends": sum(t.resends for t in tallies),
        "stored": stored,
    }


def report(r: dict, *, seconds: float, clients: int) -> bool:
    ok_errors = not r["errors"]
    ok_p95 = r["p95"] < P95_GOAL_MS
    ok_stored = r["stored"] == r["sent"]

    def mark(ok: bool) -> str:
        return "met" if ok else "MISSED"

    print(f"\n{r['name']}: {clients} clients, {seconds:g} s, gunicorn {WORKERS} workers")
    print(f"  {'figure':<22}{'value':>12}   goal")
    print(f"  {'requests':<22}{r['requests']:>12}   (incl. {r['resends']} resends)")
    print(f"  {'requests/s':<22}{r['rps']:>12.1f}")
    print(f"  {'p50 (ms)':<22}{r['p50']:>12.1f}")
    print(f"  {'p95 (ms)':<22}{r['p95']:>12.1f}   < {P95_GOAL_MS:g}  {mark(ok_p95)}")
    print(f"  {'errors':<22}{len(r['errors']):>12}   0  {mark(ok_errors)}")
    print(f"  {'sent (unique keys)':<22}{r['sent']:>12}")
    print(f"  {'stored':<22}{r['stored']:>12}   = sent  {mark(ok_stored)}")
    for kind in sorted(set(r["errors"]))[:5]:
        print(f"    error: {kind} (x{r['errors'].count(kind)})")
    what = f"{r['name']}: torque entry, {clients} clients"
    _common.emit(
        "torque", f"{what}, p95", round(r["p95"], 1), "ms", f"< {P95_GOAL_MS:g} ms", ok_p95
    )
    _common.emit("torque", f"{what}, requests/s", round(r["rps"], 1), "/s")
    _common.emit("torque", f"{what}, errors", len(r["errors"]), "", "0", ok_errors)
    _common.emit(
        "torque", f"{what}, stored / sent", f"{r['stored']} / {r['sent']}", "", "equal", ok_stored
    )
    return ok_errors and ok_p95 and ok_stored


def base_env(var_dir: Path) -> dict:
    return _common.production_env(var_dir, secret=secrets.token_urlsafe(50))


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--seconds", type=float, default=30)
    parser.add_argument("--clients", type=int, default=10)
    parser.add_argument("--db", choices=("sqlite", "postgres", "both"), default="both")
    parser.add_argument("--child-setup", metavar="PASSWORD", help=argparse.SUPPRESS)
    parser.add_argument("--child-count", action="store_true", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child_setup:
        child_setup(args.child_setup)
        return 0
    if args.child_count:
        child_count()
        return 0
    results = []
    with tempfile.TemporaryDirectory(prefix="ampwright-bench-") as tmp:
        if args.db in ("sqlite", "both"):
            env = base_env(Path(tmp) / "sqlite")
            results.append(bench("SQLite", env, seconds=args.seconds, clients=args.clients))
        if args.db in ("postgres", "both"):
            name = _common.scratch_db_name("torque")
            env = base_env(Path(tmp) / "postgres")
            env["DATABASE_URL"] = _common.pg_url(name)
            pg_admin(f'CREATE DATABASE "{name}"')
            try:
                results.append(bench("PostgreSQL", env, seconds=args.seconds, clients=args.clients))
            finally:
                pg_admin(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
    ok = [report(r, seconds=args.seconds, clients=args.clients) for r in results]
    return 0 if all(ok) else 2


if __name__ == "__main__":
    raise SystemExit(main())
