"""Benchmark: size 300 varied circuits (recommendation plus findings).

Run: python bench/sizing.py
Target on the development machine: under 50 ms for all 300 together. Prints the
best and median of several passes; not a test (no timed tests in the suite).
"""

from __future__ import annotations

import random
import statistics
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

import _common  # noqa: E402

from circuits.sizing import CircuitInput, catalogue, size_circuit  # noqa: E402
from circuits.sizing.protection import STANDARD_RATINGS_A  # noqa: E402

CIRCUITS = 300
PASSES = 15
BUDGET_MS = 50.0


def varied_circuits(seed: int = 3) -> list[CircuitInput]:
    """A fixed, varied mix: DC and AC, short and long runs, light and heavy loads,
    engine spaces, bundles, parallel runs, given sizes and fuses, metric sizes."""
    rng = random.Random(seed)
    sizes = catalogue()
    out: list[CircuitInput] = []
    for _ in range(CIRCUITS):
        ac = rng.random() < 0.25
        size = rng.choice(sizes) if rng.random() < 0.5 else None
        out.append(
            CircuitInput(
                system_voltage_v=rng.choice((120.0, 230.0) if ac else (12.0, 24.0, 48.0)),
                current_a=rng.uniform(0.5, 400.0),
                length_m=rng.uniform(0.3, 25.0),
                size=size,
                size_text=size.label.split(" ")[0] if size is not None else None,
                insulation_c=rng.choice((60, 75, 90, 105, 105, 125, 200)),
                engine_space=rng.random() < 0.2,
                bundled=rng.choice((1, 1, 1, 3, 5, 10)),
                parallel=rng.choice((1, 1, 1, 2)),
                critical=rng.random() < 0.4,
                continuous=rng.random() < 0.3,
                protection_a=rng.choice(STANDARD_RATINGS_A[:40]) if rng.random() < 0.3 else None,
                tinned=rng.random() < 0.5,
                ac=ac,
                metric=rng.random() < 0.15,
            )
        )
    return out


def main() -> int:
    circuits = varied_circuits()
    timings_ms: list[float] = []
    findings = 0
    for _ in range(PASSES):
        start = time.perf_counter()
        reports = [size_circuit(inp) for inp in circuits]
        timings_ms.append((time.perf_counter() - start) * 1000.0)
        findings = sum(len(r.findings) for r in reports)
    best = min(timings_ms)
    median = statistics.median(timings_ms)
    verdict = "within" if median < BUDGET_MS else "OVER"
    print(
        f"sized {CIRCUITS} circuits (recommendation + findings, {findings} findings): "
        f"first pass {timings_ms[0]:.1f} ms, best {best:.1f} ms, median {median:.1f} ms "
        f"over {PASSES} passes "
        f"({verdict} the {BUDGET_MS:g} ms budget)"
    )
    _common.emit(
        "sizing", f"size {CIRCUITS} circuits, median of {PASSES}", round(median, 1), "ms",
        f"< {BUDGET_MS:g} ms", median < BUDGET_MS,
    )  # fmt: skip
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
