"""What the hostile-input tests of the working half share: the checks every answer must
pass, the error messages a re-shown form carries beside its fields, the evidence counts
that a refused post must leave alone, and one world of jobs at every stage, built once per
module.

The hostile values themselves are tests/test_hostile_input.py's (HOSTILE, hostile_values);
the forms are read from each page with tests/html_forms.py, as a browser would submit them.
"""

from __future__ import annotations

import datetime
import re
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass, field
from html.parser import HTMLParser

from django.db import transaction
from django.test import Client, override_settings
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from inspections.models import (
    AuditEvent,
    ChecklistMark,
    SignOff,
    Stage,
    ThermalReading,
    ThermalWaiver,
    TorqueRecord,
)
from shop import roles
from tests.factories import make_job, make_user
from tests.html_forms import _FormReader
from tests.inspections.factories import (
    approved,
    log_soaked_run,
    make_spec_circuit,
    make_wrench,
    mark_all,
    new_key,
    read,
    read_all,
    sign,
    through_install,
)
from tests.test_hostile_input import HOSTILE, MARKUP, hostile_values

__all__ = [
    "FUZZ",
    "HOSTILE",
    "MARKUP",
    "World",
    "assert_sane",
    "build_world",
    "client_for",
    "evidence_counts",
    "fuzz_form",
    "fuzz_query",
    "hostile_values",
    "post_forms",
    "shown_errors",
    "world_scope",
]

# Small on purpose: every page of the working half is tried, each with its own budget.
FUZZ = settings(
    max_examples=25,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
    database=None,
)

# Markup a careless page would hand back as markup; escaped, none of these survive.
_LIVE_MARKUP = ("<script>alert(", "<img src=x onerror")


def assert_sane(response, posted: object = "") -> None:
    """Never a server error, never a traceback, and markup that was sent comes back
    escaped (DEVELOPERS.md, Security; the founders' rule on bad input)."""
    assert response.status_code < 500, (response.status_code, str(posted)[:80])
    if getattr(response, "streaming", False):
        return
    body = response.content.decode("utf-8", "replace")
    assert "Traceback" not in body, str(posted)[:80]
    if not response.get("Content-Type", "").startswith("text/html"):
        # JSON and CSV carry text as data (the offline queue shows it with textContent,
        # static/js/offline-queue.js); only a page that is parsed as HTML must escape it.
        return
    for live in _LIVE_MARKUP:
        if live in str(posted):
            assert live not in body, f"markup came back unescaped: {str(posted)[:80]}"


def evidence_counts() -> dict[str, int]:
    """Rows of every append-only table of the working half: a refused post adds none."""
    from wiring.models import OwnerLink, OwnerLinkVisit, RecordRevision

    models = (
        TorqueRecord,
        ThermalReading,
        ThermalWaiver,
        ChecklistMark,
        SignOff,
        AuditEvent,
        RecordRevision,
        OwnerLink,
        OwnerLinkVisit,
    )
    return {model.__name__: model.objects.count() for model in models}


def post_forms(html: str) -> list[tuple[str, dict[str, list[str]]]]:
    """Every POST form of a page: (action, fields as a browser would submit them)."""
    reader = _FormReader(None)
    reader.feed(html)
    found = []
    for form in reader.forms:
        if form["method"].lower() != "post":
            continue
        data: dict[str, list[str]] = {}
        for name, value in form["fields"]:
            data.setdefault(name, []).append(value)
        found.append((form["action"], data))
    return found


class _ErrorReader(HTMLParser):
    """Collects the text of visible error elements: `.field-error` beside a field (named
    by data-error-for, or by its id `<field>_error` / `id_<field>_error`) and the `.errors`
    box above a form."""

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.found: dict[str, list[str]] = {}
        self._stack: list[tuple[str, str | None]] = []

    def handle_starttag(self, tag, attrs_list) -> None:
        attrs = {k: (v or "") for k, v in attrs_list}
        classes = attrs.get("class", "").split()
        key = None
        if "hidden" not in attrs and ("field-error" in classes or "errors" in classes):
            key = attrs.get("data-error-for") or re.sub(r"^id_|_error$", "", attrs.get("id", ""))
            key = key or "__all__"
        if tag in ("br", "img", "input", "hr", "meta", "link"):
            return
        self._stack.append((tag, key))
        if key is not None:
            self.found.setdefault(key, [])

    def handle_endtag(self, tag) -> None:
        while self._stack:
            if self._stack.pop()[0] == tag:
                break

    def handle_data(self, data) -> None:
        text = data.strip()
        if not text:
            return
        for _tag, key in reversed(self._stack):
            if key is not None:
                self.found[key].append(text)
                return


def shown_errors(html: str) -> dict[str, str]:
    """{field (or "__all__"): the message shown}, visible, non-empty messages only."""
    reader = _ErrorReader()
    reader.feed(html)
    return {k: " ".join(v) for k, v in reader.found.items() if v}


def client_for(user) -> Client:
    client = Client()
    client.force_login(user)
    return client


@dataclass
class World:
    """Jobs at every point of the working half, and the people on them.

    working: first install open, one end read, the others not (entry, correction, sync,
             walking order, checklist marks);
    ready:   first install read and marked, not signed (the sign page's gate is met, so a
             refusal there is the input's);
    retorque: install signed, the heat-cycle run logged and soaked, one retorque reading
             and one temperature taken (thermal readings, send-back, waiver);
    heat:    install signed, the heat-cycle stage open, no run logged;
    to_approve: every stage signed up to the lead's approval;
    approved: approved (reopen, receipt, return visit, the record and owner links);
    return_visit: booked from another approved job, its re-check open."""

    tech: object
    lead: object
    office: object
    admin: object
    wrench: object
    jobs: dict[str, object] = field(default_factory=dict)
    reading: object = None
    thermal: object = None


def build_world() -> World:
    tech = make_user(roles.TECHNICIAN, first_name="Hostile", last_name="Tech")
    lead = make_user(roles.LEAD, first_name="Hostile", last_name="Lead")
    office = make_user(roles.OFFICE, is_staff=True)
    admin = make_user(is_superuser=True, is_staff=True)
    wrench = make_wrench()
    world = World(tech=tech, lead=lead, office=office, admin=admin, wrench=wrench)

    def job(name: str):
        made = make_job(lead=lead, title=f"Hostile {name}")
        made.technicians.add(tech)
        make_spec_circuit(made)
        world.jobs[name] = made
        return made

    working = job("working")
    install = Stage.objects.get(job=working, kind=Stage.Kind.FIRST_INSTALL)
    first_end = working.circuits.first().terminations.order_by("pk").first()
    world.reading = read(first_end, install, "10", technician=tech, wrench=wrench)

    ready = job("ready")
    install = Stage.objects.get(job=ready, kind=Stage.Kind.FIRST_INSTALL)
    read_all(install, technician=tech, wrench=wrench)
    mark_all(install, by=tech)

    heat = job("heat")
    through_install(heat, technician=tech, wrench=wrench)

    retorque = job("retorque")
    through_install(retorque, technician=tech, wrench=wrench)
    run = log_soaked_run(retorque, tech)
    stage = Stage.objects.get(job=retorque, kind=Stage.Kind.RETORQUE)
    end = retorque.circuits.first().terminations.order_by("pk").first()
    read(end, stage, "9", technician=tech, wrench=wrench, found_loose=True)
    from inspections.services import thermal_reading_create

    world.thermal = thermal_reading_create(
        run=run, termination=end, temperature_c="45", by=tech, client_key=new_key()
    )

    to_approve = job("to_approve")
    through_install(to_approve, technician=tech, wrench=wrench)
    log_soaked_run(to_approve, tech)
    stage = Stage.objects.get(job=to_approve, kind=Stage.Kind.RETORQUE)
    read_all(stage, technician=tech, wrench=wrench)
    mark_all(stage, by=tech)
    sign(stage, tech)

    done = make_job(lead=lead, title="Hostile approved")
    done.technicians.add(tech)
    approved(done, technician=tech, lead=lead, wrench=wrench)
    world.jobs["approved"] = done

    # A return visit booked from an earlier approved job: its re-check takes readings
    # beside the record's last ones.
    from inspections.services.return_visit import return_visit_create

    earlier = make_job(lead=lead, title="Hostile earlier build")
    earlier.technicians.add(tech)
    approved(earlier, technician=tech, lead=lead, wrench=wrench)
    visit = return_visit_create(job=earlier, by=lead, title="Hostile re-check")
    visit.technicians.add(tech)
    world.jobs["return_visit"] = visit
    return world


@contextmanager
def world_scope(django_db_blocker, build=build_world) -> Iterator[World]:
    """The world built once for a module inside a transaction rolled back at its end
    (each test runs in a savepoint of its own within it), as tests/test_query_counts.py."""
    with (
        django_db_blocker.unblock(),
        override_settings(PASSWORD_HASHERS=["django.contrib.auth.hashers.MD5PasswordHasher"]),
    ):
        atomic = transaction.atomic()
        atomic.__enter__()
        try:
            yield build()
        finally:
            transaction.set_rollback(True)
            atomic.__exit__(None, None, None)


def today_plus(days: int) -> str:
    return (datetime.date.today() + datetime.timedelta(days=days)).isoformat()


def fuzz_form(
    client,
    page: str,
    *,
    action: str | None = None,
    fill: dict[str, str] | None = None,
    skip: tuple[str, ...] = (),
    snapshot=None,
    files: dict | None = None,
    related: dict[str, tuple[str, ...]] | None = None,
) -> None:
    """Post hostile values, one field at a time, into the form of `page` (the one whose
    action contains `action`), starting from what the page offers plus `fill`.

    Every answer passes assert_sane. A form shown again (200) has refused the post: it
    carries a specific message (beside the field, or one `related` names for it, or
    above the form for the whole post),
    no evidence row was added, and `snapshot()` (what is already saved) is unchanged; a
    200 that did add a row (a page answering in place) carries no error."""
    response = client.get(page)
    assert response.status_code == 200, (page, response.status_code)
    forms = [
        (target, data)
        for target, data in post_forms(response.content.decode())
        if "logout" not in target and (action is None or action in (target or page))
    ]
    assert forms, f"{page} offers no form to post"
    target, baseline = forms[0]
    target = target or page
    baseline = {**baseline, **{k: [v] for k, v in (fill or {}).items()}}
    fields = sorted(k for k in baseline if k != "csrfmiddlewaretoken" and k not in skip)
    assert fields, "the form has no fields to try"

    @FUZZ
    @given(name=st.sampled_from(fields), value=hostile_values)
    def post_one(name: str, value: str) -> None:
        # Each post runs in a savepoint rolled back after it, so every example meets the
        # world as built (an accepted reopen or send-back does not change the next one's).
        with transaction.atomic():
            before = evidence_counts()
            saved = snapshot() if snapshot else None
            data = {**baseline, name: [value], **(files or {})}
            answer = client.post(target, data)
            assert_sane(answer, value)
            if answer.status_code == 200:
                errors = shown_errors(answer.content.decode())
                if evidence_counts() != before:
                    # Accepted and answered in place (a new owner link shows its address once).
                    assert not errors, f"{target}: stored and refused at once: {errors}"
                else:
                    assert errors, f"{target}: {name}={value[:40]!r} refused without a message"
                    # Beside the field that was changed (or one it is checked against), or
                    # in the box above the form for what concerns the whole post.
                    beside = (name, *(related or {}).get(name, ()))
                    assert "__all__" in errors or any(
                        field in key for key in errors for field in beside
                    ), f"{target}: {name}={value[:40]!r} refused beside another field: {errors}"
                    if snapshot:
                        assert snapshot() == saved, f"{target}: a refused post changed a record"
            transaction.set_rollback(True)

    post_one()


def fuzz_query(client, page: str, keys: list[str]) -> None:
    """Hostile values in the query string of a page: never a server error, markup escaped."""

    @FUZZ
    @given(key=st.sampled_from(keys), value=hostile_values)
    def get_one(key: str, value: str) -> None:
        assert_sane(client.get(page, {key: value}), value)

    get_one()
