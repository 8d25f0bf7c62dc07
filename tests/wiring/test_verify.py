"""Verification of a wiring record: an unchanged record issued by this shop passes; each
way of altering or faking one is caught and said in plain words, never as a server
error, by wiring.verify.verify_pdf, by the public verify page and by `verify_record`
(exit status 1, one line on stderr)."""

from __future__ import annotations

import html

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.core.management import call_command
from django.urls import reverse

from tests.wiring import tamper
from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring.verify import MAX_BYTES, verify_pdf


def _page(client, data: bytes, name: str = "record.pdf"):
    upload = SimpleUploadedFile(name, data, content_type="application/pdf")
    return client.post(reverse("record_verify"), {"file": upload})


def _command(tmp_path, data: bytes, capsys) -> tuple[int, str, str]:
    path = tmp_path / "check.pdf"
    path.write_bytes(data)
    try:
        call_command("verify_record", str(path))
        code = 0
    except SystemExit as leaving:
        code = leaving.code
    out, err = capsys.readouterr()
    return code, out, err


def _refused_everywhere(data, code, words, anon_client, tmp_path, capsys):
    verdict = verify_pdf(data)
    assert not verdict.ok
    assert verdict.code == code
    assert words in verdict.headline
    response = _page(anon_client, data)
    assert response.status_code == 200
    text = html.unescape(response.content.decode())
    assert words in text
    assert "Genuine and unchanged" not in text
    exit_code, out, err = _command(tmp_path, data, capsys)
    assert exit_code == 1
    assert err.strip() == verdict.headline and "\n" not in err.strip()
    return verdict


def test_an_unchanged_record_is_confirmed(issued, anon_client, tmp_path, capsys):
    revision, data = issued
    verdict = verify_pdf(data)
    assert verdict.ok and verdict.code == "unchanged"
    assert verdict.issued_by_shop is True and verdict.changed is False
    assert (verdict.job_number, verdict.revision) == (revision.job.number, 1)
    assert verdict.signed_at == revision.signed_at
    page = _page(anon_client, data).content.decode()
    assert "Genuine and unchanged" in page and revision.job.number in page
    exit_code, out, err = _command(tmp_path, data, capsys)
    assert (exit_code, err) == (0, "")
    assert "unchanged since it was signed" in out


def test_a_changed_byte_is_caught(issued, anon_client, tmp_path, capsys):
    _, data = issued
    verdict = _refused_everywhere(
        tamper.change_one_byte(data), "tampered", "changed after it was signed",
        anon_client, tmp_path, capsys,
    )  # fmt: skip
    assert verdict.changed is True


def test_an_appended_page_after_signing_is_caught(issued, anon_client, tmp_path, capsys):
    revision, data = issued
    verdict = _refused_everywhere(
        tamper.append_page(data), "appended", "changed since", anon_client, tmp_path, capsys
    )
    # The signed part is still the shop's: the verdict names the record it came from.
    assert verdict.issued_by_shop is True and verdict.changed is True
    assert verdict.job_number == revision.job.number and verdict.revision == 1


def test_a_stripped_signature_is_caught(issued, anon_client, tmp_path, capsys):
    _, data = issued
    _refused_everywhere(
        tamper.strip_signature(data), "unsigned", "no digital signature",
        anon_client, tmp_path, capsys,
    )  # fmt: skip


def test_a_copy_signed_again_with_another_key_is_caught(issued, anon_client, tmp_path, capsys):
    _, data = issued
    verdict = _refused_everywhere(
        tamper.resign_with_other_key(data), "foreign_key", "not this shop's",
        anon_client, tmp_path, capsys,
    )  # fmt: skip
    assert verdict.issued_by_shop is False


def test_a_file_that_is_not_a_pdf_is_caught(signing_key, db, anon_client, tmp_path, capsys):
    _refused_everywhere(
        b"name,size\nM-01,4 AWG\n", "not_pdf", "not a PDF", anon_client, tmp_path, capsys
    )


def test_a_damaged_pdf_is_caught(issued, anon_client, tmp_path, capsys):
    _, data = issued
    _refused_everywhere(
        data[: len(data) // 2], "damaged", "damaged or has been changed",
        anon_client, tmp_path, capsys,
    )  # fmt: skip


def test_an_empty_file_is_refused(signing_key, db, anon_client, tmp_path, capsys):
    assert verify_pdf(b"").code == "empty"
    response = _page(anon_client, b"")
    assert response.status_code == 200
    assert "The file is empty" in response.content.decode()
    exit_code, _, err = _command(tmp_path, b"", capsys)
    assert exit_code == 1 and "empty" in err


def test_a_huge_file_is_refused_unread(signing_key, db, anon_client):
    data = b"%PDF-1.7\n" + b"0" * MAX_BYTES
    assert verify_pdf(data).code == "too_large"
    assert "larger than 30 MB" in _page(anon_client, data).content.decode()


def test_a_record_signed_by_the_shop_but_not_on_its_list_is_not_confirmed(issued, signing_key):
    # The shop's key signed it, but no stored revision has these bytes (a copy signed
    # outside the issue step): the shop cannot say it is what the lead approved.
    from wiring import signing

    _, data = issued
    copy = signing.sign_pdf(
        tamper.strip_signature(data),
        reason="Wiring record JOB-2026-0001, revision 1",
        location="here",
        stamp_lines=["copy"],
        credentials=signing_key,
    )
    verdict = verify_pdf(copy)
    assert not verdict.ok and verdict.code == "unknown"


def test_the_page_asks_for_a_file_and_keeps_csrf(client, db):
    page = client.get(reverse("record_verify") + "?job=JOB-2026-0001&revision=2")
    assert page.status_code == 200
    assert "JOB-2026-0001" in page.content.decode()
    empty = client.post(reverse("record_verify"), {})
    assert "Choose the PDF file to check." in empty.content.decode()
    strict = type(client)(enforce_csrf_checks=True)
    assert strict.post(reverse("record_verify"), {}).status_code == 403


@pytest.mark.parametrize("persona", ["anon_client", "technician_client", "office_client"])
def test_anyone_may_use_the_verify_page(persona, request, db):
    client = request.getfixturevalue(persona)
    assert client.get(reverse("record_verify")).status_code == 200
