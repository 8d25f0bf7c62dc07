"""Permission-matrix rows of wiring/views/record.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

from inspections.models import Stage

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# The preview and the stage sheet are read by everyone who may read the job; both are
# GET only.
ROWS: dict[str, tuple[str, str]] = {
    "record_preview": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "stage_sheet": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.users, ...)."""
    if name == "stage_sheet":
        return {"number": world.job.number, "kind": Stage.Kind.FIRST_INSTALL}
    return {"number": world.job.number}
