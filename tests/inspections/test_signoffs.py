"""Sign-offs: the drawn signature is a real PNG of sane size, the hash is over a documented
canonical serialisation (sorted keys, no whitespace, UTF-8) that does not depend on key
order, a change to what was signed is detected, and sign-offs are append-only."""

from __future__ import annotations

import base64
import hashlib
import io
import json
from decimal import Decimal

import pytest
from django.db import DatabaseError, connection, transaction
from django.db.models import ProtectedError
from PIL import Image

from inspections.models import AppendOnlyError, SignOff, Stage, canonical_json, content_hash
from inspections.models import signoffs as signoffs_module
from inspections.services import (
    shop_checklist_item_save,
    signoff_content,
    signoff_is_current,
    stage_send_back,
    torque_record_correct,
)
from inspections.services.signatures import clean_signature
from tests.inspections.factories import (
    latest_stage,
    make_spec_circuit,
    new_key,
    signature,
    signature_png,
    through_install,
)

pytestmark = pytest.mark.django_db


# --- canonical serialisation --------------------------------------------------------------


def test_the_canonical_form_is_sorted_compact_utf8_and_documented():
    content = {"unit": "N·m", "b": [1, {"z": True, "a": None}], "a": "10.500"}
    text = canonical_json(content)
    assert text == '{"a":"10.500","b":[1,{"a":null,"z":true}],"unit":"N·m"}'
    assert content_hash(content) == hashlib.sha256(text.encode("utf-8")).hexdigest()
    assert "N\xb7m".encode() in text.encode("utf-8")  # written as itself, not \u00b7
    doc = signoffs_module.__doc__
    assert 'separators=(",", ":")' in doc and "sort_keys=True" in doc and "UTF-8" in doc


def test_the_hash_does_not_depend_on_the_order_keys_were_given_in():
    one = {"job": "JOB-1", "torque": [{"id": 1, "value": "10"}], "stage": "retorque"}
    other = {"stage": "retorque", "torque": [{"value": "10", "id": 1}], "job": "JOB-1"}
    assert content_hash(one) == content_hash(other)
    assert content_hash(one) != content_hash({**one, "stage": "first_install"})


@pytest.mark.parametrize("value", [1.5, float("nan"), Decimal("10.5"), object()])
def test_a_value_without_a_canonical_text_is_refused(value):
    with pytest.raises(TypeError):
        canonical_json({"value": value})


# --- what a sign-off covers ---------------------------------------------------------------


@pytest.fixture
def signed_install(job, circuit, wrench, technician):
    return through_install(job, technician=technician, wrench=wrench)


def test_a_signoff_stores_its_canonical_content_and_the_hash_of_it(signed_install, job):
    stored = json.loads(signed_install.content)
    assert stored == signoff_content(stage=signed_install.stage)
    assert signed_install.content == canonical_json(stored)
    assert signed_install.content_sha256 == content_hash(stored)
    assert (stored["job"], stored["stage"]) == (job.number, "first_install")
    assert len(stored["torque"]) == 4 and stored["torque"][0]["value"] == "10.000"
    assert {entry["mark"]["result"] for entry in stored["checklist"]} == {"pass"}


def test_the_content_serialises_the_same_way_twice(signed_install):
    stage = signed_install.stage
    assert canonical_json(signoff_content(stage=stage)) == canonical_json(
        signoff_content(stage=stage)
    )


def test_hash_detects_a_changed_signed_stage(signed_install, lead):
    assert signoff_is_current(signed_install)
    record = signed_install.stage.torque_records.order_by("pk").first()
    # A correction is possible only on a stage taking work: the lead sends it back first.
    stage_send_back(stage=signed_install.stage, lead=lead, note="Reading on D-01 mistyped")
    torque_record_correct(
        record=record,
        value="10.5",
        unit="N*m",
        wrench=record.wrench,
        technician=lead,
        reason="typed 10 for 10.5 on the keypad",
        client_key=new_key(),
    )
    assert not signoff_is_current(signed_install)


def test_renaming_the_signer_or_the_wrench_does_not_change_what_was_signed(
    signed_install, technician, wrench
):
    technician.first_name = "Renamed"
    technician.save()
    type(wrench).objects.filter(pk=wrench.pk).update(code="TW-99")
    assert signoff_is_current(signed_install)
    assert SignOff.objects.get(pk=signed_install.pk).printed_name == "Test Technician"


def test_a_new_circuit_after_signing_shows_the_signoff_as_changed(signed_install, job):
    make_spec_circuit(job)
    assert not signoff_is_current(signed_install)


def test_a_shop_item_added_after_signing_does_not_change_what_was_signed(signed_install, office):
    shop_checklist_item_save(by=office, stage_kind=Stage.Kind.FIRST_INSTALL, text="Vent clear")
    assert signoff_is_current(signed_install)


def test_the_signature_is_kept_as_the_png_drawn(signed_install):
    raw = bytes(SignOff.objects.get(pk=signed_install.pk).signature_png)
    assert raw == signature_png()
    assert Image.open(io.BytesIO(raw)).format == "PNG"


# --- the drawn signature ------------------------------------------------------------------


def _png(width, height, *, blank=False) -> bytes:
    image = Image.new("RGBA", (width, height), (255, 255, 255, 255))
    if not blank:
        image.putpixel((1, 1), (0, 0, 0, 255))
    buffer = io.BytesIO()
    image.save(buffer, format="PNG")
    return buffer.getvalue()


def _url(raw: bytes, kind: str = "png") -> str:
    return f"data:image/{kind};base64," + base64.b64encode(raw).decode()


def _why(value) -> str:
    errors: dict = {}
    assert clean_signature(value, errors) is None
    return " ".join(errors["signature"])


def test_a_signature_from_the_pad_is_accepted_as_its_png_bytes():
    errors: dict = {}
    assert clean_signature(signature(), errors) == signature_png() and errors == {}


@pytest.mark.parametrize(
    "value, words",
    [
        ("", "no signature was drawn"),
        (None, "no signature was drawn"),
        ("data:image/jpeg;base64,/9j/4AAQ", "signing pad as a PNG"),
        ("data:image/png;base64,%%%not-base64%%%", "could not be read"),
        (_url(b"GIF89a" + b"\0" * 40), "not a PNG"),
        (_url(_png(64, 24)[:60]), "damaged"),
        (_url(_png(8, 8)), "8 × 8 pixels"),
        (_url(_png(5000, 20)), "5000 × 20 pixels"),
        (_url(_png(64, 24, blank=True)), "empty"),
    ],
)
def test_anything_but_a_real_png_of_sane_size_is_refused(value, words):
    assert words in _why(value)


def test_an_oversized_signature_is_refused_before_it_is_decoded():
    assert "larger than 512 KB" in _why("data:image/png;base64," + "A" * 800_000)


# --- append-only --------------------------------------------------------------------------


def _raw(sql, params):
    with transaction.atomic(), connection.cursor() as cursor:
        cursor.execute(sql, params)


def test_a_signoff_cannot_be_saved_again_or_deleted(signed_install):
    signed_install.meaning = "something else"
    with pytest.raises(AppendOnlyError):
        signed_install.save()
    with pytest.raises(AppendOnlyError):
        signed_install.delete()
    with pytest.raises(AppendOnlyError):
        SignOff.objects.all().update(meaning="x")


def test_raw_sql_update_of_a_signoff_fails(signed_install):
    with pytest.raises(DatabaseError, match="sign-offs are append-only"):
        _raw(
            "UPDATE inspections_signoff SET content_sha256 = %s WHERE id = %s",
            ["0" * 64, signed_install.pk],
        )
    assert SignOff.objects.get(pk=signed_install.pk).content_sha256 != "0" * 64


def test_raw_sql_delete_of_a_signoff_fails(signed_install):
    with pytest.raises(DatabaseError, match="sign-offs are append-only"):
        _raw("DELETE FROM inspections_signoff WHERE id = %s", [signed_install.pk])
    assert SignOff.objects.filter(pk=signed_install.pk).exists()


def test_a_stage_with_a_signoff_cannot_be_deleted_with_its_job(signed_install, job):
    with pytest.raises(ProtectedError):
        job.delete()
    assert latest_stage(job, Stage.Kind.FIRST_INSTALL).state == Stage.State.SIGNED
