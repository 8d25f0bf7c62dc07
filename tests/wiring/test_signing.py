"""The shop's signing key and the record's PAdES signature: the key sits outside the media
store readable by the app's user alone and is never overwritten by accident; pyHanko's
own validator accepts the signature, made over the whole file, visible on the last page."""

from __future__ import annotations

import io
import stat

import pytest
from pyhanko.pdf_utils.reader import PdfFileReader
from pyhanko.sign.validation import validate_pdf_signature
from pyhanko.sign.validation.status import SignatureCoverageLevel
from pyhanko_certvalidator import ValidationContext

from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring import signing


def _mode(path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


def test_the_key_is_readable_by_the_app_user_alone(signing_key, settings):
    folder = signing.signing_dir()
    assert _mode(folder) == 0o700
    assert _mode(folder / signing.KEY_FILE) == 0o600
    assert _mode(folder / signing.CERT_FILE) == 0o600


def test_the_key_lives_outside_the_media_store(settings):
    assert not signing.signing_dir().resolve().is_relative_to(settings.MEDIA_ROOT.resolve())


def test_an_existing_key_is_not_overwritten_without_replace(signing_key):
    with pytest.raises(signing.SigningError, match="--replace"):
        signing.create_key(shop_name="Another name")
    assert signing.load_credentials().fingerprint == signing_key.fingerprint


def test_a_replaced_certificate_is_kept_for_old_records(signing_key):
    new = signing.create_key(shop_name="Lakeside Test Conversions", replace=True)
    trusted = {signing.certificate_fingerprint(c) for c in signing.trusted_certificates()}
    assert trusted == {signing_key.fingerprint, new.fingerprint}


def test_a_demo_key_says_so_in_its_certificate(settings, tmp_path):
    settings.SIGNING_DIR = tmp_path / "demo-signing"
    demo = signing.ensure_demo_key(shop_name="Lakeside Test Conversions")
    assert demo.is_demo and "(demo key)" in demo.subject
    # On first use only: later calls keep the key that signed the records.
    assert signing.ensure_demo_key(shop_name="x").fingerprint == demo.fingerprint


def test_without_a_key_signing_says_how_to_make_one(settings, tmp_path):
    settings.SIGNING_DIR = tmp_path / "none"
    with pytest.raises(signing.SigningError, match="signing_setup"):
        signing.load_credentials()


def test_pyhanko_validates_the_issued_record(issued, signing_key):
    revision, data = issued
    signature = PdfFileReader(io.BytesIO(data)).embedded_signatures[0]
    context = ValidationContext(trust_roots=[signing.to_asn1(signing_key.certificate)])
    status = validate_pdf_signature(signature, context)
    assert status.bottom_line and status.intact and status.valid and status.trusted
    assert status.coverage == SignatureCoverageLevel.ENTIRE_FILE
    # PAdES: the ETSI subfilter, not the older adbe.pkcs7.detached.
    assert str(signature.sig_object["/SubFilter"]) == "/ETSI.CAdES.detached"
    assert f"{revision.job.number}, revision 1" in str(signature.sig_object["/Reason"])


def test_the_signature_is_visible_in_the_box_on_the_last_page(issued):
    import pypdf

    _, data = issued
    reader = pypdf.PdfReader(io.BytesIO(data))
    last = reader.pages[-1]
    widgets = [a.get_object() for a in last.get("/Annots", [])]
    signatures = [w for w in widgets if w.get("/FT") == "/Sig"]
    assert len(signatures) == 1
    x1, y1, x2, y2 = (float(v) for v in signatures[0]["/Rect"])
    box = signing.signature_box()
    assert (x1, y1, x2, y2) == pytest.approx(box, abs=0.5)
    assert "/AP" in signatures[0]  # an appearance: the box is drawn, not left empty


def test_the_stamp_names_the_shop_in_embedded_fonts():
    import pypdf

    stamp = signing.stamp_pdf(["Digitally signed by Škoda Ölwerk Дом"], width=280, height=120)
    page = pypdf.PdfReader(io.BytesIO(stamp)).pages[0]
    assert "Škoda Ölwerk Дом" in page.extract_text()
    fonts = page["/Resources"]["/Font"]
    for ref in fonts.values():
        descriptor = ref.get_object().get("/DescendantFonts", [ref])[0].get_object()
        descriptor = descriptor.get("/FontDescriptor").get_object()
        assert any(k in descriptor for k in ("/FontFile", "/FontFile2", "/FontFile3"))


def test_signing_and_validating_work_where_an_event_loop_runs(signing_key):
    # pyHanko starts its own loop; under an ASGI server (or beside a browser driver) one
    # already runs in the calling thread, where Python refuses a second.
    import asyncio

    import pypdf

    from wiring import verify

    blank = io.BytesIO()
    writer = pypdf.PdfWriter()
    writer.add_blank_page(width=595, height=842)
    writer.write(blank)

    async def in_a_loop():
        signed = signing.sign_pdf(
            blank.getvalue(), reason="loop check", location="bench", stamp_lines=["Loop check"]
        )
        signature = PdfFileReader(io.BytesIO(signed)).embedded_signatures[0]
        return verify._validate(signature, [signing_key.certificate], moment=None)

    status = asyncio.run(in_a_loop())
    assert status.bottom_line and status.intact and status.valid and status.trusted
