"""Permission-matrix rows of wiring/views/revisions.py (see tests/test_permission_matrix.py).

Everyone who reads the job reads its issued records; the matrix's job is not approved,
so it has no revision 1 to download (404 for all who may look)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
ROWS: dict[str, tuple[str, str]] = {
    "revision_list": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "revision_download": ("login 404 404 404 404 404", "login 405 405 405 405 405"),
    # Only those who may approve issue the record; the matrix's job is not approved, so
    # the issue is refused with a message and the page shown again (302).
    "record_issue_now": ("login 405 405 405 405 405", "login 403 403 302 403 302"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.users, ...)."""
    if name == "revision_download":
        return {"number": world.job.number, "revision": 1}
    return {"number": world.job.number}
