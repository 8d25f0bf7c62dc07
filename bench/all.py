"""Every benchmark, one after another, and one table of every figure with its goal.

Run by hand (never in the test suite; several minutes in full):

    .venv/bin/python bench/all.py                     # everything, SQLite and PostgreSQL
    .venv/bin/python bench/all.py --quick             # shorter runs, a tenth of the insight data
    .venv/bin/python bench/all.py --skip record,insight --db sqlite
    .venv/bin/python bench/all.py --markdown          # the table as Markdown too (README)

Runs, each in its own process (each is also runnable alone): sizing.py, pages.py (every
page of the large job), torque.py (10 tablets through gunicorn), two_servers.py (two
gunicorn processes on one PostgreSQL database), record.py (the large job's record) and
insight.py (the insight pages over 50,000 readings). Each bench prints its own table as
it goes (shown here line by line, prefixed with its name) and writes its headline figures
to a file (bench/_common.py's emit); the table at the end gathers them: figure, value,
goal, met or NOT met. PostgreSQL parts are skipped when no server answers at BENCH_PG_URL
(default postgres://postgres@127.0.0.1:5432); scratch databases are named
<BENCH_DB_PREFIX>_<bench>_<pid> and dropped afterwards.

The machine it ran on is printed with the table (CPUs, CPU model, memory, load average
before and after): figures from a busy machine mean little. Exit status 0 when every goal
is met, 2 otherwise.
"""

from __future__ import annotations

import argparse
import datetime
import json
import os
import platform
import subprocess
import sys
import tempfile
import time
from pathlib import Path

import _common

BENCH = Path(__file__).resolve().parent
PARTS = ("sizing", "pages", "torque", "two-servers", "record", "insight")


def machine() -> dict[str, str]:
    model = "unknown CPU"
    try:
        for line in Path("/proc/cpuinfo").read_text().splitlines():
            if line.startswith("model name"):
                model = line.split(":", 1)[1].strip()
                break
    except OSError:
        pass
    memory = ""
    try:
        for line in Path("/proc/meminfo").read_text().splitlines():
            if line.startswith("MemTotal:"):
                memory = f"{int(line.split()[1]) / 1024 / 1024:.1f} GiB RAM"
    except OSError:
        pass
    return {
        "cpus": f"{os.cpu_count()} CPUs",
        "model": model,
        "memory": memory,
        "python": f"Python {platform.python_version()}",
        "system": platform.platform(terse=True),
    }


def commands(args) -> list[tuple[str, list[str], dict]]:
    py = sys.executable
    quick = args.quick
    dbs = {"both": "both", "sqlite": "sqlite", "postgres": "postgres"}[args.db]
    seconds = "10" if quick else "30"
    plan = [
        ("sizing", [py, str(BENCH / "sizing.py")], {}),
        (
            "pages",
            [py, str(BENCH / "pages.py"), "--db", dbs]
            + (["--requests", "5", "--max-seconds", "5"] if quick else []),
            {},
        ),
        ("torque", [py, str(BENCH / "torque.py"), "--db", dbs, "--seconds", seconds], {}),
        ("two-servers", [py, str(BENCH / "two_servers.py"), "--seconds", seconds], {}),
        ("record", [py, str(BENCH / "record.py")], {}),
        (
            "insight",
            [py, str(BENCH / "insight.py")] + (["--sqlite-only"] if args.db == "sqlite" else []),
            {"BENCH_SCALE": "0.1"} if quick else {},
        ),
    ]
    skip = {s.strip() for s in args.skip.split(",") if s.strip()}
    if args.db == "sqlite" or not _common.postgres_answers():
        skip.add("two-servers")
    return [p for p in plan if p[0] not in skip]


def run_part(name: str, command: list[str], extra_env: dict, figures: Path) -> tuple[int, float]:
    env = {**os.environ, **extra_env, "BENCH_FIGURES": str(figures)}
    started = time.perf_counter()
    print(f"\n=== {name}: {' '.join(Path(c).name if i < 2 else c for i, c in enumerate(command))}")
    with subprocess.Popen(
        command, env=env, cwd=_common.ROOT, stdout=subprocess.PIPE, stderr=subprocess.STDOUT,
        text=True, bufsize=1,
    ) as proc:  # fmt: skip
        for line in proc.stdout:
            print(f"[{name}] {line}", end="", flush=True)
    return proc.returncode, time.perf_counter() - started


def table(rows: list[dict], *, markdown: bool) -> str:
    def value(row: dict) -> str:
        unit = row.get("unit") or ""
        return f"{row['value']} {unit}".strip()

    def met(row: dict) -> str:
        return {True: "met", False: "NOT met", None: ""}[row.get("met")]

    if markdown:
        lines = ["| figure | value | goal | met |", "|---|---:|---|---|"]
        lines += [f"| {r['figure']} | {value(r)} | {r['goal']} | {met(r)} |" for r in rows]
        return "\n".join(lines)
    width = max([len(r["figure"]) for r in rows] + [6])
    lines = [f"{'figure':<{width}}  {'value':>14}  {'goal':<14}  met"]
    lines += [f"{r['figure']:<{width}}  {value(r):>14}  {r['goal']:<14}  {met(r)}" for r in rows]
    return "\n".join(lines)


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    parser.add_argument("--quick", action="store_true", help="shorter runs, less data")
    parser.add_argument("--db", choices=("sqlite", "postgres", "both"), default="both")
    parser.add_argument("--skip", default="", help=f"comma-separated, of: {', '.join(PARTS)}")
    parser.add_argument("--markdown", action="store_true", help="also print a Markdown table")
    args = parser.parse_args()
    unknown = {s.strip() for s in args.skip.split(",") if s.strip()} - set(PARTS)
    if unknown:
        print(
            f"bench/all.py: unknown part(s) to skip: {', '.join(sorted(unknown))}", file=sys.stderr
        )
        return 1
    before = _common.load_average()
    started = datetime.datetime.now(datetime.UTC)
    rows: list[dict] = []
    durations = []
    with tempfile.TemporaryDirectory(prefix="ampwright-bench-all-") as tmp:
        figures = Path(tmp) / "figures.jsonl"
        figures.touch()
        for name, command, extra_env in commands(args):
            code, seconds = run_part(name, command, extra_env, figures)
            durations.append(f"{name} {seconds:.0f} s")
            lines = figures.read_text().splitlines()
            figures.write_text("")
            part = [json.loads(line) for line in lines if line.strip()]
            if code not in (0, 2) or not part:  # 2: ran, and some goal was not met
                part.append(
                    {"figure": f"{name}: bench exited with status {code}", "value": "",
                     "unit": "", "goal": "runs", "met": False}
                )  # fmt: skip
            rows += part
    info = machine()
    print("\n" + "=" * 72)
    print(
        f"Ampwright benchmarks, {started:%Y-%m-%d %H:%M} UTC{' (quick)' if args.quick else ''}:"
        f" {info['cpus']}, {info['model']}, {info['memory']}; {info['python']}, {info['system']}"
    )
    print(f"{before} before; {_common.load_average()} after")
    print(f"took: {', '.join(durations)}\n")
    print(table(rows, markdown=False))
    if args.markdown:
        print()
        print(table(rows, markdown=True))
    missed = [r for r in rows if r.get("met") is False]
    print(f"\n{len(missed)} goal(s) not met" if missed else "\nevery goal met")
    return 2 if missed else 0


if __name__ == "__main__":
    raise SystemExit(main())
