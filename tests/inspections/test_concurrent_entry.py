"""Tablets entering readings on the same job at the same moment never lose or double a
record: each thread has its own database connection, as each tablet's request does."""

from __future__ import annotations

import threading

import pytest
from django.db import connection

from inspections.models import AuditEvent, Stage, TorqueRecord
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import make_spec_circuit, make_wrench, read, stages_by_kind
from tests.inspections.guards import grant_inspection_roles


@pytest.mark.django_db(transaction=True)
def test_tablets_posting_at_once_store_each_key_exactly_once(evidence_cleared):
    technicians = [make_user(roles.TECHNICIAN) for _ in range(3)]
    grant_inspection_roles()
    job = make_job()
    install = stages_by_kind(job)[Stage.Kind.FIRST_INSTALL]
    terminations = [
        t for _ in range(3) for t in make_spec_circuit(job).terminations.order_by("pk")
    ]  # 12 ends
    wrench = make_wrench()
    first_tablet, second_tablet, third_tablet = technicians
    # Tablet one sends its six readings twice over, from two threads at once (a resend
    # racing the original); tablets two and three send three readings each, once.
    plans = [
        (first_tablet, [(f"a-{i}", terminations[i]) for i in range(6)]),
        (first_tablet, [(f"a-{i}", terminations[i]) for i in reversed(range(6))]),
        (second_tablet, [(f"b-{i}", terminations[6 + i]) for i in range(3)]),
        (third_tablet, [(f"c-{i}", terminations[9 + i]) for i in range(3)]),
    ]
    distinct = {key for _, plan in plans for key, _ in plan}
    start = threading.Barrier(len(plans))
    failures: list[BaseException] = []

    def tablet(technician, plan) -> None:
        try:
            start.wait()
            for key, termination in plan:
                read(
                    termination, install, "10", client_key=key, technician=technician, wrench=wrench
                )
        except BaseException as exc:  # reported by the assertion below
            failures.append(exc)
        finally:
            connection.close()

    threads = [threading.Thread(target=tablet, args=plan) for plan in plans]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=60)

    assert failures == []  # in particular no "database is locked"
    assert TorqueRecord.objects.count() == len(distinct) == 12
    assert set(TorqueRecord.objects.values_list("client_key", flat=True)) == distinct
    assert AuditEvent.objects.filter(kind=AuditEvent.Kind.READING).count() == len(distinct)


@pytest.mark.django_db(transaction=True)
def test_two_tablets_signing_the_same_stage_at_once_leave_one_signature(evidence_cleared):
    from django.core.exceptions import ValidationError

    from inspections.models import SignOff
    from tests.inspections.factories import mark_all, read_all, sign

    technicians = [make_user(roles.TECHNICIAN) for _ in range(2)]
    grant_inspection_roles()
    job = make_job(technicians=technicians)
    install = stages_by_kind(job)[Stage.Kind.FIRST_INSTALL]
    make_spec_circuit(job)
    read_all(install, technician=technicians[0], wrench=make_wrench())
    mark_all(install, by=technicians[0])
    start = threading.Barrier(2)
    outcomes: list[object] = []

    def tablet(technician) -> None:
        try:
            start.wait()
            outcomes.append(sign(install, technician))
        except ValidationError as exc:
            outcomes.append(exc)
        except BaseException as exc:  # reported by the assertion below
            outcomes.append(("unexpected", exc))
        finally:
            connection.close()

    threads = [threading.Thread(target=tablet, args=(t,)) for t in technicians]
    for thread in threads:
        thread.start()
    for thread in threads:
        thread.join(timeout=60)

    refused = [o for o in outcomes if isinstance(o, ValidationError)]
    assert len(outcomes) == 2 and len(refused) == 1, outcomes
    assert "is signed" in " ".join(refused[0].message_dict["stage"])
    assert SignOff.objects.count() == 1
    assert AuditEvent.objects.filter(kind=AuditEvent.Kind.STAGE_SIGNED).count() == 1
