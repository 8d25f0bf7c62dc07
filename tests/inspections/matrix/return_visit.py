"""Permission-matrix rows of inspections/views/return_visit.py (see
tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Booking a return visit is the lead's or the office's (who book work in); the world's job
# is not approved, so the page says so (200) and an empty post is refused beside the form
# (200, nothing booked). Marking the build stages not needed is a lead's on a job they may
# write (the office and technicians are refused first); the world's job is no return
# visit, so the page lists why not and an empty post is refused (200).
ROWS: dict[str, tuple[str, str]] = {
    "return_visit_book": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "build_stages_not_needed": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    return {"number": world.job.number}
