"""Permission-matrix rows of inspections/views/calibration.py (see
tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Everyone who reads the wrenches reads their calibrations; whoever changes wrenches (the
# office, a superuser) records one. An empty POST records nothing: the form answers
# with its errors (200).
ROWS: dict[str, tuple[str, str]] = {
    "wrench_calibrations": ("login 200 200 200 200 200", "login 403 403 403 200 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {"pk": world.reading.wrench.pk}
