"""The shell commands: `signing_setup` (make or import the key, never overwrite without
--replace), `render_record` (signed when approved, a draft otherwise) and
`verify_record`; each failure is exit status 1 with one line on stderr."""

from __future__ import annotations

import hashlib
import io
import sys

import pypdf
import pytest
from cryptography.hazmat.primitives.serialization import BestAvailableEncryption, pkcs12
from django.core.management import CommandError, call_command

from tests.factories import make_job
from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring import signing
from wiring.models import RecordRevision


def _run(name: str, *args: str, capsys) -> tuple[int, str, str]:
    """Exit status, stdout and stderr of `manage.py name args`: a CommandError leaves
    manage.py with its returncode (1) and its message as the one line on stderr."""
    try:
        call_command(name, *args)
        code = 0
    except CommandError as error:
        print(error, file=sys.stderr)
        code = error.returncode
    except SystemExit as leaving:
        code = leaving.code
    out, err = capsys.readouterr()
    return code, out, err


def _one_line(text: str) -> bool:
    return len(text.strip().splitlines()) == 1


def test_signing_setup_makes_a_key_and_refuses_to_overwrite(settings, tmp_path, db, capsys):
    settings.SIGNING_DIR = tmp_path / "signing"
    code, out, _ = _run("signing_setup", "--shop-name", "Lakeside Test Conversions", capsys=capsys)
    assert code == 0 and "Lakeside Test Conversions" in out
    first = signing.load_credentials().fingerprint
    code, _, err = _run("signing_setup", capsys=capsys)
    assert code == 1 and "--replace" in err and _one_line(err)
    assert signing.load_credentials().fingerprint == first
    code, _, _ = _run("signing_setup", "--replace", capsys=capsys)
    assert code == 0 and signing.load_credentials().fingerprint != first


def test_signing_setup_marks_a_demo_key(settings, tmp_path, db, capsys):
    settings.SIGNING_DIR = tmp_path / "signing"
    code, out, _ = _run("signing_setup", "--demo", capsys=capsys)
    assert code == 0 and "demo key" in out
    assert signing.load_credentials().is_demo


def test_signing_setup_imports_a_pkcs12_file(settings, tmp_path, db, capsys):
    settings.SIGNING_DIR = tmp_path / "signing"
    own = signing.generate_credentials(shop_name="Lakeside Test Conversions")
    p12 = tmp_path / "shop.p12"
    p12.write_bytes(
        pkcs12.serialize_key_and_certificates(
            b"shop", own.key, own.certificate, None, BestAvailableEncryption(b"s3cret-words")
        )
    )
    password = tmp_path / "password.txt"
    password.write_text("wrong\n")
    code, _, err = _run("signing_setup", "--import", str(p12), "--password-file", str(password),
                        capsys=capsys)  # fmt: skip
    assert code == 1 and "password" in err and _one_line(err)
    password.write_text("s3cret-words\n")
    code, _, _ = _run("signing_setup", "--import", str(p12), "--password-file", str(password),
                      capsys=capsys)  # fmt: skip
    assert code == 0
    assert signing.load_credentials().fingerprint == own.fingerprint


def test_render_record_writes_the_stored_signed_revision_of_an_approved_job(
    approved_job, signing_key, media, tmp_path, capsys
):
    out_file = tmp_path / "record.pdf"
    code, out, _ = _run("render_record", approved_job.number, "-o", str(out_file), capsys=capsys)
    assert code == 0 and "signed revision 1" in out
    revision = RecordRevision.objects.get(job=approved_job)
    assert hashlib.sha256(out_file.read_bytes()).hexdigest() == revision.sha256
    # Again: the same stored file, no second revision.
    _run("render_record", approved_job.number, "-o", str(out_file), capsys=capsys)
    assert RecordRevision.objects.filter(job=approved_job).count() == 1
    code, _, _ = _run("verify_record", str(out_file), capsys=capsys)
    assert code == 0


def test_render_record_writes_an_unsigned_draft_otherwise(db, signing_key, media, tmp_path,
                                                          capsys):  # fmt: skip
    job = make_job()
    out_file = tmp_path / "draft.pdf"
    code, out, _ = _run("render_record", job.number, "-o", str(out_file), capsys=capsys)
    assert code == 0 and "draft" in out
    reader = pypdf.PdfReader(io.BytesIO(out_file.read_bytes()))
    assert "DRAFT" in "".join(page.extract_text() for page in reader.pages)
    assert not RecordRevision.objects.exists()
    code, _, err = _run("verify_record", str(out_file), capsys=capsys)
    assert code == 1 and "no digital signature" in err and _one_line(err)


def test_render_record_refuses_an_unknown_job(db, tmp_path, capsys):
    code, _, err = _run("render_record", "NOPE-1", "-o", str(tmp_path / "x.pdf"), capsys=capsys)
    assert code == 1 and "There is no job NOPE-1" in err and _one_line(err)


def test_verify_record_refuses_a_missing_file(db, tmp_path, capsys):
    code, _, err = _run("verify_record", str(tmp_path / "missing.pdf"), capsys=capsys)
    assert code == 1 and "Cannot read" in err and _one_line(err)


def test_verify_record_via_call_command_passes_a_good_record(issued, tmp_path, capsys):
    _, data = issued
    path = tmp_path / "good.pdf"
    path.write_bytes(data)
    call_command("verify_record", str(path))
    assert "unchanged since it was signed" in capsys.readouterr().out


@pytest.mark.parametrize("junk", [b"", b"GIF89a not a record"])
def test_verify_record_refuses_junk(junk, signing_key, db, tmp_path, capsys):
    path = tmp_path / "junk.pdf"
    path.write_bytes(junk)
    code, _, err = _run("verify_record", str(path), capsys=capsys)
    assert code == 1 and _one_line(err)
