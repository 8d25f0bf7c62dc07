"""Permission-matrix rows of inspections/views/heat.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Everyone who reads the job reads the run and the temperatures; the assigned technician
# and leads log the run and take temperatures (the office records neither; a stranger is
# not on the job). An empty POST saves nothing: the page answers with its messages (200).
ROWS: dict[str, tuple[str, str]] = {
    "heat_cycle_log": ("login 200 200 200 200 200", "login 200 403 200 403 200"),
    "thermal_readings": ("login 200 200 200 200 200", "login 200 403 200 403 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    return {"number": world.job.number}
