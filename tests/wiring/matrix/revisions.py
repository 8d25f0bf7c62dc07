"""Permission-matrix rows of wiring/views/revisions.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
ROWS: dict[str, tuple[str, str]] = {}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.users, ...)."""
    return {"number": world.job.number}
