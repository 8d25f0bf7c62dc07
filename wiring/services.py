"""Writes of the wiring record: issuing a signed revision, and the owner's private links.

`record_issue(*, job, by=None, base_url="") -> RecordRevision` is what the approval calls
once the lead has approved (and `render_record` and the demo call too). It is safe to
call again: one revision per approval, so a second call for the same approval returns the
stored one. After a reopen and a new approval it issues the next revision. Steps:

1. the job must be approved (inspections.services.job_is_locked) and its approval still
   cover the record as it stands (signoff_is_current);
2. render with `wiring.render.render_record_pdf(job, revision=n, draft=False,
   verify_url=..., issued_at=...)`, then sign (wiring.signing.sign_pdf). Both run before
   the transaction: they take seconds, and a SQLite write transaction holds every tablet
   back while it is open;
3. in one transaction: check again that this approval has no revision and n is next,
   store the file through Django's storage API under a new name (never replacing one),
   and add the RecordRevision row (append-only). If the transaction fails, the stored
   file is deleted again.

`base_url` ("https://shop.example") makes the verify address printed on the record (its
QR code) absolute; without it the path alone is printed.
"""

from __future__ import annotations

import datetime
import hashlib
import hmac
import secrets

from django.conf import settings
from django.core.exceptions import PermissionDenied, ValidationError
from django.core.files.base import ContentFile
from django.core.files.storage import default_storage
from django.core.mail import send_mail
from django.core.validators import validate_email
from django.db import IntegrityError, transaction
from django.urls import reverse
from django.utils import timezone
from django.utils.http import urlencode

from inspections.models import SignOff
from inspections.services import job_is_locked, signoff_is_current
from shop.models import ShopProfile
from wiring.models import OwnerLink, OwnerLinkVisit, RecordRevision, token_hash

# The office's: the role table (shop/roles.py) gives the owners' records in full (deleting
# them included) to the office alone, and an owner's private link is part of that care.
OWNER_LINKS_PERM = "shop.delete_owner"
TOKEN_BYTES = 32  # 256 bits from secrets: not guessable, 43 characters in the address
DEFAULT_LINK_DAYS = 365
MAX_LINK_DAYS = 10 * 365


def verify_url_for(job_number: str, revision: int | None, base_url: str = "") -> str:
    query = {"job": job_number} | ({"revision": revision} if revision else {})
    return f"{base_url.rstrip('/')}{reverse('record_verify')}?{urlencode(query)}"


def record_reason(job_number: str, revision: int, shop_name: str) -> str:
    """The signature's /Reason; wiring.verify reads the job and revision back from it to
    say which record a changed file claims to be."""
    return f"Wiring record {job_number}, revision {revision}, issued by {shop_name}"


def _approval(job) -> SignOff:
    approval = (
        SignOff.objects.filter(job=job, kind=SignOff.Kind.APPROVAL)
        .order_by("-signed_at", "-pk")
        .first()
    )
    if not job_is_locked(job) or approval is None:
        raise ValidationError(
            {"job": f"Job {job.number} is not approved: only an approved job's record is issued."}
        )
    if not signoff_is_current(approval):
        raise ValidationError(
            {
                "job": f"Job {job.number} changed after its approval; a lead must reopen and"
                " approve it again before its record is issued."
            }
        )
    return approval


def record_issue(*, job, by=None, base_url: str = "") -> RecordRevision:
    """Issue (render, sign, store) the record of the approved `job`; see the module
    docstring. ValidationError when the job is not approved; wiring.signing.SigningError
    when the server has no signing key."""
    from wiring import signing

    approval = _approval(job)
    existing = RecordRevision.objects.filter(approval=approval).first()
    if existing is not None:
        return existing
    try:
        from wiring.render import render_record_pdf
    except ImportError as error:
        raise RuntimeError(
            f"The record cannot be rendered: wiring.render is missing ({error})"
        ) from error
    credentials = signing.load_credentials()
    last = RecordRevision.objects.filter(job=job).order_by("-number").first()
    number = (last.number if last else 0) + 1
    issued_at = timezone.now()
    shop = ShopProfile.load().name
    pdf = render_record_pdf(
        job,
        revision=number,
        draft=False,
        verify_url=verify_url_for(job.number, number, base_url),
        issued_at=issued_at,
    )
    signed = signing.sign_pdf(
        pdf,
        reason=record_reason(job.number, number, shop),
        location=shop,
        credentials=credentials,
        stamp_lines=[
            f"Digitally signed by {credentials.common_name}",
            f"Job {job.number} · revision {number}",
            f"Signed {timezone.localtime(issued_at):%d %b %Y %H:%M %Z}",
            f"Key {credentials.fingerprint[:16]}",
            *(["DEMO KEY: not a real shop's signature"] if credentials.is_demo else []),
            "Check it on the shop's verify page (QR code on the cover).",
        ],
    )
    digest = hashlib.sha256(signed).hexdigest()
    name = default_storage.save(
        f"records/{job.number}/{job.number}-r{number}-{secrets.token_hex(8)}.pdf",
        ContentFile(signed),
    )
    try:
        with transaction.atomic():
            if RecordRevision.objects.filter(approval=approval).exists():
                raise IntegrityError("issued meanwhile")
            return RecordRevision.objects.create(
                job=job,
                number=number,
                file=name,
                sha256=digest,
                size=len(signed),
                signed_at=issued_at,
                approval=approval,
                certificate_sha256=credentials.fingerprint,
                certificate_subject=credentials.subject[:300],
                demo_key=credentials.is_demo,
                created_by=by if getattr(by, "is_authenticated", False) else None,
            )
    except IntegrityError:
        default_storage.delete(name)
        # Another request issued this approval's record first: that one stands.
        winner = RecordRevision.objects.filter(approval=approval).first()
        if winner is None:
            raise
        return winner
    except BaseException:
        default_storage.delete(name)
        raise


def latest_revision(job) -> RecordRevision | None:
    return RecordRevision.objects.filter(job=job).order_by("-number").first()


# ---- owner links ----


def _require_office(user) -> None:
    if (
        user is None
        or not getattr(user, "is_authenticated", False)
        or not user.is_active
        or not user.has_perm(OWNER_LINKS_PERM)
    ):
        raise PermissionDenied("Only the office makes, sends and revokes owners' links.")


def _clean_expiry(expires_on: object) -> datetime.date:
    today = timezone.localdate()
    if isinstance(expires_on, datetime.datetime) or not isinstance(expires_on, datetime.date):
        raise ValidationError({"expires_on": "Give the last day the link works, as a date."})
    if expires_on < today:
        raise ValidationError({"expires_on": "The last day cannot be in the past."})
    if expires_on > today + datetime.timedelta(days=MAX_LINK_DAYS):
        raise ValidationError(
            {"expires_on": "A link lasts at most ten years; make a new one after that."}
        )
    return expires_on


def owner_link_create(
    *, job, by, expires_on: datetime.date, note: str = ""
) -> tuple[OwnerLink, str]:
    """A new private link to `job`'s record. Returns the link and its token: the token is
    stored only as its SHA-256, so show it now or never."""
    _require_office(by)
    expires_on = _clean_expiry(expires_on)
    note = " ".join(str(note or "").split())
    if len(note) > 120:
        raise ValidationError({"note": "Keep the note under 120 characters."})
    token = secrets.token_urlsafe(TOKEN_BYTES)
    link = OwnerLink.objects.create(
        job=job, token_sha256=token_hash(token), expires_on=expires_on, note=note, created_by=by
    )
    return link, token


def owner_link_revoke(*, link: OwnerLink, by) -> OwnerLink:
    """Withdraw a link; it stops working at once and stays listed with who revoked it."""
    _require_office(by)
    with transaction.atomic():
        link = OwnerLink.objects.select_for_update().get(pk=link.pk)
        if link.revoked_at is None:
            link.revoked_at = timezone.now()
            link.revoked_by = by
            link.save(update_fields=["revoked_at", "revoked_by"])
    return link


def owner_link_matches(link: OwnerLink, token: object) -> bool:
    return isinstance(token, str) and hmac.compare_digest(token_hash(token), link.token_sha256)


def owner_link_url(token: str, base_url: str = "") -> str:
    return f"{base_url.rstrip('/')}{reverse('owner_record', kwargs={'token': token})}"


def owner_link_send(*, link: OwnerLink, token: str, to: str, by, base_url: str = "") -> None:
    """E-mail the link to the owner (Django's e-mail backend). The token must be the
    link's own: it was shown once, when the link was made, and is not stored."""
    _require_office(by)
    to = str(to or "").strip()
    try:
        validate_email(to)
    except ValidationError:
        raise ValidationError({"to": "Enter the e-mail address to send the link to."}) from None
    if not owner_link_matches(link, token):
        raise ValidationError(
            {"token": "This link's address was shown once, when it was made; make a new link."}
        )
    if not link.is_usable:
        raise ValidationError({"token": "This link is revoked or expired; make a new one."})
    shop = ShopProfile.load()
    vehicle = link.job.vehicle
    body = (
        f"Hello,\n\n{shop.name} has issued the wiring record of your {vehicle}"
        f" (job {link.job.number}). Open it here:\n\n{owner_link_url(token, base_url)}\n\n"
        f"The link works until {link.expires_on:%d %B %Y}. It is private: anyone who has it"
        " can read the record, so keep it to yourself. Ask us if you need a new one.\n\n"
        "The record supports, and never replaces, the applicable standards, local codes"
        f" and the judgement of a qualified person.\n\n{shop.name}\n"
    )
    try:
        send_mail(
            f"Your wiring record from {shop.name}",
            body,
            settings.DEFAULT_FROM_EMAIL,
            [to],
            fail_silently=False,
        )
    except Exception as error:  # SMTP failures are OSError or smtplib.SMTPException
        raise ValidationError({"to": f"The e-mail could not be sent: {error}"}) from None
    OwnerLink.objects.filter(pk=link.pk).update(last_sent_to=to, last_sent_at=timezone.now())


def owner_link_for_token(token: object) -> OwnerLink | None:
    """The link with this token, whatever its state; None for no such link."""
    if not isinstance(token, str) or not 20 <= len(token) <= 100:
        return None
    return (
        OwnerLink.objects.select_related("job__vehicle")
        .filter(token_sha256=token_hash(token))
        .first()
    )


def owner_link_visit(
    *, link: OwnerLink, address: str | None, user_agent: str, outcome: str, revision=None
) -> OwnerLinkVisit:
    return OwnerLinkVisit.objects.create(
        link=link,
        address=address or None,
        # A NUL in the header would reach PostgreSQL, which refuses it (a 500 for the owner).
        user_agent=str(user_agent or "").replace("\x00", "")[:300],
        outcome=outcome,
        revision=revision,
    )
