"""The shop's signing key and the PAdES signature on the wiring record (pyHanko).

Key store (settings.SIGNING_DIR, outside MEDIA_ROOT so no media URL or storage backend can
serve it): `key.pem` (PKCS#8, mode 0600), `cert.pem` (the shop's certificate) and
`chain.pem` (any intermediate certificates of an imported PKCS#12), in a directory of
mode 0700. `manage.py signing_setup` makes a key and a self-signed certificate for the
shop's name, or imports the shop's PKCS#12 file. A replaced certificate is kept in
`retired/` (never its key), so records signed before the change still verify.

Signature: PAdES (ETSI.CAdES.detached) over the whole file as rendered, in one incremental
update, with a visible signature in `wiring.render.SIGNATURE_BOX` on the last page. The
box's appearance is a small PDF made by WeasyPrint (its fonts embedded, as PDF/A asks),
so no unembedded standard font enters the record. With settings.SIGNING_TIMESTAMP_URL
set, the signature carries an RFC 3161 timestamp token from that server (PAdES B-T); a
server that does not answer is logged and the record is signed without it (B-B), so an
approval never waits on another party.
"""

from __future__ import annotations

import datetime
import hashlib
import io
import logging
import os
import tempfile
from collections.abc import Sequence
from dataclasses import dataclass, field
from pathlib import Path

from cryptography import x509
from cryptography.hazmat.primitives import hashes, serialization
from cryptography.hazmat.primitives.asymmetric import ec
from cryptography.hazmat.primitives.serialization import pkcs12
from cryptography.x509.oid import NameOID
from django.conf import settings
from django.utils.html import escape

from wiring.loop import outside_running_loop

logger = logging.getLogger(__name__)

KEY_FILE = "key.pem"
CERT_FILE = "cert.pem"
CHAIN_FILE = "chain.pem"
RETIRED_DIR = "retired"
DEMO_MARK = " (demo key)"
FIELD_NAME = "ShopSignature"
# A record is kept for the life of the vehicle: the certificate outlives it comfortably.
CERTIFICATE_YEARS = 40
# Used only while wiring.render does not export its own SIGNATURE_BOX (same units: PDF
# points, origin at the bottom-left of the last page).
FALLBACK_BOX = (46.35, 57.69, 328.82, 178.58)


class SigningError(Exception):
    """Something the person running the shop can act on, in plain words."""


@dataclass(frozen=True)
class Credentials:
    key: object  # a cryptography private key (EC or RSA)
    certificate: x509.Certificate
    chain: tuple[x509.Certificate, ...] = field(default=())

    @property
    def fingerprint(self) -> str:
        return certificate_fingerprint(self.certificate)

    @property
    def subject(self) -> str:
        return self.certificate.subject.rfc4514_string()

    @property
    def is_demo(self) -> bool:
        return is_demo_certificate(self.certificate)

    @property
    def common_name(self) -> str:
        names = self.certificate.subject.get_attributes_for_oid(NameOID.COMMON_NAME)
        return str(names[0].value) if names else self.subject


def certificate_fingerprint(certificate: x509.Certificate) -> str:
    return certificate.fingerprint(hashes.SHA256()).hex()


def is_demo_certificate(certificate: x509.Certificate) -> bool:
    organisations = certificate.subject.get_attributes_for_oid(NameOID.ORGANIZATION_NAME)
    return any(str(o.value).endswith(DEMO_MARK) for o in organisations)


# ---- the key store ----


def signing_dir() -> Path:
    return Path(settings.SIGNING_DIR)


def is_set_up() -> bool:
    folder = signing_dir()
    return (folder / KEY_FILE).is_file() and (folder / CERT_FILE).is_file()


def generate_credentials(*, shop_name: str, demo: bool = False) -> Credentials:
    """A new EC P-256 key and a self-signed certificate naming the shop (nothing stored)."""
    name = " ".join(str(shop_name).split()) or "Our shop"
    # X.509 limits both attributes to 64 characters.
    organisation = name[: 64 - len(DEMO_MARK)] + DEMO_MARK if demo else name[:64]
    subject = x509.Name(
        [
            x509.NameAttribute(NameOID.COMMON_NAME, name[:64]),
            x509.NameAttribute(NameOID.ORGANIZATION_NAME, organisation),
        ]
    )
    key = ec.generate_private_key(ec.SECP256R1())
    now = datetime.datetime.now(datetime.UTC)
    certificate = (
        x509.CertificateBuilder()
        .subject_name(subject)
        .issuer_name(subject)
        .public_key(key.public_key())
        .serial_number(x509.random_serial_number())
        .not_valid_before(now - datetime.timedelta(days=1))
        .not_valid_after(now + datetime.timedelta(days=365 * CERTIFICATE_YEARS))
        .add_extension(x509.BasicConstraints(ca=False, path_length=None), critical=True)
        .add_extension(
            x509.KeyUsage(
                digital_signature=True,
                content_commitment=True,
                key_encipherment=False,
                data_encipherment=False,
                key_agreement=False,
                key_cert_sign=False,
                crl_sign=False,
                encipher_only=False,
                decipher_only=False,
            ),
            critical=True,
        )
        .add_extension(x509.SubjectKeyIdentifier.from_public_key(key.public_key()), critical=False)
        .sign(key, hashes.SHA256())
    )
    return Credentials(key=key, certificate=certificate)


def create_key(*, shop_name: str, demo: bool = False, replace: bool = False) -> Credentials:
    """Make and store the shop's key and self-signed certificate (signing_setup)."""
    credentials = generate_credentials(shop_name=shop_name, demo=demo)
    _install(credentials, replace=replace)
    return credentials


def import_pkcs12(data: bytes, password: bytes | None, *, replace: bool = False) -> Credentials:
    """Store the key and certificates of the shop's PKCS#12 file."""
    try:
        key, certificate, chain = pkcs12.load_key_and_certificates(data, password)
    except ValueError as error:
        raise SigningError(
            "The PKCS#12 file could not be opened: the password is wrong or the file is"
            f" damaged ({error})."
        ) from None
    if key is None or certificate is None:
        raise SigningError("The PKCS#12 file holds no private key with its certificate.")
    credentials = Credentials(key=key, certificate=certificate, chain=tuple(chain or ()))
    _install(credentials, replace=replace)
    return credentials


def ensure_demo_key(*, shop_name: str) -> Credentials:
    """The shop's key, making a demo key (marked as such) when there is none yet."""
    if is_set_up():
        return load_credentials()
    return create_key(shop_name=shop_name, demo=True)


def _secure_dir(path: Path) -> None:
    path.mkdir(mode=0o700, parents=True, exist_ok=True)
    path.chmod(0o700)


def _write_private(path: Path, data: bytes) -> None:
    """Write `data` to `path` readable by this user alone, replacing it in one step."""
    handle, temporary = tempfile.mkstemp(dir=path.parent, prefix=".new-")
    try:
        os.fchmod(handle, 0o600)
        with os.fdopen(handle, "wb") as out:
            out.write(data)
            out.flush()
            os.fsync(out.fileno())
        os.replace(temporary, path)
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise


def _install(credentials: Credentials, *, replace: bool) -> None:
    folder = signing_dir()
    if is_set_up() and not replace:
        raise SigningError(
            f"A signing key already exists in {folder}; records signed with it verify"
            " against it. Use --replace to make a new one (the old certificate is kept so"
            " those records still verify)."
        )
    _secure_dir(folder)
    if (folder / CERT_FILE).is_file():
        old = (folder / CERT_FILE).read_bytes()
        retired = folder / RETIRED_DIR
        _secure_dir(retired)
        fingerprint = hashlib.sha256(old).hexdigest()[:16]
        _write_private(retired / f"cert-{fingerprint}.pem", old)
    key_pem = credentials.key.private_bytes(
        serialization.Encoding.PEM,
        serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption(),
    )
    pem = serialization.Encoding.PEM
    _write_private(folder / KEY_FILE, key_pem)
    _write_private(folder / CERT_FILE, credentials.certificate.public_bytes(pem))
    _write_private(folder / CHAIN_FILE, b"".join(c.public_bytes(pem) for c in credentials.chain))


def load_credentials() -> Credentials:
    folder = signing_dir()
    if not is_set_up():
        raise SigningError(
            f"This server has no signing key yet (looked in {folder}): run"
            " `python manage.py signing_setup` first."
        )
    try:
        key = serialization.load_pem_private_key((folder / KEY_FILE).read_bytes(), None)
        certificate = x509.load_pem_x509_certificate((folder / CERT_FILE).read_bytes())
        chain_path = folder / CHAIN_FILE
        chain = tuple(
            x509.load_pem_x509_certificates(chain_path.read_bytes())
            if chain_path.is_file() and chain_path.stat().st_size
            else ()
        )
    except (OSError, ValueError) as error:
        raise SigningError(f"The signing key in {folder} cannot be read: {error}") from None
    return Credentials(key=key, certificate=certificate, chain=chain)


def trusted_certificates() -> list[x509.Certificate]:
    """The shop's certificate and the ones it replaced: what verification trusts."""
    folder = signing_dir()
    found: list[x509.Certificate] = []
    paths = [folder / CERT_FILE, *sorted((folder / RETIRED_DIR).glob("cert-*.pem"))]
    for path in paths:
        try:
            found.append(x509.load_pem_x509_certificate(path.read_bytes()))
        except (OSError, ValueError):
            continue
    return found


def to_asn1(certificate: x509.Certificate):
    from asn1crypto import x509 as asn1_x509

    return asn1_x509.Certificate.load(certificate.public_bytes(serialization.Encoding.DER))


# ---- signing ----


def signature_box() -> tuple[float, float, float, float]:
    try:
        from wiring.render import SIGNATURE_BOX
    except ImportError:
        return FALLBACK_BOX
    return tuple(SIGNATURE_BOX)


def stamp_pdf(lines: Sequence[str], *, width: float, height: float) -> bytes:
    """The visible signature's appearance: the lines, first one bold, on a page the size
    of the box (WeasyPrint, so its fonts are embedded)."""
    from weasyprint import HTML
    from weasyprint.urls import URLFetcher

    head, *rest = [escape(line) for line in lines] or [""]
    body = f"<p class='head'>{head}</p>" + "".join(f"<p>{line}</p>" for line in rest)
    html = (
        "<html><head><style>"
        f"@page {{ size: {width:.2f}pt {height:.2f}pt; margin: 0 }}"
        "body { margin: 5pt 6pt; font-family: 'DejaVu Sans', 'Noto Sans CJK SC', sans-serif;"
        " font-size: 8.5pt; line-height: 1.3; color: #000 }"
        "p { margin: 0 0 1.5pt; overflow-wrap: anywhere } .head { font-weight: bold;"
        " font-size: 10pt; margin-bottom: 3pt }"
        f"</style></head><body>{body}</body></html>"
    )
    fetcher = URLFetcher(allowed_protocols={"data"})
    return HTML(string=html, base_url="data:,", url_fetcher=fetcher).write_pdf()


def _signer(credentials: Credentials):
    from asn1crypto import keys as asn1_keys
    from pyhanko.sign import signers
    from pyhanko_certvalidator.registry import SimpleCertificateStore

    der = credentials.key.private_bytes(
        serialization.Encoding.DER,
        serialization.PrivateFormat.PKCS8,
        serialization.NoEncryption(),
    )
    certificate = to_asn1(credentials.certificate)
    chain = [to_asn1(c) for c in credentials.chain]
    return signers.SimpleSigner(
        signing_cert=certificate,
        signing_key=asn1_keys.PrivateKeyInfo.load(der),
        cert_registry=SimpleCertificateStore.from_certs([certificate, *chain]),
    )


def _timestamper(url: str):
    if not url:
        return None
    from pyhanko.sign.timestamps import HTTPTimeStamper

    return HTTPTimeStamper(url, timeout=10)


def sign_pdf(
    data: bytes,
    *,
    reason: str,
    location: str,
    stamp_lines: Sequence[str],
    credentials: Credentials | None = None,
    box: tuple[float, float, float, float] | None = None,
    timestamp_url: str | None = None,
) -> bytes:
    """`data` (a PDF) signed by the shop: PAdES, visible in `box` on the last page."""
    from pyhanko.pdf_utils.incremental_writer import IncrementalPdfFileWriter
    from pyhanko.sign import fields, signers
    from pyhanko.stamp import StaticStampStyle

    credentials = credentials or load_credentials()
    x1, y1, x2, y2 = box or signature_box()
    url = settings.SIGNING_TIMESTAMP_URL if timestamp_url is None else timestamp_url
    appearance = stamp_pdf(stamp_lines, width=x2 - x1, height=y2 - y1)
    with tempfile.NamedTemporaryFile(suffix=".pdf") as stamp_file:
        stamp_file.write(appearance)
        stamp_file.flush()
        style = StaticStampStyle.from_pdf_file(stamp_file.name, border_width=0)

        def attempt(timestamper) -> bytes:
            writer = IncrementalPdfFileWriter(io.BytesIO(data))
            fields.append_signature_field(
                writer,
                sig_field_spec=fields.SigFieldSpec(FIELD_NAME, on_page=-1, box=(x1, y1, x2, y2)),
            )
            meta = signers.PdfSignatureMetadata(
                field_name=FIELD_NAME,
                subfilter=fields.SigSeedSubFilter.PADES,
                md_algorithm="sha256",
                reason=reason,
                location=location,
                name=credentials.common_name,
            )
            pdf_signer = signers.PdfSigner(
                meta, signer=_signer(credentials), stamp_style=style, timestamper=timestamper
            )
            return pdf_signer.sign_pdf(writer).getvalue()

        timestamper = _timestamper(url)
        if timestamper is None:
            return outside_running_loop(attempt, None)
        try:
            return outside_running_loop(attempt, timestamper)
        except Exception as error:  # any failure of the other party's server
            logger.warning(
                "timestamp server %s failed (%s); signed without a timestamp", url, error
            )
            return outside_running_loop(attempt, None)
