"""Every page of a job and of its stages answers in a number of queries that does not grow
with the job: the same page of a 3-circuit job and of a 30-circuit job (ten times the
devices, terminations, readings, thermal readings and checklist marks) stays within one
bound. A page whose count grows with the circuits runs one query per row (an N+1), which
on a shop's 150-circuit job means hundreds of queries for one tablet page.

The bounds are the count measured on the small job plus a little headroom (HEADROOM), so
that a page gaining a query of its own does not fail here while a per-row query, which
adds at least 27 between the two sizes, always does. Timings live in bench/pages.py,
never here (no timed tests).
"""

from __future__ import annotations

import datetime
import itertools
import uuid

import pytest
from django.db import connection, transaction
from django.test import Client, override_settings
from django.urls import URLPattern, URLResolver, get_resolver, reverse

from circuits.models import Termination
from inspections.models import Stage, ThermalReading, TorqueRecord
from inspections.services import thermal_reading_create
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    log_soaked_run,
    make_wrench,
    read,
    read_all,
    through_install,
)
from wiring.services import owner_link_create

SIZES = {"small": 3, "large": 30}
HEADROOM = 4  # also covers the session save the idle timeout makes once a minute

# (URL name, persona, record the address names, stage kinds) -> bound on queries.
# Personas: the job's technician, a lead, office staff, or nobody signed in.
FIRST, HEAT, RETORQUE, HANDOVER = 1, 2, 3, 4
PAGES: dict[tuple[str, str, str | None, int | None], int] = {
    ("job_list", "tech", None, None): 7,
    ("review_queue", "lead", None, None): 6,
    ("job_detail", "tech", None, None): 33,
    ("job_edit", "lead", None, None): 10,
    ("circuit_schedule", "tech", None, None): 12,
    ("circuit_new", "tech", None, None): 12,
    ("circuit_edit", "tech", "circuit", None): 22,
    ("circuit_delete", "lead", "circuit", None): 10,
    ("device_list", "tech", None, None): 9,
    ("device_new", "tech", None, None): 8,
    ("device_detail", "tech", "device", None): 12,
    ("device_edit", "tech", "device", None): 11,
    ("device_delete", "lead", "device", None): 12,
    ("termination_edit", "tech", "termination", None): 9,
    ("job_diagram_svg", "tech", None, None): 10,
    ("circuit_labels", "tech", None, None): 9,
    ("circuit_csv_export", "tech", None, None): 7,
    ("circuit_csv_import", "tech", None, None): 8,
    ("stage_work", "tech", None, FIRST): 21,
    ("stage_work", "tech", None, RETORQUE): 21,
    ("torque_entry", "tech", "termination", None): 22,
    ("torque_correct", "tech", "reading", None): 12,
    ("walking_order", "tech", None, None): 9,
    ("heat_cycle_log", "tech", None, None): 17,
    ("thermal_readings", "tech", None, None): 16,
    ("stage_checklist", "tech", None, FIRST): 16,
    ("stage_checklist", "tech", None, HEAT): 13,
    ("stage_checklist", "tech", None, RETORQUE): 17,
    ("stage_checklist", "tech", None, HANDOVER): 13,
    ("stage_sign", "tech", None, FIRST): 28,
    ("stage_sign", "tech", None, RETORQUE): 27,
    ("stage_sign", "tech", None, HANDOVER): 9,
    ("stage_send_back", "lead", None, FIRST): 9,
    ("stage_send_back", "lead", None, RETORQUE): 9,
    ("job_approve", "lead", None, None): 28,
    ("job_reopen", "lead", None, None): 8,
    ("handover_receipt", "tech", None, None): 8,
    ("job_review", "lead", None, None): 67,
    ("thermal_waive", "lead", "thermal", None): 11,
    ("job_timeline", "tech", None, None): 9,
    ("record_preview", "tech", None, None): 48,
    ("stage_sheet", "tech", None, FIRST): 20,
    ("stage_sheet", "tech", None, RETORQUE): 32,
    ("revision_list", "tech", None, None): 9,
    ("owner_links", "office", None, None): 10,
    ("owner_record", "anon", "token", None): 8,
    ("return_visit_book", "lead", None, None): 8,
    ("build_stages_not_needed", "lead", None, None): 10,
}

# Pages whose count still grows with the job, each with why it is not fixed here.
GROWING: dict[tuple[str, str, str | None, int | None], str] = {}

# Addresses with the job's number that take no GET (posts, downloads of an issued file).
NOT_PAGES = {
    "circuit_preview",  # the live panel: POST only
    "waiver_new",  # POST only
    "waiver_delete",  # needs a waiver; the confirm step is the job_review page's
    "torque_sync",  # the offline queue's JSON endpoint: POST only
    "checklist_mark",  # POST only
    "record_issue_now",  # POST only
    "revision_download",  # an issued revision's stored PDF: served as stored
    "owner_link_revoke",  # POST only
    "owner_link_send",  # POST only
}

_seq = itertools.count(1)


def _build(circuits: int, people: dict) -> dict:
    """A job of `circuits` circuits across circuits // 3 + 2 busbars (four ends each): the
    first install read, marked and signed; the heat-cycle run logged; every end read at
    retorque (every other one found loose first) and its temperature taken; an owner's link."""
    job = make_job(lead=people["lead"])
    wrench = make_wrench()
    devices = []
    for _ in range(circuits // 3 + 2):
        device = make_device(job, name=f"Bus {next(_seq)}", kind="busbar")
        for name, polarity in (("+", "pos"), ("-", "neg")):
            make_terminal(
                device, name=name, polarity=polarity, manual_torque_value=10,
                manual_torque_unit="N*m",
            )  # fmt: skip
        devices.append(device)
    for n in range(circuits):
        make_circuit(
            job, devices[n % len(devices)], devices[(n + 1) % len(devices)], tag=f"Q-{n + 1:02d}"
        )
    through_install(job, technician=people["tech"], wrench=wrench)
    run = log_soaked_run(job, people["tech"])
    retorque = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE)
    ends = list(Termination.objects.filter(circuit__job=job).order_by("pk"))
    for end in ends[1::2]:
        read(end, retorque, "9", technician=people["tech"], wrench=wrench, found_loose=True)
    read_all(retorque, technician=people["tech"], wrench=wrench)
    for i, end in enumerate(ends):
        thermal_reading_create(
            run=run, termination=end, temperature_c=str(30 + i % 20), by=people["tech"],
            client_key=str(uuid.uuid4()),
        )  # fmt: skip
    _link, token = owner_link_create(
        job=job, by=people["office"], expires_on=datetime.date.today() + datetime.timedelta(30)
    )
    first = Termination.objects.filter(circuit__job=job).order_by("circuit__tag", "pk").first()
    return {
        "job": job,
        "circuit": first.circuit_id,
        "device": devices[0].pk,
        "termination": first.pk,
        "reading": TorqueRecord.objects.filter(termination=first).latest("pk").pk,
        "thermal": ThermalReading.objects.filter(termination=first).latest("pk").pk,
        "token": token,
    }


@pytest.fixture(scope="module")
def world(django_db_setup, django_db_blocker):
    """Both jobs, built once for the module inside a transaction rolled back at its end
    (each test runs in a savepoint of its own within it)."""
    with (
        django_db_blocker.unblock(),
        override_settings(PASSWORD_HASHERS=["django.contrib.auth.hashers.MD5PasswordHasher"]),
    ):
        atomic = transaction.atomic()
        atomic.__enter__()
        try:
            people = {
                "tech": make_user(roles.TECHNICIAN),
                "lead": make_user(roles.LEAD),
                "office": make_user(roles.OFFICE, is_staff=True),
            }
            jobs = {size: _build(n, people) for size, n in SIZES.items()}
            for data in jobs.values():
                data["job"].technicians.add(people["tech"])
            yield {"people": people, "jobs": jobs}
        finally:
            transaction.set_rollback(True)
            atomic.__exit__(None, None, None)


def _address(page: tuple, data: dict) -> str:
    name, _persona, record, kind = page
    if name == "owner_record":
        return reverse(name, kwargs={"token": data["token"]})
    if name in ("job_list", "review_queue"):
        return reverse(name)
    kwargs: dict[str, object] = {"number": data["job"].number}
    if record is not None:
        kwargs["pk"] = data[record]
    if kind is not None and name == "stage_work":
        return reverse(name, kwargs=kwargs) + f"?stage={kind}"
    if kind is not None:
        kwargs["kind"] = kind
    return reverse(name, kwargs=kwargs)


def _label(page: tuple) -> str:
    name, persona, _record, kind = page
    return f"{name}{'' if kind is None else f'[{kind}]'}-{persona}"


def _body(response) -> bytes:
    if getattr(response, "streaming", False):
        return b"".join(response.streaming_content)
    return response.content


@pytest.mark.parametrize("size", SIZES)
@pytest.mark.parametrize(
    "job_page",
    [
        pytest.param(p, marks=pytest.mark.xfail(strict=True, reason=GROWING[p]))
        if p in GROWING
        else p
        for p in PAGES
    ],
    ids=_label,
)
def test_page_queries_do_not_grow_with_the_job(
    job_page, size, world, db, django_assert_max_num_queries
):
    client = Client()
    persona = job_page[1]
    if persona != "anon":
        client.force_login(world["people"][persona])
    address = _address(job_page, world["jobs"][size])
    client.get(address)  # warm: the first request of a session fills what later ones reuse
    connection.queries_log.clear()  # once full (9,000 entries) it would count nothing
    with django_assert_max_num_queries(PAGES[job_page] + HEADROOM):
        response = client.get(address)
        _body(response)
    assert response.status_code in (200, 302), (address, response.status_code)


def test_every_page_of_a_job_has_a_bound():
    """A new page under /jobs/<number>/ is added to PAGES (or NOT_PAGES) with its bound."""

    def names(entries, prefix=""):
        for entry in entries:
            if isinstance(entry, URLResolver):
                if entry.namespace != "admin":
                    yield from names(entry.url_patterns, prefix + str(entry.pattern))
            elif isinstance(entry, URLPattern) and "<str:number>" in prefix + str(entry.pattern):
                yield entry.name

    listed = {name for name, *_ in PAGES} | NOT_PAGES
    assert sorted(set(names(get_resolver().url_patterns)) - listed) == []
