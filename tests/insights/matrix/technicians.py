"""Permission-matrix rows of insights/views/technicians.py (see tests/test_permission_matrix.py).

Leads only: the per-technician figures are for coaching, never shown to technicians nor to
the office."""

from __future__ import annotations

ROWS: dict[str, tuple[str, str]] = {
    "insights_technicians": ("login 403 403 200 403 200", "login 405 405 405 405 405"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {}
