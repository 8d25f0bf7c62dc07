"""Permission-matrix rows of insights/views/loosening.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
ROWS: dict[str, tuple[str, str]] = {
    "insights_loosening": ("login 403 403 200 200 200", "login 405 405 405 405 405"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {}
