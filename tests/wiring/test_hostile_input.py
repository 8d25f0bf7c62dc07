"""Hostile and careless input on the wiring record's pages: owner links (made, e-mailed,
revoked), the owner's public page and PDF with the token in the path, the public verify
page (random bytes, huge, not a PDF, truncated, a PDF carrying JavaScript), the record's
preview, stage sheets and revisions with odd query strings and numbers.

The founders' rule on bad input: never a server error or a traceback, markup escaped,
a refused post says why beside the field, nothing saved changes (a refused post adds no
link, visit or revision). Runs on SQLite and PostgreSQL."""

from __future__ import annotations

import datetime
import io
from urllib.parse import quote

import pypdf
import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.forms.models import model_to_dict
from django.test import Client, override_settings
from django.urls import reverse
from hypothesis import given
from hypothesis import strategies as st
from pypdf.generic import DictionaryObject, NameObject, TextStringObject

from tests.hostile_web import (
    FUZZ,
    MARKUP,
    assert_sane,
    build_world,
    client_for,
    evidence_counts,
    fuzz_form,
    fuzz_query,
    hostile_values,
    today_plus,
    world_scope,
)
from wiring import signing
from wiring.models import OwnerLink
from wiring.services import owner_link_create, record_issue

pytestmark = pytest.mark.django_db


def _build_with_record():
    world = build_world()
    signing.create_key(shop_name="Hostile Input Test Conversions")
    job = world.jobs["approved"]
    world.revision = record_issue(job=job, by=world.lead)
    with world.revision.file.open("rb") as handle:
        world.pdf = handle.read()
    world.link, world.token = owner_link_create(
        job=job, by=world.office, expires_on=datetime.date.today() + datetime.timedelta(30)
    )
    return world


@pytest.fixture(scope="module")
def world(django_db_setup, django_db_blocker, tmp_path_factory):
    keys = tmp_path_factory.mktemp("hostile-signing")
    with (
        override_settings(SIGNING_DIR=keys, SIGNING_TIMESTAMP_URL=""),
        world_scope(django_db_blocker, build=_build_with_record) as built,
    ):
        yield built


@pytest.fixture
def office(world):
    return client_for(world.office)


def _number(world) -> str:
    return world.jobs["approved"].number


def _link_snapshot(world):
    return lambda: model_to_dict(OwnerLink.objects.get(pk=world.link.pk))


# --- owner links ---------------------------------------------------------------------


def test_new_owner_link_refuses_hostile_expiry_note_and_address(world, office):
    page = reverse("owner_links", args=[_number(world)])
    fuzz_form(office, page, fill={"expires_on": today_plus(30)}, snapshot=_link_snapshot(world))


def test_sending_a_link_refuses_hostile_addresses_and_tokens(world, office):
    target = reverse("owner_link_send", args=[_number(world), world.link.pk])

    @FUZZ
    @given(name=st.sampled_from(["to", "token"]), value=hostile_values)
    def send(name: str, value: str) -> None:
        data = {"to": "owner@test.example", "token": world.token, name: value}
        before = evidence_counts()
        answer = office.post(target, data)
        assert_sane(answer, value)
        if answer.status_code == 200:
            assert evidence_counts() == before

    send()


def test_revoking_asks_again_for_anything_but_yes(world, office):
    target = reverse("owner_link_revoke", args=[_number(world), world.link.pk])

    @FUZZ
    @given(value=hostile_values.filter(lambda v: v != "yes"))
    def revoke(value: str) -> None:
        answer = office.post(target, {"confirm": value})
        assert_sane(answer, value)
        assert answer.status_code == 200
        world.link.refresh_from_db()
        assert not world.link.is_revoked

    revoke()


# --- the owner's public pages ----------------------------------------------------------


@FUZZ
@given(token=hostile_values)
def test_no_token_in_the_owner_path_gives_a_server_error(token, world):
    """An unknown token is a plain 404 page; it opens nothing and logs no visit."""
    before = evidence_counts()["OwnerLinkVisit"]
    answer = Client().get("/o/" + quote(token or "x", safe="") + "/")
    assert answer.status_code in (400, 404), answer.status_code
    assert_sane(answer, token)
    assert evidence_counts()["OwnerLinkVisit"] == before


@pytest.mark.parametrize(
    "revision", ["0", "2", "9223372036854775807", "9223372036854775808", "9" * 30]
)
def test_no_revision_number_in_the_owner_pdf_path_gives_a_server_error(revision, world):
    answer = Client().get(f"/o/{world.token}/{revision}.pdf")
    assert_sane(answer)
    assert answer.status_code == 404


@pytest.mark.parametrize(
    "revision", ["0", "2", "9223372036854775807", "9223372036854775808", "9" * 30]
)
def test_no_revision_number_in_the_office_pdf_path_gives_a_server_error(revision, world, office):
    answer = office.get(f"/jobs/{_number(world)}/record/{revision}.pdf")
    assert_sane(answer)
    assert answer.status_code == 404


# --- the public verify page ----------------------------------------------------------


def _verify(data: bytes, name: str = "record.pdf"):
    upload = SimpleUploadedFile(name, data, content_type="application/pdf")
    return Client().post(reverse("record_verify"), {"file": upload})


def _with_javascript() -> bytes:
    writer = pypdf.PdfWriter()
    writer.add_blank_page(width=200, height=200)
    action = DictionaryObject(
        {
            NameObject("/S"): NameObject("/JavaScript"),
            NameObject("/JS"): TextStringObject("app.alert('x');"),
        }
    )
    writer._root_object[NameObject("/OpenAction")] = writer._add_object(action)
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def _nested_pdf(depth: int) -> bytes:
    body = b"[" * depth + b"]" * depth
    return b"%PDF-1.7\n1 0 obj\n" + body + b"\nendobj\ntrailer\n<< /Root 1 0 R >>\n%%EOF\n"


CRAFTED = {
    "random": bytes(range(256)) * 40,
    "not_pdf": b"PK\x03\x04 a zip, not a record",
    "header_only": b"%PDF-1.7\n",
    "truncated": None,  # the signed record cut in half, filled in from the world
    "javascript": None,
    "nested": _nested_pdf(20_000),
    "markup_name": b"%PDF-1.7\n<script>alert(1)</script>",
}


@pytest.mark.parametrize("kind", sorted(CRAFTED))
def test_verify_page_answers_any_file_in_plain_words(kind, world):
    data = CRAFTED[kind]
    if kind == "truncated":
        data = world.pdf[: len(world.pdf) // 2]
    elif kind == "javascript":
        data = _with_javascript()
    answer = _verify(data, name="<img src=x onerror=alert(1)>.pdf")
    assert_sane(answer, "<img src=x onerror=alert(1)>")
    assert answer.status_code == 200
    assert b"verdict" in answer.content or b"not" in answer.content


def test_verify_page_refuses_a_huge_file_unread(world, settings):
    from wiring.verify import MAX_BYTES

    answer = _verify(b"%PDF-1.7\n" + b"0" * (MAX_BYTES + 10))
    assert_sane(answer)
    assert answer.status_code in (200, 400, 413)


@FUZZ
@given(data=st.binary(max_size=4096), prefix=st.booleans())
def test_verify_page_never_fails_on_random_bytes(data, prefix, world):
    answer = _verify((b"%PDF-1.7\n" if prefix else b"") + data)
    assert_sane(answer)
    assert answer.status_code == 200


# --- the record's pages: query strings ---------------------------------------------


@pytest.mark.parametrize(
    "name,kind",
    [("record_preview", None), ("revision_list", None), ("stage_sheet", 1), ("owner_links", None)],
)
def test_no_query_parameter_of_the_record_pages_gives_a_server_error(name, kind, world, office):
    args = [_number(world)] + ([kind] if kind else [])
    fuzz_query(office, reverse(name, args=args), ["revision", "stage", "draft", "page", "job"])


def test_no_query_parameter_of_the_verify_page_gives_a_server_error(world):
    fuzz_query(Client(), reverse("record_verify"), ["job", "revision"])


@pytest.mark.parametrize(
    "agent", ["a\x00b", "x" * 5000, MARKUP, "\ud7ff\ue000", "é" * 400], ids=repr
)
@pytest.mark.parametrize("forwarded", ["", "999.1.1.1", "\x00", "::1, 10.0.0.1, <b>", "x" * 500])
def test_a_hostile_browser_header_still_opens_the_owner_page(agent, forwarded, world):
    """The owner's visit is logged with whatever the browser sends, cut to what the log
    keeps; a NUL in a header (which HTTP forbids and PostgreSQL cannot store) is a plain
    400 (shop/request_guard.py)."""
    answer = Client().get(
        f"/o/{world.token}/", HTTP_USER_AGENT=agent, HTTP_X_FORWARDED_FOR=forwarded
    )
    assert_sane(answer, agent)
    assert answer.status_code == (400 if "\x00" in agent + forwarded else 200)
