"""Whole-system rules, run across a job's devices and circuits on every evaluation.

Each rule is a function `(devices, circuits, vehicle) -> list[SystemFinding]`.
"""

from __future__ import annotations

RULES: list = []
