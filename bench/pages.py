"""Benchmark: every page of a job and of its stages, on the large invented job.

Run by hand (never in the test suite):

    .venv/bin/python bench/pages.py                    # SQLite and PostgreSQL, 20 requests a page
    .venv/bin/python bench/pages.py --db sqlite --requests 5

For each database (a SQLite file in a temporary directory; PostgreSQL: a scratch database
named <BENCH_DB_PREFIX>_pages_<pid> on BENCH_PG_URL, default postgres://postgres@127.0.0.1:5432,
created and dropped here, never the shop's) it migrates, builds through the services the
large job of bench/_common.py (150 circuits, 600 terminations, 1,800 readings, 20 photos;
plus 150 thermal readings, the first install's checklist marked, an owner's link) and a
small job of 3 circuits made the same way. Then every page whose address takes the job's
number (found from the URL patterns, so a new page is measured without editing this
file), each stage's pages for every stage, the job list, the review queue and the owner's
page are requested through Django's test Client, in this process (no network, no
gunicorn), with the production settings (DEBUG off, static files collected), as the
job's technician (or, where the technician may not open the page, as the lead, then as
office staff).

For each page: the status, queries per request on the large job beside the same page of
the small job, the median and 95th percentile of N warm requests (one warm-up first; at
most --max-seconds per page, at least 3 requests), and the response size. Goals:

    queries do not grow with the job (large job ≤ small job);
    HTML pages: median under 300 ms, p95 under 1 s (a tablet on the shop's LAN);
    PDFs (the stage sheets): p95 under 5 s (the record's render goal, bench/record.py);
    the job page a technician lands on (job_detail): under 100 KB of HTML for this job.

Figures taken on a busy machine mean little: the load average is printed before and after.
Exit status 0 when every goal is met, 2 otherwise.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import _common

ROOT = _common.ROOT
NAME = "pages"
HTML_MEDIAN_MS, HTML_P95_MS, PDF_P95_MS = 300.0, 1000.0, 5000.0
LANDING_KB = 100.0
SMALL_CIRCUITS = 3
EXTRA_PAGES = ("job_list", "review_queue")  # around the job, without its number


# --- inside the child process -------------------------------------------------------------------


def _world(number: str) -> dict:
    """The records a job's page addresses name: its first circuit, device, termination,
    reading, thermal reading, owner's link, stages."""
    from circuits.models import Circuit, Device, Termination
    from inspections.models import Stage, ThermalReading, TorqueRecord
    from wiring.models import OwnerLink

    circuit = Circuit.objects.filter(job__number=number).order_by("tag").first()
    termination = Termination.objects.filter(circuit=circuit).order_by("pk").first()
    return {
        "number": number,
        "circuit": circuit.pk,
        "device": Device.objects.filter(job__number=number).order_by("pk").first().pk,
        "termination": termination.pk,
        "reading": TorqueRecord.objects.filter(termination=termination).latest("pk").pk,
        "thermal": getattr(
            ThermalReading.objects.filter(termination__circuit__job__number=number).first(),
            "pk",
            None,
        ),
        "link": getattr(OwnerLink.objects.filter(job__number=number).first(), "pk", None),
        "kinds": list(
            Stage.objects.filter(job__number=number).order_by("kind").values_list("kind", flat=True)
        ),
    }


# Which record a page's <int:pk> names, by URL name; a page missing here is listed as
# "not measured" so a new kind of address is noticed rather than skipped in silence.
PK_OF = {
    "circuit_edit": "circuit",
    "circuit_delete": "circuit",
    "device_detail": "device",
    "device_edit": "device",
    "device_delete": "device",
    "termination_edit": "termination",
    "torque_entry": "termination",
    "torque_correct": "reading",
    "thermal_waive": "thermal",
    "owner_link_revoke": "link",
    "owner_link_send": "link",
}


def _addresses(world: dict, token: str) -> tuple[list[tuple[str, str]], list[str]]:
    """(label, path) of every page to measure, and what could not be addressed."""
    from django.urls import URLPattern, URLResolver, get_resolver, reverse

    def patterns(entries, prefix=""):
        for entry in entries:
            if isinstance(entry, URLResolver):
                if entry.namespace != "admin":
                    yield from patterns(entry.url_patterns, prefix + str(entry.pattern))
            elif isinstance(entry, URLPattern) and entry.name:
                yield entry.name, prefix + str(entry.pattern)

    found, skipped = [], []
    for name in EXTRA_PAGES:
        found.append((name, reverse(name)))
    for name, route in patterns(get_resolver().url_patterns):
        if name == "owner_record":
            found.append((name, reverse(name, kwargs={"token": token})))
            continue
        if "<str:number>" not in route:
            continue
        kwargs = {"number": world["number"]}
        if "<int:pk>" in route:
            record = PK_OF.get(name)
            if record is None or world.get(record) is None:
                skipped.append(f"{name} (no {record or 'record'} to name)")
                continue
            kwargs["pk"] = world[record]
        if "<int:revision>" in route:
            skipped.append(f"{name} (no issued revision on the bench job)")
            continue
        if "<int:kind>" in route:
            for kind in world["kinds"]:
                found.append((f"{name} [{kind}]", reverse(name, kwargs={**kwargs, "kind": kind})))
            continue
        if name == "stage_work":
            for kind in world["kinds"]:
                found.append((f"{name} [{kind}]", reverse(name, kwargs=kwargs) + f"?stage={kind}"))
            continue
        found.append((name, reverse(name, kwargs=kwargs)))
    return found, skipped


def _body(response) -> bytes:
    if getattr(response, "streaming", False):
        return b"".join(response.streaming_content)
    return response.content


def _one(client, path: str):
    from django.db import connection
    from django.test.utils import CaptureQueriesContext

    connection.queries_log.clear()  # a full log (9,000 queries) would count nothing
    with CaptureQueriesContext(connection) as queries:
        start = time.perf_counter()
        response = client.get(path)
        body = _body(response)
        ms = (time.perf_counter() - start) * 1000
    return response, body, ms, len(queries)


def _clients() -> list:
    from django.contrib.auth import get_user_model
    from django.test import Client

    people = []
    for username in ("bench-tech", "bench-lead", "bench-office"):
        client = Client()
        client.force_login(get_user_model().objects.get(username=username))
        people.append((username.removeprefix("bench-"), client))
    return people


def _first_allowed(people, path: str):
    """The first persona (technician, lead, office) the page opens for, and its answer."""
    answer = None
    for who, client in people:
        answer = _one(client, path)
        if answer[0].status_code not in (403,):
            return who, client, answer
    return who, client, answer


def measure(backend: str, *, requests: int, max_seconds: float, circuits: int) -> list[dict]:
    big = _common.build_large_job(circuits=circuits)
    big_token = _common.add_page_extras(big)
    small = _common.build_large_job(circuits=SMALL_CIRCUITS, photos=2, title="Small bench build")
    small_token = _common.add_page_extras(small)
    print(f"  built {big} ({circuits} circuits) and {small} ({SMALL_CIRCUITS} circuits)")
    print(f"  {_common.load_average()}", flush=True)
    big_pages, skipped = _addresses(_world(big), big_token)
    small_pages = dict(_addresses(_world(small), small_token)[0])
    people = _clients()
    rows = []
    for label, path in big_pages:
        who, client, (response, body, _ms, _q) = _first_allowed(people, path)  # warm-up
        status = response.status_code
        if status == 405:
            skipped.append(f"{label} (POST only)")
            continue
        if status == 404 and "[" in label:
            skipped.append(f"{label} (404: no such page for this stage)")
            continue
        times, counts = [], []
        started = time.perf_counter()
        while len(times) < requests and (
            len(times) < 3 or time.perf_counter() - started < max_seconds
        ):
            response, body, ms, count = _one(client, path)
            times.append(ms)
            counts.append(count)
        small_path = small_pages.get(label)
        small_count = None
        if small_path is not None:
            small_client = dict(people)[who]
            _one(small_client, small_path)  # warm, as the large job's page was
            small_count = _one(small_client, small_path)[3]
        times.sort()
        rows.append(
            {
                "page": label,
                "as": who,
                "status": response.status_code,
                "pdf": response.get("Content-Type", "").startswith("application/pdf"),
                # The usual count: about once a minute the idle timeout saves the session.
                "queries": statistics.mode(counts),
                "small": small_count,
                "n": len(times),
                "median": statistics.median(times),
                "p95": _common.percentile(times, 0.95),
                "kb": len(body) / 1024,
            }
        )
    print(f"  {_common.load_average()}")
    for note in skipped:
        print(f"  not measured: {note}")
    return rows


def _verdicts(row: dict) -> dict[str, bool | None]:
    p95_goal = PDF_P95_MS if row["pdf"] else HTML_P95_MS
    return {
        "status": row["status"] in (200, 302),
        "queries": None if row["small"] is None else row["queries"] <= row["small"],
        "median": None if row["pdf"] else row["median"] < HTML_MEDIAN_MS,
        "p95": row["p95"] < p95_goal,
        "kb": row["kb"] < LANDING_KB if row["page"] == "job_detail" else None,
    }


def report(db: str, rows: list[dict]) -> bool:
    def mark(ok: bool | None) -> str:
        return "" if ok is None else ("met" if ok else "NOT met")

    print(
        f"\n{db}: queries (large / {SMALL_CIRCUITS}-circuit job) goal: no growth;"
        f" median < {HTML_MEDIAN_MS:g} ms, p95 < {HTML_P95_MS:g} ms (PDF p95 < {PDF_P95_MS:g} ms);"
        f" job_detail < {LANDING_KB:g} KB"
    )
    head = f"  {'page':<30}{'as':<7}{'st':>4}{'queries':>10} {'':<8}"
    print(head + f"{'n':>3}{'median ms':>11} {'':<8}{'p95 ms':>8} {'':<8}{'KB':>8} ")
    all_ok = True
    worst = {"queries": [], "median": [], "p95": []}
    for row in rows:
        v = _verdicts(row)
        all_ok &= all(ok is not False for ok in v.values())
        for key in worst:
            if v[key] is False:
                worst[key].append(row["page"])
        small = "?" if row["small"] is None else row["small"]
        print(
            f"  {row['page']:<30}{row['as']:<7}{row['status']:>4}"
            f"{str(row['queries']) + ' / ' + str(small):>10} {mark(v['queries']):<8}"
            f"{row['n']:>3}{row['median']:>11.0f} {mark(v['median']):<8}"
            f"{row['p95']:>8.0f} {mark(v['p95']):<8}{row['kb']:>8.1f} {mark(v['kb'])}"
            + ("" if v["status"] else "  (unexpected status)")
        )
    landing = next((r for r in rows if r["page"] == "job_detail"), None)
    html = [r for r in rows if not r["pdf"]]
    slowest = max(html, key=lambda r: r["p95"]) if html else None
    _common.emit(
        NAME, f"{db}: pages whose queries grow with the job", len(worst["queries"]), "",
        "0", not worst["queries"],
    )  # fmt: skip
    if slowest is not None:
        _common.emit(
            NAME, f"{db}: slowest page p95 ({slowest['page']})", round(slowest["p95"]), "ms",
            f"< {HTML_P95_MS:g} ms", slowest["p95"] < HTML_P95_MS,
        )  # fmt: skip
        median = max(html, key=lambda r: r["median"])
        _common.emit(
            NAME, f"{db}: slowest page median ({median['page']})", round(median["median"]), "ms",
            f"< {HTML_MEDIAN_MS:g} ms", median["median"] < HTML_MEDIAN_MS,
        )  # fmt: skip
    for row in rows:
        if row["pdf"]:
            _common.emit(
                NAME, f"{db}: {row['page']} p95", round(row["p95"]), "ms",
                f"< {PDF_P95_MS:g} ms", row["p95"] < PDF_P95_MS,
            )  # fmt: skip
    if landing is not None:
        _common.emit(
            NAME, f"{db}: job page HTML size", round(landing["kb"], 1), "KB",
            f"< {LANDING_KB:g} KB", landing["kb"] < LANDING_KB,
        )  # fmt: skip
        _common.emit(
            NAME, f"{db}: job page queries (large / small job)",
            f"{landing['queries']} / {landing['small']}", "", "no growth",
            _verdicts(landing)["queries"],
        )  # fmt: skip
    for key, pages in worst.items():
        if pages:
            print(f"  {key} goal not met: {', '.join(pages)}")
    return all_ok


def child(backend: str, requests: int, max_seconds: float, circuits: int, var_dir: str) -> int:
    os.environ.setdefault("DJANGO_SETTINGS_MODULE", "shop.settings")
    import django
    from django.conf import settings

    django.setup()
    import logging

    # The personas' 403s and 405s while finding who may open each page are expected.
    logging.getLogger("django.request").setLevel(logging.ERROR)
    from django.core.management import call_command
    from django.db import connection
    from django.test.utils import setup_test_environment

    call_command("collectstatic", interactive=False, verbosity=0)
    name = (
        str(Path(var_dir) / "bench-pages.sqlite3")
        if backend == "sqlite"
        else _common.scratch_db_name(NAME)
    )
    connection.settings_dict["TEST"]["NAME"] = name
    settings.PASSWORD_HASHERS = ["django.contrib.auth.hashers.MD5PasswordHasher"]
    setup_test_environment()  # the test Client's host, an in-memory mail outbox
    old = connection.creation.create_test_db(verbosity=0, autoclobber=True)
    try:
        db = "SQLite" if backend == "sqlite" else "PostgreSQL"
        print(f"{db} ({name}):", flush=True)
        rows = measure(backend, requests=requests, max_seconds=max_seconds, circuits=circuits)
        ok = report(db, rows)
    finally:
        connection.close()
        connection.creation.destroy_test_db(old, verbosity=0)
    return 0 if ok else 2


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--db", choices=("sqlite", "postgres", "both"), default="both")
    parser.add_argument("--requests", type=int, default=20, help="timed requests a page")
    parser.add_argument("--max-seconds", type=float, default=20, help="time cap a page")
    parser.add_argument("--circuits", type=int, default=_common.LARGE_CIRCUITS)
    parser.add_argument("--child", choices=("sqlite", "postgres"), help=argparse.SUPPRESS)
    parser.add_argument("--var-dir", help=argparse.SUPPRESS)
    args = parser.parse_args()
    if args.child:
        return child(args.child, args.requests, args.max_seconds, args.circuits, args.var_dir)
    worst = 0
    with tempfile.TemporaryDirectory(prefix="ampwright-bench-pages-") as tmp:
        for backend in ("sqlite", "postgres"):
            if args.db not in (backend, "both"):
                continue
            env = _common.production_env(Path(tmp) / backend, secret=os.urandom(32).hex())
            if backend == "postgres":
                if not _common.postgres_answers():
                    print("PostgreSQL: skipped (no server answering at BENCH_PG_URL).")
                    continue
                env["DATABASE_URL"] = _common.pg_url("postgres")
            done = subprocess.run(
                [
                    sys.executable,
                    __file__,
                    "--child",
                    backend,
                    "--var-dir",
                    env["AMPWRIGHT_VAR_DIR"],
                ]
                + ["--requests", str(args.requests), "--max-seconds", str(args.max_seconds)]
                + ["--circuits", str(args.circuits)],
                env=env,
                cwd=ROOT,
            )
            worst = max(worst, done.returncode)
    return worst


if __name__ == "__main__":
    raise SystemExit(main())
