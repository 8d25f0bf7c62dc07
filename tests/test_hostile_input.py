"""Hostile and careless input, posted into every field of every form and the live preview,
and random argument lists given to `manage.py size`: never a server error or traceback, and
markup always comes back escaped.

Each form starts from what its page offers (tests/html_forms.py); hypothesis then replaces
one field at a time with a hostile value. Runs on SQLite and, in CI's second pass, on
PostgreSQL (which refuses NUL characters and out-of-range integers in queries)."""

from __future__ import annotations

import io
from dataclasses import dataclass

import pytest
from django.test import Client
from django.urls import reverse
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from circuits.management.commands.size import Command as SizeCommand
from circuits.models import Device, TorqueDefault
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user
from tests.html_forms import form_fields

pytestmark = pytest.mark.django_db

MARKUP = '<script>alert("x")</script><img src=x onerror=alert(1)>'
HOSTILE = [
    "",
    " ",
    "0",
    "-1",
    "-0",
    "1e308",
    "-1e308",
    "1e-300",
    "9" * 400,
    "NaN",
    "nan",
    "inf",
    "-Infinity",
    "²",
    "١٢",  # Arabic-Indic digits
    "٣.٥ m",
    "१०",  # Devanagari digits
    "\x00",
    "10\x00",
    "x" * 10_000,
    "1" * 10_000,
    MARKUP,
    "'; DROP TABLE shop_job; --",
    '" OR 1=1 --',
    "10 parsecs",
    "10 A",
    "10 kg",
    "10 m**(9**9**9)",
    "10 (",
    "10 m/0",
    "10 'ft'",
    "10 ft ft",
    "1,2,3 m",
    "1..2 m",
    "1e999999 m",
    "10e m",
    "0x1f",
    "{{ 7*7 }}",
    "%s%s%s",
    "../../etc/passwd",
    "𝟙𝟘 m",  # mathematical bold digits (Unicode category Nd)
    "\u202e01 m",
    "999999999999999999999999",
    str(10**308),
    "-9223372036854775809",
    "true",
    "on",
    "[]",
    "{}",
]
hostile_values = st.one_of(
    st.sampled_from(HOSTILE),
    st.text(max_size=60),
    st.text(alphabet=st.characters(codec="utf-8"), min_size=1, max_size=20).map(lambda s: f"1{s}"),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(min_value=-(10**30), max_value=10**30).map(str),
)

FUZZ = settings(
    max_examples=30,
    deadline=None,
    suppress_health_check=[HealthCheck.function_scoped_fixture, HealthCheck.too_slow],
    database=None,
)


@dataclass
class World:
    job: object
    circuit: object
    device: object
    termination: object
    spec: object
    owner: object
    vehicle: object


@pytest.fixture
def world(db) -> World:
    job = make_job()
    busbar = make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_terminal(busbar, name="B+", polarity="pos", stud_size="M8")
    fridge = make_device(job, name="Fridge")
    circuit = make_circuit(job, busbar, fridge, tag="D-01")
    spec = TorqueDefault.objects.create(
        stud_size="M8", kind="lug", value=10, unit="N·m", tolerance_pct=10, source="test spec"
    )
    return World(
        job=job,
        circuit=circuit,
        device=busbar,
        termination=circuit.terminations.first(),
        spec=spec,
        owner=job.vehicle.owner,
        vehicle=job.vehicle,
    )


@pytest.fixture
def admin_client(db) -> Client:
    client = Client()
    client.force_login(make_user(is_superuser=True, is_staff=True))
    return client


# (name, page to read the form from, address to post to); addresses are built from the world.
FORMS = {
    "owner_new": lambda w: (reverse("owner_new"),) * 2,
    "owner_edit": lambda w: (reverse("owner_edit", args=[w.owner.pk]),) * 2,
    "vehicle_new": lambda w: (reverse("vehicle_new"),) * 2,
    "vehicle_edit": lambda w: (reverse("vehicle_edit", args=[w.vehicle.pk]),) * 2,
    "job_new": lambda w: (reverse("job_new"),) * 2,
    "job_edit": lambda w: (reverse("job_edit", args=[w.job.number]),) * 2,
    "circuit_new": lambda w: (reverse("circuit_new", args=[w.job.number]),) * 2,
    "circuit_edit": lambda w: (reverse("circuit_edit", args=[w.job.number, w.circuit.pk]),) * 2,
    "circuit_preview": lambda w: (
        reverse("circuit_edit", args=[w.job.number, w.circuit.pk]),
        reverse("circuit_preview", args=[w.job.number]) + f"?circuit={w.circuit.pk}",
    ),
    "device_new": lambda w: (reverse("device_new", args=[w.job.number]),) * 2,
    "device_edit": lambda w: (reverse("device_edit", args=[w.job.number, w.device.pk]),) * 2,
    "termination_edit": lambda w: (
        (reverse("termination_edit", args=[w.job.number, w.termination.pk]),) * 2
    ),
    "torque_default_new": lambda w: (reverse("torque_default_new"),) * 2,
    "torque_default_edit": lambda w: (reverse("torque_default_edit", args=[w.spec.pk]),) * 2,
}


def _assert_sane(response, posted: str) -> None:
    assert response.status_code < 500, (response.status_code, posted[:80])
    body = response.content.decode("utf-8", "replace")
    assert "Traceback" not in body
    if posted and "<script>" in posted:
        assert "<script>alert(" not in body, "markup came back unescaped"


@pytest.mark.parametrize("name", sorted(FORMS))
def test_no_field_of_any_form_gives_a_server_error(name, world, admin_client):
    page, target = FORMS[name](world)
    response = admin_client.get(page)
    assert response.status_code == 200
    action = target.split("?")[0] if name != "circuit_preview" else None
    baseline = form_fields(response.content.decode(), action_contains=action)
    fields = sorted(k for k in baseline if k != "csrfmiddlewaretoken")
    assert fields, "the form has no fields to try"

    @FUZZ
    @given(field=st.sampled_from(fields), value=hostile_values)
    def post_one(field: str, value: str) -> None:
        data = {**baseline, field: [value]}
        _assert_sane(admin_client.post(target, data), value)

    post_one()


@pytest.mark.parametrize(
    "name", ["job_list", "owner_list", "circuit_schedule", "circuit_labels", "circuit_new"]
)
def test_no_query_parameter_gives_a_server_error(name, world, admin_client):
    needs_job = name in ("circuit_schedule", "circuit_labels", "circuit_new")
    address = reverse(name, args=[world.job.number] if needs_job else [])
    keys = ["q", "status", "page", "sort", "circuit", "one", "vehicle", "next"]

    @FUZZ
    @given(key=st.sampled_from(keys), value=hostile_values)
    def get_one(key: str, value: str) -> None:
        _assert_sane(admin_client.get(address, {key: value}), value)

    get_one()


@FUZZ
@given(number=hostile_values)
def test_no_job_number_in_the_path_gives_a_server_error(number, admin_client):
    from urllib.parse import quote

    response = admin_client.get("/jobs/" + quote(number or "x", safe="") + "/")
    assert response.status_code in (400, 404)


@pytest.mark.parametrize("field", ["from_device", "to_device", "from_terminal", "parallel"])
@pytest.mark.parametrize("value", [str(10**308), "-1", "²", "1e5", "9223372036854775808"])
def test_huge_or_odd_ids_in_the_circuit_form_are_field_errors(field, value, world, admin_client):
    page = reverse("circuit_edit", args=[world.job.number, world.circuit.pk])
    baseline = form_fields(admin_client.get(page).content.decode(), action_contains=page)
    response = admin_client.post(page, {**baseline, field: [value]})
    assert response.status_code == 200  # the form again, with the message beside the field
    world.circuit.refresh_from_db()
    assert world.circuit.from_device_id == world.device.pk  # nothing saved changed


def _run_size(argv: list[str]) -> tuple[int, str]:
    """Run `manage.py size` in this process as the shell would; (exit status, stderr)."""
    out, err = io.StringIO(), io.StringIO()
    command = SizeCommand(stdout=out, stderr=err)
    try:
        command.run_from_argv(["manage.py", "size", *argv])
    except SystemExit as exc:
        return int(exc.code or 0), err.getvalue()
    return 0, err.getvalue()


size_flags = st.sampled_from(
    [
        "--volts",
        "--amps",
        "--length",
        "--size",
        "--insulation",
        "--bundled",
        "--parallel",
        "--protection",
        "--engine-space",
        "--drop",
        "--critical",
        "--temp",
        "--ambient",
        "--ac",
        "--metric",
        "--json",
        "--nonsense",
        "-x",
    ]
)


@settings(max_examples=150, deadline=None, database=None)
@given(
    args=st.lists(st.one_of(size_flags, hostile_values), max_size=10),
    complete=st.booleans(),
)
def test_size_never_shows_a_traceback(args, complete):
    argv = (["--volts", "12", "--amps", "20", "--length", "10 ft"] if complete else []) + args
    status, stderr = _run_size(argv)
    assert status in (0, 1, 2), (argv, status)
    assert "Traceback" not in stderr
    if status == 2:
        assert len(stderr.strip().splitlines()) == 1, (argv, stderr)
