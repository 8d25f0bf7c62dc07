"""Permission-matrix rows of reminders/views.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Leads and office read the re-checks due; technicians do not. The page only reads.
ROWS: dict[str, tuple[str, str]] = {
    "rechecks_due": ("login 403 403 200 200 200", "login 405 405 405 405 405"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {}
