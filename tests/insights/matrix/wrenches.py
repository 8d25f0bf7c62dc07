"""Permission-matrix rows of insights/views/wrenches.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

ROWS: dict[str, tuple[str, str]] = {
    "insights_wrenches": ("login 403 403 200 200 200", "login 405 405 405 405 405"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {}
