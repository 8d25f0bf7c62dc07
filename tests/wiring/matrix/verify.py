"""Permission-matrix rows of wiring/views/verify.py (see tests/test_permission_matrix.py).

The verify page is public: anyone may upload a PDF; an empty POST says to choose a file."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
ROWS: dict[str, tuple[str, str]] = {
    "record_verify": ("200 200 200 200 200 200", "200 200 200 200 200 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.users, ...)."""
    return {}
