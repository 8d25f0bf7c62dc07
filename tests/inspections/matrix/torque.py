"""Permission-matrix rows of inspections/views/torque.py (see tests/test_permission_matrix.py)."""

from __future__ import annotations

# name: (GET outcomes, POST outcomes) for anon tech stranger lead office super.
# Everyone who reads the job sees its work list. Readings and corrections are the
# assigned technician's or a lead's (the office records none; a stranger is not on the
# job); an empty POST saves nothing and answers with the service's messages (200), or a
# 400 from the queue's endpoint, which takes JSON only. A label scan never writes: it
# sends each reader on (to the entry, or to the circuit's page). The walking order is
# part of the job's system: whoever may edit the job's devices may reorder them.
ROWS: dict[str, tuple[str, str]] = {
    "stage_work": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "torque_entry": ("login 200 403 200 403 200", "login 200 403 200 403 200"),
    "torque_correct": ("login 200 403 200 403 200", "login 200 403 200 403 200"),
    "torque_sync": ("login 405 405 405 405 405", "login 400 403 400 403 400"),
    "label_scan": ("login 302 302 302 302 302", "login 405 405 405 405 405"),
    "walking_order": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
}


def kwargs(world, name: str) -> dict[str, object]:
    """The URL kwargs of page `name` in the matrix's world (world.job, world.termination,
    world.reading, world.circuit, world.device, world.users, ...)."""
    if name == "torque_entry":
        return {"number": world.job.number, "pk": world.termination.pk}
    if name == "torque_correct":
        return {"number": world.job.number, "pk": world.reading.pk}
    if name == "label_scan":
        return {"pk": world.circuit.pk, "end": "from"}
    return {"number": world.job.number}
