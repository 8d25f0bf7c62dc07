"""Shared fixtures for the inspections tests: a job with its stages, a circuit whose ends
carry a 10 N·m ±10 % spec, a calibrated wrench; the retorque opened the way the shop
opens it (a heat-cycle run logged longer ago than the soak)."""

from __future__ import annotations

import pytest

from inspections.models import Stage
from tests.factories import make_job
from tests.inspections.factories import (
    log_soaked_run,
    make_spec_circuit,
    make_wrench,
    open_stage,
    stages_by_kind,
)
from tests.inspections.guards import clear_evidence


@pytest.fixture
def job(db):
    return make_job()


@pytest.fixture
def stages(job):
    return stages_by_kind(job)


@pytest.fixture
def install(stages):
    return stages[Stage.Kind.FIRST_INSTALL]


@pytest.fixture
def heat_stage(stages):
    return open_stage(stages[Stage.Kind.HEAT_CYCLE])


@pytest.fixture
def retorque(stages, job, technician):
    log_soaked_run(job, technician)
    return Stage.objects.get(pk=stages[Stage.Kind.RETORQUE].pk)


@pytest.fixture
def circuit(job):
    return make_spec_circuit(job)


@pytest.fixture
def terminations(circuit):
    return list(circuit.terminations.order_by("pk"))


@pytest.fixture
def termination(terminations):
    return terminations[0]


@pytest.fixture
def wrench(db):
    return make_wrench()


@pytest.fixture
def evidence_cleared(transactional_db):
    """For transactional tests that write evidence: clears it before the runner's flush
    (set up after the database, so torn down before it)."""
    yield
    clear_evidence()
