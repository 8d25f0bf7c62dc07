"""Benchmark: two app servers sharing one PostgreSQL database, readings from 10 tablets.

Run by hand (never in the test suite):

    .venv/bin/python bench/two_servers.py                  # 10 clients, 30 s
    .venv/bin/python bench/two_servers.py --seconds 10 --clients 4

Makes a scratch database <BENCH_DB_PREFIX>_two_servers_<pid> on BENCH_PG_URL (default
postgres://postgres@127.0.0.1:5432; created and dropped here, never the shop's), sets up
the technician, wrench and job of bench/torque.py through the services, and starts two
gunicorn processes (each with --workers, default 2) on two loopback ports with the same
DATABASE_URL and SECRET_KEY, as the README describes for several app servers. Each client
signs in through the sign-in page of one server and posts its readings to the OTHER one
(client n posts to server n mod 2), so the session, the CSRF token and the readings all
go through the shared database. Each reading carries its own key and about 5 % are sent
again under the same key, through the offline queue's real endpoint (bench/torque.py's
client). At the end the readings stored in the database are counted.

Goals: 0 errors (non-200, "refused", a resend answered with another record), stored =
sent (unique keys), on both servers; p95 is printed with bench/torque.py's goal (under
100 ms) beside it. Exit status 0 when every goal is met, 2 otherwise, 1 when a server
does not start (one line on stderr).
"""

from __future__ import annotations

import argparse
import json
import secrets
import statistics
import sys
import tempfile
import threading
import time
from pathlib import Path

import _common
import torque

NAME = "two_servers"


def run(env: dict, *, seconds: float, clients: int, workers: int) -> dict:
    password = secrets.token_urlsafe(12)
    job = json.loads(torque.child(env, "--child-setup", password))
    var_dir = Path(env["AMPWRIGHT_VAR_DIR"])
    servers, logs = [], []
    try:
        for n in range(2):
            port = _common.free_port()
            base = f"http://127.0.0.1:{port}"
            log = open(var_dir / f"gunicorn-{n}.log", "w")  # noqa: SIM115 (closed below)
            logs.append(log)
            proc = _common.start_gunicorn(env, port, workers, log)
            servers.append((base, proc))
        for n, (base, proc) in enumerate(servers):
            if not _common.wait_for(base, proc):
                tail = (var_dir / f"gunicorn-{n}.log").read_text()[-300:].strip().splitlines()
                print(
                    f"bench/two_servers.py: server {n + 1} did not start on {base}:"
                    f" {tail[-1] if tail else 'no output'}",
                    file=sys.stderr,
                )
                raise SystemExit(1)
        people = []
        for n in range(clients):
            sign_in_base = servers[(n + 1) % 2][0]
            person = torque.Client(servers[n % 2][0], job, n)
            person.base = sign_in_base
            person.sign_in(password)  # the cookie is the host's (127.0.0.1), any port
            person.base = servers[n % 2][0]
            people.append(person)
        tallies = [torque.Tally() for _ in people]
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
        for _base, proc in servers:
            _common.stop(proc)
        for log in logs:
            log.close()
    stored = int(torque.child(env, "--child-count"))
    per_server = []
    for n in range(2):
        mine = [t for i, t in enumerate(tallies) if i % 2 == n]
        latencies = sorted(ms for t in mine for ms in t.latencies_ms)
        per_server.append(
            {
                "base": servers[n][0],
                "clients": len(mine),
                "requests": len(latencies),
                "p50": statistics.median(latencies) if latencies else float("nan"),
                "p95": _common.percentile(latencies, 0.95),
                "errors": [e for t in mine for e in t.errors],
                "sent": sum(len(t.keys) for t in mine),
            }
        )
    return {
        "servers": per_server,
        "elapsed": elapsed,
        "sent": sum(s["sent"] for s in per_server),
        "resends": sum(t.resends for t in tallies),
        "stored": stored,
        "errors": [e for s in per_server for e in s["errors"]],
    }


def report(r: dict, *, seconds: float, clients: int, workers: int) -> bool:
    def mark(ok: bool) -> str:
        return "met" if ok else "NOT met"

    print(
        f"\nTwo app servers on one PostgreSQL database: {clients} clients, {seconds:g} s,"
        f" gunicorn {workers} workers each; each client signed in on the other server"
    )
    print(f"  {'server':<26}{'clients':>8}{'requests':>10}{'p50 ms':>9}{'p95 ms':>9}{'errors':>8}")
    for n, s in enumerate(r["servers"], 1):
        print(
            f"  {n} {s['base']:<24}{s['clients']:>8}{s['requests']:>10}"
            f"{s['p50']:>9.1f}{s['p95']:>9.1f}{len(s['errors']):>8}"
        )
    ok_errors = not r["errors"]
    ok_stored = r["stored"] == r["sent"]
    p95 = max(s["p95"] for s in r["servers"])
    ok_p95 = p95 < torque.P95_GOAL_MS
    requests = sum(s["requests"] for s in r["servers"])
    print(f"  {'figure':<28}{'value':>12}   goal")
    print(f"  {'requests/s (both)':<28}{requests / r['elapsed']:>12.1f}")
    print(
        f"  {'p95 (worse server, ms)':<28}{p95:>12.1f}   < {torque.P95_GOAL_MS:g}  {mark(ok_p95)}"
    )
    print(f"  {'errors':<28}{len(r['errors']):>12}   0  {mark(ok_errors)}")
    print(f"  {'sent (unique keys)':<28}{r['sent']:>12}   (and {r['resends']} resends)")
    print(f"  {'stored in the database':<28}{r['stored']:>12}   = sent  {mark(ok_stored)}")
    for kind in sorted(set(r["errors"]))[:5]:
        print(f"    error: {kind} (x{r['errors'].count(kind)})")
    what = f"two servers, {clients} clients"
    _common.emit(NAME, f"{what}, errors", len(r["errors"]), "", "0", ok_errors)
    _common.emit(
        NAME, f"{what}, stored / sent", f"{r['stored']} / {r['sent']}", "", "equal", ok_stored
    )
    _common.emit(NAME, f"{what}, p95", round(p95, 1), "ms", f"< {torque.P95_GOAL_MS:g} ms", ok_p95)
    _common.emit(NAME, f"{what}, requests/s", round(requests / r["elapsed"], 1), "/s")
    return ok_errors and ok_stored and ok_p95


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--seconds", type=float, default=30)
    parser.add_argument("--clients", type=int, default=10)
    parser.add_argument("--workers", type=int, default=2, help="gunicorn workers per server")
    args = parser.parse_args()
    if not _common.postgres_answers():
        print("bench/two_servers.py: no PostgreSQL server answers at BENCH_PG_URL", file=sys.stderr)
        return 1
    name = _common.scratch_db_name(NAME)
    with tempfile.TemporaryDirectory(prefix="ampwright-bench-two-") as tmp:
        env = torque.base_env(Path(tmp))
        env["DATABASE_URL"] = _common.pg_url(name)
        _common.pg_admin(f'CREATE DATABASE "{name}"')
        try:
            result = run(env, seconds=args.seconds, clients=args.clients, workers=args.workers)
        finally:
            _common.pg_admin(f'DROP DATABASE IF EXISTS "{name}" WITH (FORCE)')
    ok = report(result, seconds=args.seconds, clients=args.clients, workers=args.workers)
    return 0 if ok else 2


if __name__ == "__main__":
    raise SystemExit(main())
