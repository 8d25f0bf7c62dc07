"""Permission-matrix rows of inspections/views/signing.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

from inspections.models import Stage

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Signing is the assigned technician's or a lead's (the office signs nothing; a stranger
# is not on the job); sending back, approval and reopen are a lead's; the owner's receipt
# is taken on the tablet of any staff member who may write the job. An empty POST saves
# nothing: the page answers with the service's messages (200).
ROWS: dict[str, tuple[str, str]] = {
    "stage_sign": ("login 200 403 200 403 200", "login 200 403 200 403 200"),
    "stage_send_back": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "job_approve": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "job_reopen": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "handover_receipt": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    if name in ("stage_sign", "stage_send_back"):
        return {"number": world.job.number, "kind": int(Stage.Kind.FIRST_INSTALL)}
    return {"number": world.job.number}
