"""Permission-matrix rows of inspections/views/review.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# The queue is the leads'; a job's review page and timeline are read by everyone who reads
# the job (only leads get the buttons); waiving a hot connection is a lead's. The world
# has no temperature reading: a lead (and a superuser) get past the permission check to
# the lookup and find none (404); everyone else is refused first (403).
ROWS: dict[str, tuple[str, str]] = {
    "review_queue": ("login 403 403 200 403 200", "login 405 405 405 405 405"),
    "job_review": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "thermal_waive": ("login 403 403 404 403 404", "login 403 403 404 403 404"),
    "job_timeline": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
}

NO_SUCH_READING = 999_999


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    if name == "review_queue":
        return {}
    if name == "thermal_waive":
        return {"number": world.job.number, "pk": NO_SUCH_READING}
    return {"number": world.job.number}
