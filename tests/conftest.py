"""Personas shared by every test: anonymous, technician, lead and office staff."""

from __future__ import annotations

import pytest
from django.test import Client, override_settings

from shop import roles
from tests.factories import make_user


@pytest.hookimpl(trylast=True)
def pytest_collection_modifyitems(items):
    """Browser tests run last. Playwright's loop stays open in the main thread until the
    session ends (pyHanko's asyncio.run refuses to start beside it), and their flushes
    empty the role groups the migrations made; every other test runs before either."""
    items.sort(key=lambda item: item.get_closest_marker("browser") is not None)


@pytest.fixture(scope="session", autouse=True)
def _files_of_their_own(tmp_path_factory):
    """The tests' signing keys and stored files (photos, signed records) live in a folder
    of their own, never in the shop's var/: the demo and the record tests make keys."""
    base = tmp_path_factory.mktemp("files")
    with override_settings(SIGNING_DIR=base / "signing", MEDIA_ROOT=base / "media"):
        yield


@pytest.fixture(autouse=True)
def _quick_password_hashing(settings):
    # The shop's hasher is deliberately slow (hundreds of ms a password); tests create
    # many users, so they hash with a quick one. Nothing under test depends on which.
    settings.PASSWORD_HASHERS = ["django.contrib.auth.hashers.MD5PasswordHasher"]


@pytest.fixture
def technician(db):
    return make_user(roles.TECHNICIAN, first_name="Test", last_name="Technician")


@pytest.fixture
def lead(db):
    return make_user(roles.LEAD, first_name="Test", last_name="Lead")


@pytest.fixture
def office(db):
    return make_user(roles.OFFICE, first_name="Test", last_name="Office", is_staff=True)


def _client_for(user) -> Client:
    client = Client()
    client.force_login(user)
    return client


@pytest.fixture
def anon_client() -> Client:
    return Client()


@pytest.fixture
def technician_client(technician) -> Client:
    return _client_for(technician)


@pytest.fixture
def lead_client(lead) -> Client:
    return _client_for(lead)


@pytest.fixture
def office_client(office) -> Client:
    return _client_for(office)
