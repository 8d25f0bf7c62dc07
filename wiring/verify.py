"""Is this PDF a wiring record issued by this shop, and unchanged since?

`verify_pdf(data) -> Verdict` answers in plain words and never raises for a bad file.
Two checks, both must pass:

1. Cryptography (pyHanko's validate_pdf_signature): the first signature in the file is
   intact over the bytes it covers, and made with a certificate this shop trusts (its
   current one or one it replaced: wiring.signing.trusted_certificates).
2. The shop's own list: the SHA-256 of the signed revision (the file up to the end of the
   signature's byte range) equals a stored RecordRevision's, and the whole file equals it
   too; bytes after the signed revision are an incremental update made after signing (an
   appended page, a changed form, another signature).

The trust check runs at the stored revision's signing time (from the shop's database,
not from the file), so a certificate that has since expired or been replaced does not
turn an old record into a failure.
"""

from __future__ import annotations

import datetime
import hashlib
import io
import re
from dataclasses import dataclass

from django.utils import timezone

from wiring.loop import outside_running_loop

MAX_BYTES = 30 * 1024 * 1024  # far above any record (photos are printed small)
PDF_MAGIC = b"%PDF-"
CLAIM = re.compile(r"Wiring record (?P<job>\S+), revision (?P<revision>\d{1,6})")


@dataclass(frozen=True)
class Verdict:
    """`ok` only for an unchanged record issued by this shop. `code` is stable
    ("unchanged", "empty", "too_large", "not_pdf", "damaged", "unsigned", "tampered",
    "foreign_key", "unknown", "appended", "no_key"); `headline` is the one-line answer."""

    ok: bool
    code: str
    headline: str
    details: tuple[str, ...] = ()
    issued_by_shop: bool | None = None
    changed: bool | None = None
    job_number: str = ""
    revision: int | None = None
    signed_at: datetime.datetime | None = None
    signer: str = ""
    demo_key: bool = False

    @property
    def changed_text(self) -> str:
        return {True: "Yes", False: "No", None: "Cannot tell"}[self.changed]

    @property
    def issued_text(self) -> str:
        return {True: "Yes", False: "No", None: "Cannot tell"}[self.issued_by_shop]


def _when(moment: datetime.datetime) -> str:
    return f"{timezone.localtime(moment):%d %b %Y at %H:%M}"


def verify_pdf(data: bytes | None) -> Verdict:
    if not data:
        return Verdict(False, "empty", "The file is empty: there is nothing to check.")
    if len(data) > MAX_BYTES:
        return too_large()
    if PDF_MAGIC not in data[:1024]:
        return Verdict(
            False,
            "not_pdf",
            "This file is not a PDF, so it cannot be a wiring record.",
            issued_by_shop=False,
        )
    try:
        return _verify(data)
    except Exception as error:  # a damaged file may fail anywhere inside the PDF reader
        return damaged(error)


def too_large() -> Verdict:
    return Verdict(
        False,
        "too_large",
        f"The file is larger than {MAX_BYTES // (1024 * 1024)} MB, far larger than any"
        " record this shop issues; it was not checked.",
    )


def damaged(error: Exception | None = None) -> Verdict:
    detail = (f"The PDF reader said: {str(error)[:200]}",) if error else ()
    return Verdict(
        False,
        "damaged",
        "This PDF is damaged or has been changed: it cannot be read as a signed record.",
        details=detail,
        changed=True,
    )


def _verify(data: bytes) -> Verdict:
    from pyhanko.pdf_utils.reader import PdfFileReader

    from wiring.models import RecordRevision
    from wiring.signing import is_demo_certificate, trusted_certificates

    reader = PdfFileReader(io.BytesIO(data), strict=False)
    signatures = reader.embedded_signatures
    if not signatures:
        return Verdict(
            False,
            "unsigned",
            "This PDF carries no digital signature: it is not a record issued by this shop,"
            " or its signature has been removed. A draft record is never signed.",
            issued_by_shop=False,
            changed=None,
        )
    signature = signatures[0]
    claim = CLAIM.search(str(signature.sig_object.get("/Reason", "")))
    claimed_job = claim["job"] if claim else ""
    claimed_revision = int(claim["revision"]) if claim else None
    start, first_length, second_start, second_length = (int(v) for v in signature.byte_range)
    end = second_start + second_length
    if start != 0 or end > len(data):
        return damaged()
    signed_hash = hashlib.sha256(data[:end]).hexdigest()
    stored = RecordRevision.objects.select_related("job").filter(sha256=signed_hash).first()

    trusted = trusted_certificates()
    if not trusted:
        return Verdict(
            False,
            "no_key",
            "This server has no signing key yet, so it cannot tell whether a record is its own.",
            job_number=claimed_job,
            revision=claimed_revision,
        )
    status = _validate(signature, trusted, moment=stored.signed_at if stored else None)
    signer_cert = status.signing_cert
    signer = signer_cert.subject.human_friendly if signer_cert is not None else ""
    demo = False
    if signer_cert is not None:
        from cryptography import x509

        demo = is_demo_certificate(x509.load_der_x509_certificate(signer_cert.dump()))
    common = {
        "job_number": stored.job.number if stored else claimed_job,
        "revision": stored.number if stored else claimed_revision,
        "signed_at": stored.signed_at if stored else None,
        "signer": signer,
        "demo_key": demo,
    }
    details = _details(stored, demo)
    claimed = f" It claims to be job {claimed_job}, revision {claimed_revision}." if claim else ""

    if not (status.intact and status.valid):
        return Verdict(
            False,
            "tampered",
            "This file has been changed after it was signed: the signed content no longer"
            f" matches its signature.{claimed} Ask the shop for the original.",
            details=details,
            issued_by_shop=None,
            changed=True,
            **common,
        )
    if not status.trusted:
        return Verdict(
            False,
            "foreign_key",
            f"This file was signed with a key that is not this shop's (the signer calls"
            f" itself \u201c{signer}\u201d). It is not a record issued by this shop; it may be"
            f" a copy signed again elsewhere.{claimed}",
            details=details,
            issued_by_shop=False,
            changed=None,
            **common,
        )
    if stored is None:
        return Verdict(
            False,
            "unknown",
            "This file is signed with this shop's key, but the shop has no record of issuing"
            f" it, so it cannot say the content is what the shop approved.{claimed}",
            details=details,
            issued_by_shop=None,
            changed=None,
            **common,
        )
    ours = to_asn1_fingerprint(signer_cert) == stored.certificate_sha256
    issued = f"Issued by this shop as job {stored.job.number}, revision {stored.number}, on" + (
        f" {_when(stored.signed_at)}"
    )
    if end < len(data) or len(signatures) > 1:
        return Verdict(
            False,
            "appended",
            f"{issued}, but changed since: something was added to the file after it was"
            " signed (a page, an edit or another signature). Ask the shop for the original.",
            details=(
                f"{len(data) - end} bytes were added after the signed revision.",
                *details,
            ),
            issued_by_shop=True,
            changed=True,
            **common,
        )
    if not ours or hashlib.sha256(data).hexdigest() != stored.sha256:
        return damaged()
    return Verdict(
        True,
        "unchanged",
        f"{issued}, and unchanged since it was signed.",
        details=details,
        issued_by_shop=True,
        changed=False,
        **common,
    )


def to_asn1_fingerprint(certificate) -> str:
    """SHA-256 of an asn1crypto certificate's DER (what wiring.signing.certificate_fingerprint
    gives for the same certificate), as stored with each revision."""
    return hashlib.sha256(certificate.dump()).hexdigest() if certificate is not None else ""


def _validate(signature, trusted, *, moment: datetime.datetime | None):
    from pyhanko.sign.validation import validate_pdf_signature
    from pyhanko_certvalidator import ValidationContext

    from wiring.signing import to_asn1

    roots = [to_asn1(c) for c in trusted]
    context = ValidationContext(trust_roots=roots, moment=moment, allow_fetching=False)
    return outside_running_loop(validate_pdf_signature, signature, context)


def _details(stored, demo: bool) -> tuple[str, ...]:
    from wiring.models import RecordRevision

    out: list[str] = []
    if demo:
        out.append(
            "It was signed with a demonstration key: it is a sample record, not a shop's"
            " real record."
        )
    if stored is not None:
        newer = (
            RecordRevision.objects.filter(job=stored.job, number__gt=stored.number)
            .order_by("-number")
            .first()
        )
        if newer is not None:
            out.append(
                f"A newer revision ({newer.number}, issued {_when(newer.signed_at)}) of this"
                " record exists; ask the shop for it."
            )
    return tuple(out)
