"""Permission-matrix rows of inspections/views/checklists.py (tests/test_permission_matrix.py)."""

from __future__ import annotations

from inspections.models import Stage

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Everyone who reads the job reads its checklists; the assigned technician and leads mark
# items (the office marks nothing; a stranger is not on the job). Marking is POST only;
# an empty POST saves nothing and the page shows why (200).
ROWS: dict[str, tuple[str, str]] = {
    "stage_checklist": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "checklist_mark": ("login 405 405 405 405 405", "login 200 403 200 403 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    return {"number": world.job.number, "kind": int(Stage.Kind.FIRST_INSTALL)}
