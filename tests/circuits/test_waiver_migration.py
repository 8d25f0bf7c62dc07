"""Migration circuits/0003 keeps the waivers given before waivers recorded their facts:
every row and its columns survive, with no recorded facts, so each is shown as needing
renewal instead of covering a circuit that may have changed since."""

from __future__ import annotations

import pytest
from django.db import connection
from django.db.migrations.executor import MigrationExecutor

from circuits.system import job_system_report
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

# Schema changes need real transactions (SQLite cannot alter tables inside the test's).
pytestmark = pytest.mark.django_db(transaction=True)

BEFORE = [("circuits", "0002_roles")]
AFTER = [("circuits", "0003_waiver_facts_and_history")]
REASON = "Owner supplied solid lead to a removable lamp; replaced at next service."


def _migrate(targets):
    executor = MigrationExecutor(connection)
    executor.loader.build_graph()
    executor.migrate(targets)
    return executor.loader.project_state(targets).apps


def _migrate_to_latest() -> None:
    """Every app's newest migration: going back to circuits/0002 also unapplied the
    migrations of other apps built on it, and the tests after this one expect them."""
    executor = MigrationExecutor(connection)
    executor.loader.build_graph()
    executor.migrate(executor.loader.graph.leaf_nodes())


def test_migration_keeps_existing_waivers_and_asks_for_renewal(lead):
    job = make_job()
    make_circuit(job, make_device(job), make_device(job), tag="D-01", construction="solid")
    try:
        old_apps = _migrate(BEFORE)
        OldWaiver = old_apps.get_model("circuits", "Waiver")
        OldWaiver.objects.create(
            job_id=job.pk, code="CONSTRUCTION_SOLID", subject="D-01", reason=REASON, lead_id=lead.pk
        )
        new_apps = _migrate(AFTER)
    finally:
        _migrate_to_latest()  # leave the schema as the other tests expect it
    NewWaiver = new_apps.get_model("circuits", "Waiver")
    [kept] = NewWaiver.objects.all()
    assert (kept.code, kept.subject, kept.reason, kept.lead_id) == (
        "CONSTRUCTION_SOLID",
        "D-01",
        REASON,
        lead.pk,
    )
    assert kept.facts_hash == "" and kept.facts == {}
    assert kept.withdrawn_at is None and kept.superseded_at is None
    [found] = [f for f in job_system_report(job).all_findings if f.code == "CONSTRUCTION_SOLID"]
    assert not found.waived and found.open_blocking
    assert found.lapsed_waiver.pk == kept.pk
    assert "renew it" in found.lapse_note
