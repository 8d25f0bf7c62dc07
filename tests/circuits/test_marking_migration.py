"""Migration circuits/0006 carries each ticked "tape re-marked" over to the per-conductor
re-marking: tape at both ends of the positive / line (the earth of an earth-only or
bonding circuit, the negative of a negative-only one), in the colour recorded for it.
Nothing else about the circuit changes."""

from __future__ import annotations

import pytest
from django.db import connection
from django.db.migrations.executor import MigrationExecutor

from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

# Schema changes need real transactions (SQLite cannot alter tables inside the test's).
pytestmark = pytest.mark.django_db(transaction=True)

BEFORE = [("circuits", "0005_conductor_marking_external_supply")]
AFTER = [("circuits", "0007_remove_circuit_tape_remarked")]


def _migrate(targets):
    executor = MigrationExecutor(connection)
    executor.loader.build_graph()
    executor.migrate(targets)
    return executor.loader.project_state(targets).apps


def _migrate_to_latest() -> None:
    executor = MigrationExecutor(connection)
    executor.loader.build_graph()
    executor.migrate(executor.loader.graph.leaf_nodes())


def test_a_ticked_tape_remarked_becomes_a_tape_marking():
    job = make_job()
    a, b = make_device(job), make_device(job)
    pair = make_circuit(job, a, b, tag="D-01", colour_a="red", colour_b="black")
    earth = make_circuit(job, a, b, tag="E-01", role="bonding", conductors="earth",
                         design_current_a=1, protection_type="none",
                         colour_earth="green")  # fmt: skip
    plain = make_circuit(job, a, b, tag="D-02")
    try:
        old = _migrate(BEFORE).get_model("circuits", "Circuit")
        old.objects.filter(pk__in=[pair.pk, earth.pk]).update(tape_remarked=True)
        new = _migrate(AFTER).get_model("circuits", "Circuit")
    finally:
        _migrate_to_latest()  # leave the schema as the other tests expect it
    row = new.objects.get(pk=pair.pk)
    assert (row.marking_a_method, row.marking_a_colour, row.marking_a_ends) == (
        "tape", "red", "both")  # fmt: skip
    assert (row.colour_a, row.colour_b, row.marking_b_method) == ("red", "black", "")
    row = new.objects.get(pk=earth.pk)
    assert (row.marking_earth_method, row.marking_earth_colour) == ("tape", "green")
    row = new.objects.get(pk=plain.pk)
    assert not (row.marking_a_method or row.marking_b_method or row.marking_earth_method)
