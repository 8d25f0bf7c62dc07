"""Hostile files, drawn signatures, htmx posts and path parts on the tablet pages: a photo
that is no picture, a signature that is no pad's PNG, the same posts from the page's
script, a return visit's re-check, and stage kinds and label ends in the address.

The founders' rule on bad input, as in tests/inspections/test_hostile_input.py: never a
server error or a traceback, markup escaped, a refusal beside the field, no evidence row
added by a refused post. Runs on SQLite and PostgreSQL."""

from __future__ import annotations

import uuid

import pytest
from django.urls import reverse
from hypothesis import given
from hypothesis import strategies as st

from inspections.models import Stage
from tests.hostile_web import (
    FUZZ,
    MARKUP,
    assert_sane,
    client_for,
    evidence_counts,
    fuzz_form,
    hostile_values,
    shown_errors,
    world_scope,
)
from tests.inspections.factories import PASSWORD

pytestmark = pytest.mark.django_db


@pytest.fixture(scope="module")
def world(django_db_setup, django_db_blocker):
    with world_scope(django_db_blocker) as built:
        yield built


@pytest.fixture
def tech(world):
    return client_for(world.tech)


@pytest.fixture
def lead(world):
    return client_for(world.lead)


def _number(world, name: str) -> str:
    return world.jobs[name].number


def _unread_end(world):
    return world.jobs["working"].circuits.first().terminations.order_by("pk")[1]


# --- photos, drawn signatures and the htmx variants -----------------------------------


def _png(width: int, height: int, *, blank: bool = False) -> bytes:
    import io

    from PIL import Image, ImageDraw

    image = Image.new("RGBA", (width, height), (0, 0, 0, 0))
    if not blank:
        ImageDraw.Draw(image).line([(0, 0), (width - 1, height - 1)], fill=(0, 0, 0, 255))
    out = io.BytesIO()
    image.save(out, format="PNG")
    return out.getvalue()


def _data_url(raw: bytes) -> str:
    import base64

    return "data:image/png;base64," + base64.b64encode(raw).decode("ascii")


def _claims_huge(raw: bytes) -> bytes:
    """A PNG whose header claims 60000 × 60000 pixels (a decompression bomb's shape)."""
    import struct
    import zlib

    header = struct.pack(">IIBBBBB", 60000, 60000, 8, 6, 0, 0, 0)
    chunk = b"IHDR" + header
    ihdr = struct.pack(">I", 13) + chunk + struct.pack(">I", zlib.crc32(chunk))
    return raw[:8] + ihdr + raw[33:]


SIGNATURES = {
    "blank": lambda: _data_url(_png(64, 24, blank=True)),
    "tiny": lambda: _data_url(_png(2, 2)),
    "huge_header": lambda: _data_url(_claims_huge(_png(64, 24))),
    "truncated": lambda: _data_url(_png(64, 24)[:40]),
    "jpeg_bytes": lambda: _data_url(b"\xff\xd8\xff\xe0" + b"0" * 100),
    "svg_type": lambda: (
        "data:image/svg+xml;base64,PHN2Zz48c2NyaXB0PmFsZXJ0KDEpPC9zY3JpcHQ+PC9zdmc+"
    ),
    "bad_base64": lambda: "data:image/png;base64,@@@@" + "A" * 30,
    "oversized": lambda: "data:image/png;base64," + "A" * (700 * 1024),
    "markup": lambda: MARKUP,
}


@pytest.mark.parametrize("kind", sorted(SIGNATURES))
@pytest.mark.parametrize(
    "view,job,who",
    [("stage_sign", "ready", "tech"), ("job_approve", "to_approve", "lead"),
     ("handover_receipt", "approved", "tech")],
)  # fmt: skip
def test_a_crafted_signature_is_refused_beside_the_pad(kind, view, job, who, world):
    """Whatever the pad's field carries, a signature that is not a drawn PNG of a pad's
    size is refused with a message beside it, and no sign-off is stored."""
    client = client_for(getattr(world, who))
    args = [_number(world, job)] + ([1] if view == "stage_sign" else [])
    data = {"password": PASSWORD, "printed_name": "Ada Owner", "signature": SIGNATURES[kind]()}
    before = evidence_counts()
    answer = client.post(reverse(view, args=args), data)
    assert_sane(answer, data["signature"])
    assert answer.status_code == 200
    assert "signature" in shown_errors(answer.content.decode())
    assert evidence_counts() == before


PHOTOS = {
    "random": (b"\x00\x01garbage" * 100, "lug.jpg", "image/jpeg"),
    "text": (b"just text", "lug.txt", "text/plain"),
    "markup_name": (b"GIF89a" + b"0" * 20, "<img src=x onerror=alert(1)>.gif", "image/gif"),
    "svg": (b"<svg><script>alert(1)</script></svg>", "lug.svg", "image/svg+xml"),
    "empty": (b"", "lug.jpg", "image/jpeg"),
    "huge_header": (_claims_huge(_png(64, 24)), "lug.png", "image/png"),
}


@pytest.mark.parametrize("kind", sorted(PHOTOS))
@pytest.mark.parametrize("view", ["torque_entry", "checklist_mark"])
def test_a_hostile_photo_is_refused_or_kept_as_a_picture(kind, view, world, tech):
    """A photo that is not a readable picture is refused beside the photo field and
    nothing is stored; never a server error."""
    from django.core.files.uploadedfile import SimpleUploadedFile

    content, name, kind_of = PHOTOS[kind]
    photo = SimpleUploadedFile(name, content, content_type=kind_of)
    if view == "torque_entry":
        target = reverse(view, args=[_number(world, "working"), _unread_end(world).pk])
        data = {"value": "10", "unit": "N*m", "wrench": world.wrench.pk, "note": "with photo"}
    else:
        from inspections.services import checklist_items_for

        stage = Stage.objects.get(job=world.jobs["working"], kind=Stage.Kind.FIRST_INSTALL)
        item = next(i for i in checklist_items_for(stage=stage) if not i.derived)
        target = reverse(view, args=[_number(world, "working"), 1])
        data = {"item_key": item.key, "result": "fail", "note": "see photo"}
    data["client_key"] = str(uuid.uuid4())
    before = evidence_counts()
    answer = tech.post(target, {**data, "photo": photo})
    assert_sane(answer, name)
    if answer.status_code == 200:
        errors = shown_errors(answer.content.decode())
        assert errors and evidence_counts() == before, errors


@pytest.mark.parametrize("view", ["torque_entry", "walking_order", "checklist_mark"])
def test_the_htmx_answers_refuse_hostile_fields_too(view, world, tech):
    """The same posts from the page's script (HX-Request): partials, never a 500."""
    htmx = {"HTTP_HX_REQUEST": "true", "HTTP_HX_TARGET": "torque-entry"}
    number = _number(world, "working")
    if view == "torque_entry":
        target = reverse(view, args=[number, _unread_end(world).pk])
        base = {"value": "10", "unit": "N*m", "wrench": str(world.wrench.pk)}
    elif view == "walking_order":
        target, base = reverse(view, args=[number]), {"device": "1", "move": "up"}
    else:
        target, base = reverse(view, args=[number, 1]), {"item_key": "x", "result": "pass"}
    names = sorted({*base, "note", "client_key", "stage"})

    @FUZZ
    @given(name=st.sampled_from(names), value=hostile_values)
    def post_one(name: str, value: str) -> None:
        before = evidence_counts()
        answer = tech.post(target, {**base, name: value}, **htmx)
        assert_sane(answer, value)
        if answer.status_code == 200 and evidence_counts() != before:
            assert not shown_errors(answer.content.decode())

    post_one()


# --- a return visit's re-check and the lead's "build stages not needed" ----------------


def test_recheck_entry_of_a_return_visit_refuses_hostile_fields(world, tech):
    visit = world.jobs["return_visit"]
    end = visit.circuits.first().terminations.order_by("pk").first()
    page = reverse("torque_entry", args=[visit.number, end.pk])
    fuzz_form(tech, page, fill={"value": "10", "wrench": str(world.wrench.pk)})


def test_build_stages_not_needed_refuses_hostile_reasons(world, lead):
    """Once the re-check is signed with nothing found, a lead may skip the build stages
    with a reason; a hostile reason is refused beside it and the stages stay as they are."""
    from tests.inspections.factories import mark_all, read_all, sign
    from tests.inspections.return_visits import log_recheck_run, recheck_of

    visit = world.jobs["return_visit"]
    read_all(recheck_of(visit), technician=world.tech, wrench=world.wrench)
    log_recheck_run(visit, world.tech)
    mark_all(recheck_of(visit), by=world.tech)
    sign(recheck_of(visit), world.tech)
    states = lambda: list(Stage.objects.filter(job=visit).order_by("kind").values_list("state"))  # noqa: E731
    page = reverse("build_stages_not_needed", args=[visit.number])
    fuzz_form(lead, page, snapshot=states)


# --- numbers and words in the path ------------------------------------------------------

STAGE_PAGES = ["stage_checklist", "stage_sign", "stage_send_back", "stage_sheet"]


@pytest.mark.parametrize("name", STAGE_PAGES)
@pytest.mark.parametrize("kind", ["0", "9", "2147483648", "9223372036854775808", "9" * 30])
def test_no_stage_kind_in_the_path_gives_a_server_error(name, kind, world, lead):
    """A stage kind that names no stage is a plain 404, by GET and by POST."""
    address = reverse(name, args=[_number(world, "working"), 1]).replace("/1/", f"/{kind}/")
    for answer in (lead.get(address), lead.post(address, {"note": "x", "password": "x"})):
        assert_sane(answer)
        assert answer.status_code in (404, 405), (address, answer.status_code)


@FUZZ
@given(end=hostile_values)
def test_no_end_in_a_label_scan_gives_a_server_error(end, world):
    from urllib.parse import quote

    circuit = world.jobs["working"].circuits.first()
    answer = client_for(world.tech).get(f"/scan/{circuit.pk}/{quote(end or 'x', safe='')}/")
    assert_sane(answer, end)
    assert answer.status_code in (302, 400, 404), answer.status_code
