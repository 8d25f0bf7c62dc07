"""Every URL pattern of the root URLconf, as every persona, by GET and by an empty POST,
against the outcome the shop intends. A URL added without an entry here fails the suite.

Personas (columns, in this order):
    anon      not signed in
    tech      a technician assigned to the job
    stranger  a technician who is not on the job (reads it, writes nothing to it)
    lead      a lead (works on any job)
    office    office staff (is_staff: the read-only admin)
    super     a superuser

Outcomes: a status code, "login" (302 to the app's sign-in), "admin" (302 to the admin's
sign-in) or "302" (any other redirect). An empty POST never saves anything: forms answer
with their errors (200) and confirmation steps ask again.
"""

from __future__ import annotations

import importlib
from pathlib import Path

from django.contrib.auth import get_user_model
from django.contrib.contenttypes.models import ContentType
from django.test import Client, TestCase
from django.urls import URLPattern, URLResolver, get_resolver, reverse

from circuits.models import Device, TorqueDefault
from circuits.services import waiver_create
from inspections.models import Stage
from shop import roles
from shop.models import ShopProfile
from tests.circuits.factories import findings_for, make_battery_bank, make_device, make_terminal
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    make_spec_circuit,
    make_wrench,
    open_stage,
    read,
    stages_by_kind,
)
from tests.matrix_admin_rows import (
    ADMIN_APPS,
    ADMIN_SITE,
    EVERY_FIELD_READ_ONLY,
    OFFICE_ADMIN,
    SUPER_ADMIN,
)

PERSONAS = ("anon", "tech", "stranger", "lead", "office", "super")

# Rows of the feature pages, one module per views module, found in tests/<app>/matrix/
# (any module there, so a new views module needs only its own rows file):
# each has ROWS (name -> (GET, POST) as below) and kwargs(world, name) -> the URL's kwargs,
# where world is the PermissionMatrix test (its job, termination, reading, stage, ...).
_TESTS = Path(__file__).resolve().parent
FEATURE_ROWS = tuple(
    importlib.import_module(f"tests.{path.parent.parent.name}.matrix.{path.stem}")
    for path in sorted(_TESTS.glob("*/matrix/*.py"))
    if path.stem != "__init__"
)

# name: (GET outcomes, POST outcomes), one per persona in PERSONAS order.
APP = {
    "<root>": ("302 302 302 302 302 302", "302 302 302 302 302 302"),
    "login": ("200 302 302 302 302 302", "200 302 302 302 302 302"),
    "logout": ("405 405 405 405 405 405", "login login login login login login"),
    "password_change": ("login 200 200 200 200 200", "login 200 200 200 200 200"),
    "password_change_done": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    # A set-password link with a wrong token says so; it reveals nothing and sets nothing.
    "password_reset_confirm": ("200 200 200 200 200 200", "200 200 200 200 200 200"),
    "password_reset_complete": ("200 200 200 200 200 200", "405 405 405 405 405 405"),
    "staff_list": ("login 403 403 403 200 200", "login 405 405 405 405 405"),
    "staff_new": ("login 403 403 403 200 200", "login 403 403 403 200 200"),
    "staff_detail": ("login 403 403 403 200 200", "login 405 405 405 405 405"),
    "staff_role": ("login 405 405 405 405 405", "login 403 403 403 200 200"),
    "staff_active": ("login 405 405 405 405 405", "login 403 403 403 400 400"),
    "staff_password_link": ("login 405 405 405 405 405", "login 403 403 403 302 302"),
    "job_list": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "job_new": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "job_detail": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "job_edit": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "owner_list": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "owner_new": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "owner_detail": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "owner_edit": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "vehicle_new": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "vehicle_detail": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "vehicle_edit": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "circuit_schedule": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "circuit_new": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
    # The live panel sizes what is typed and never writes: everyone who reads the job.
    "circuit_preview": ("login 405 405 405 405 405", "login 200 200 200 200 200"),
    "circuit_edit": ("login 200 200 200 200 200", "login 200 403 200 200 200"),
    "circuit_delete": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "device_list": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "device_new": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
    "device_detail": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "device_edit": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
    "device_delete": ("login 403 403 200 200 200", "login 403 403 200 200 200"),
    "termination_edit": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
    "waiver_new": ("login 405 405 405 405 405", "login 403 403 200 403 200"),
    "waiver_delete": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "torque_defaults": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "torque_default_new": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "torque_default_edit": ("login 403 403 200 403 200", "login 403 403 200 403 200"),
    "job_diagram_svg": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "circuit_labels": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "circuit_csv_export": ("login 200 200 200 200 200", "login 405 405 405 405 405"),
    "circuit_csv_import": ("login 200 403 200 200 200", "login 200 403 200 200 200"),
}
for _feature in FEATURE_ROWS:
    assert not set(_feature.ROWS) & set(APP), _feature.__name__
    APP.update(_feature.ROWS)

# The admin's rows (which models office staff and superusers may touch) live beside this
# file in tests/matrix_admin_rows.py.
ADMIN_ACTIONS = ("changelist", "add", "change", "delete", "history", "password_change")


def _patterns(resolvers=None, prefix="", namespace=None):
    for entry in resolvers if resolvers is not None else get_resolver().url_patterns:
        if isinstance(entry, URLResolver):
            yield from _patterns(
                entry.url_patterns, prefix + str(entry.pattern), entry.namespace or namespace
            )
        elif isinstance(entry, URLPattern):
            yield namespace, entry.name, prefix + str(entry.pattern)


def _key(namespace, name, route) -> str:
    if namespace == "admin":
        if name is None and route.endswith("(?P<url>.*)$"):
            return "admin:<catch-all>"
        if name is None and route.endswith("<path:object_id>/"):
            return "admin:<record-address>"  # one per model: redirects to its change page
        if name is None:
            return f"admin:{route}"
        return f"admin:{name}"
    return name or ("<root>" if route == "" else route)


def _outcomes(text: str) -> dict[str, str]:
    values = text.split()
    assert len(values) == len(PERSONAS), text
    return dict(zip(PERSONAS, values, strict=True))


def _admin_model_outcome(
    label: str, action: str, method: str, persona: str, missing: bool = False
) -> str:
    if persona in ("anon", "tech", "stranger", "lead"):
        return "admin"
    if missing and action == "history":
        return "302"  # the admin looks the record up before it checks permission here
    allowed = (OFFICE_ADMIN if persona == "office" else SUPER_ADMIN)[label].split()
    if action == "password_change":
        allowed = ["change"] if persona == "super" else []
        needed = "change"
    else:
        needed = {"changelist": "view", "history": "view", "change": "view"}.get(action, action)
    if method == "POST" and action == "change":
        needed = "change"
    if needed not in allowed:
        return "403"
    if method == "POST" and action == "change" and label in EVERY_FIELD_READ_ONLY:
        return "302"  # nothing to change: the admin saves nothing and goes back
    if missing and action in ("change", "delete"):
        return "302"  # no such record: back to the list, with a message
    return "200"


class PermissionMatrix(TestCase):
    """One test per URL pattern; the world below is built once for all of them."""

    @classmethod
    def setUpTestData(cls) -> None:
        roles.sync_role_groups()
        cls.users = {
            "tech": make_user(roles.TECHNICIAN),
            "stranger": make_user(roles.TECHNICIAN),
            "lead": make_user(roles.LEAD),
            "office": make_user(roles.OFFICE, is_staff=True),
            "super": make_user(is_superuser=True, is_staff=True),
        }
        cls.member = make_user(roles.TECHNICIAN, email="member@test.example")
        job = make_job(lead=cls.users["lead"])
        job.technicians.add(cls.users["tech"])
        cls.job = job
        make_battery_bank(job, interconnect="4 AWG")  # a thin interconnect to waive
        busbar = make_device(job, name="Main busbar", kind=Device.Kind.BUSBAR)
        make_terminal(busbar, name="B+", polarity="pos", stud_size="M8")
        cls.device = busbar
        finding = findings_for(job, "BOTTLENECK_INTERCONNECT")[0]
        cls.waiver = waiver_create(
            job=job,
            code=finding.code,
            subject=finding.subject,
            reason="Accepted for the permission matrix test.",
            lead=cls.users["lead"],
        )
        cls.circuit = make_spec_circuit(job, tag="M-01")
        cls.termination = cls.circuit.terminations.first()
        cls.spec = TorqueDefault.objects.create(
            stud_size="M8", kind="lug", value=10, unit="N*m", tolerance_pct=10, source="matrix"
        )
        stage = open_stage(stages_by_kind(job)[Stage.Kind.FIRST_INSTALL])
        cls.reading = read(
            cls.termination, stage, 10, technician=cls.users["tech"], wrench=make_wrench()
        )
        cls.profile = ShopProfile.load()

    def setUp(self) -> None:
        self.clients = {"anon": Client()}
        for persona, user in self.users.items():
            self.clients[persona] = Client()
            self.clients[persona].force_login(user)

    # ---- addresses ----

    def _objects(self) -> dict[str, object]:
        job = self.job
        return {
            "auth.user": self.member,
            "auth.group": roles_group(),
            "shop.shopprofile": self.profile,
            "shop.owner": job.vehicle.owner,
            "shop.vehicle": job.vehicle,
            "shop.job": job,
            "circuits.device": self.device,
            "circuits.terminal": self.device.terminals.first(),
            "circuits.circuit": self.circuit,
            "circuits.termination": self.termination,
            "circuits.torquedefault": self.spec,
            "circuits.waiver": self.waiver,
            "inspections.torquerecord": self.reading,
            "inspections.torquewrench": self.reading.wrench,
            "inspections.stage": self.reading.stage,
        }

    def _address(self, key: str, route: str) -> str:
        job = self.job
        pk_for = {
            "owner_detail": job.vehicle.owner.pk,
            "owner_edit": job.vehicle.owner.pk,
            "vehicle_detail": job.vehicle.pk,
            "vehicle_edit": job.vehicle.pk,
            "circuit_edit": self.circuit.pk,
            "circuit_delete": self.circuit.pk,
            "device_detail": self.device.pk,
            "device_edit": self.device.pk,
            "device_delete": self.device.pk,
            "termination_edit": self.termination.pk,
            "waiver_delete": self.waiver.pk,
            "torque_default_edit": self.spec.pk,
            "staff_detail": self.member.pk,
            "staff_role": self.member.pk,
            "staff_active": self.member.pk,
            "staff_password_link": self.member.pk,
        }
        if key == "<root>":
            return "/"
        if key == "admin:<catch-all>":
            return "/admin/no-such-page/"
        if key == "admin:<record-address>":
            return f"/admin/shop/owner/{job.vehicle.owner.pk}/"
        if key == "admin:view_on_site":
            owner = job.vehicle.owner
            return reverse(key, args=[ContentType.objects.get_for_model(owner).pk, owner.pk])
        if key == "password_reset_confirm":
            return reverse(key, kwargs={"uidb64": "MQ", "token": "set-password"})
        for feature in FEATURE_ROWS:
            if key in feature.ROWS:
                return reverse(key, kwargs=feature.kwargs(self, key))
        kwargs: dict[str, object] = {}
        if "<str:number>" in route:
            kwargs["number"] = job.number
        if "<int:pk>" in route:
            kwargs["pk"] = pk_for[key]
        return reverse(key, kwargs=kwargs)

    def _admin_address(self, name: str) -> tuple[str, str, str] | None:
        """(url, model label, action) for a model's admin page."""
        for label in SUPER_ADMIN:
            app, model = label.split(".")
            prefix = f"{app}_{model}_"
            if name.startswith("admin:" + prefix):
                action = name.removeprefix("admin:" + prefix)
                if action not in ADMIN_ACTIONS:
                    continue
                record = self._objects().get(label)
                if action in ("changelist", "add"):
                    return reverse(name), label, action
                if record is None:
                    record = _any_record(label)
                # No such record in the world: the admin answers a missing one with a
                # redirect to its list, once permission is checked.
                self.missing = record is None
                return reverse(name, args=[record.pk if record else 999999]), label, action
        return None

    # ---- checks ----

    def _check(self, address: str, expected: dict[str, dict[str, str]]) -> None:
        failures = []
        for method in ("GET", "POST"):
            for persona in PERSONAS:
                client = self.clients[persona]
                response = client.get(address) if method == "GET" else client.post(address, {})
                got = _describe(response)
                want = expected[method][persona]
                if not _matches(got, want):
                    failures.append(f"{method} {address} as {persona}: got {got}, want {want}")
        self.assertEqual(failures, [], "\n".join(failures))


def roles_group():
    from django.contrib.auth.models import Group

    return Group.objects.get(name=roles.LEAD)


def _any_record(label: str):
    from django.apps import apps

    model = apps.get_model(label)
    return model.objects.order_by("pk").first()


def _describe(response) -> str:
    if response.status_code in (301, 302):
        location = response["Location"]
        if location.startswith(reverse("admin:login")):
            return "admin"
        if location.startswith(reverse("login")):
            return "login"
        return "302"
    return str(response.status_code)


def _matches(got: str, want: str) -> bool:
    return got == want


def _expected_for(key: str, route: str) -> dict[str, dict[str, str]] | None:
    if key in APP:
        get, post = APP[key]
        return {"GET": _outcomes(get), "POST": _outcomes(post)}
    if key in ADMIN_SITE:
        get, post = ADMIN_SITE[key]
        return {"GET": _outcomes(get), "POST": _outcomes(post)}
    if key == "admin:app_list":
        return None  # one test per app, below
    return None


def _make_test(key: str, route: str):
    def test(self: PermissionMatrix) -> None:
        if key in APP or key in ADMIN_SITE:
            self._check(self._address(key, route), _expected_for(key, route))
            return
        found = self._admin_address(key)
        assert found is not None, f"{key} has no entry in the permission matrix"
        address, label, action = found
        missing = getattr(self, "missing", False)
        expected = {
            method: {p: _admin_model_outcome(label, action, method, p, missing) for p in PERSONAS}
            for method in ("GET", "POST")
        }
        self._check(address, expected)

    test.__name__ = f"test_{key}"
    return test


def _make_app_test(app: str):
    def test(self: PermissionMatrix) -> None:
        outcomes = _outcomes(ADMIN_APPS[app])
        address = reverse("admin:app_list", kwargs={"app_label": app})
        self._check(address, {"GET": outcomes, "POST": outcomes})

    return test


ROUTES = sorted({_key(ns, name, route): route for ns, name, route in _patterns()}.items())
for _name, _route in ROUTES:
    if _name != "admin:app_list":
        setattr(PermissionMatrix, f"test_{_name}".replace(":", "__"), _make_test(_name, _route))
for _app in ADMIN_APPS:
    setattr(PermissionMatrix, f"test_admin__app_list__{_app}", _make_app_test(_app))


def test_every_url_pattern_has_an_entry():
    """A URL added to the project without a row here fails: decide who may open it."""
    missing = []
    for namespace, name, route in _patterns():
        key = _key(namespace, name, route)
        if key in APP or key in ADMIN_SITE or key == "admin:app_list":
            continue
        if (
            namespace == "admin"
            and name
            and any(name.startswith(f"{label.replace('.', '_')}_") for label in SUPER_ADMIN)
        ):
            continue
        missing.append(f"{key} ({route})")
    assert missing == []


def test_every_admin_model_has_an_entry():
    from django.contrib import admin

    registered = {f"{m._meta.app_label}.{m._meta.model_name}" for m in admin.site._registry}
    assert registered == set(OFFICE_ADMIN) == set(SUPER_ADMIN)


def test_the_user_model_is_django_s():
    # The matrix's admin rows name auth.user; a custom user model would need its own row.
    assert get_user_model()._meta.label_lower == "auth.user"
