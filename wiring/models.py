"""The wiring record's issued revisions and the owner's private links.

RecordRevision: one signed PDF of a job's record, issued after an approval (number 1, 2,
... per job, one per approval). The file is stored through Django's storage API under a
name that is never reused, and the row is append-only like the inspections evidence
(inspections.models.base: model and queryset refuse, and database triggers from
migration 0002_append_only_guards refuse UPDATE and DELETE): a re-issue after a reopen
and a new approval is a new revision, never a replacement.

OwnerLink: a private link for the vehicle's owner. Only the SHA-256 of its token is
stored (the token itself is shown once, when the office creates it), with an expiry date;
the office may revoke it (the row records when and by whom). Every opening is an
OwnerLinkVisit (append-only, same guard): time, client address, user agent, what was
opened.
"""

from __future__ import annotations

import hashlib

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.utils import timezone

from inspections.models.base import AppendOnlyModel


def revision_upload_to(instance: RecordRevision, filename: str) -> str:
    # The services pass the full name; kept so the field has a stable callable.
    return filename


class RecordRevision(AppendOnlyModel):
    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="record_revisions")
    number = models.PositiveIntegerField(help_text="1 for the first issue, then 2, 3, ...")
    file = models.FileField(upload_to=revision_upload_to, max_length=255)
    sha256 = models.CharField(
        "SHA-256", max_length=64, help_text="Of the signed file exactly as stored."
    )
    size = models.PositiveIntegerField(help_text="Bytes of the signed file.")
    signed_at = models.DateTimeField(default=timezone.now)
    approval = models.ForeignKey(
        "inspections.SignOff", on_delete=models.PROTECT, related_name="record_revisions"
    )
    certificate_sha256 = models.CharField(
        "signing certificate SHA-256", max_length=64, help_text="Fingerprint of the shop's key."
    )
    certificate_subject = models.CharField(max_length=300)
    demo_key = models.BooleanField(default=False, help_text="Signed with a demo key.")
    created_by = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="+",
        help_text="Empty when issued from the command line.",
    )

    class Meta:
        ordering = ["job", "number"]
        get_latest_by = "number"
        constraints = [
            models.UniqueConstraint(fields=["job", "number"], name="record_revision_number"),
            # One issue per approval: a second call for the same approval finds this one.
            models.UniqueConstraint(fields=["approval"], name="record_revision_per_approval"),
            models.CheckConstraint(condition=Q(number__gte=1), name="record_revision_from_1"),
        ]

    def __str__(self) -> str:
        return f"{self.job.number} revision {self.number}"

    @property
    def filename(self) -> str:
        """What a download is called: JOB-2026-0001-record-r2.pdf."""
        return f"{self.job.number}-record-r{self.number}.pdf"


def token_hash(token: str) -> str:
    """SHA-256 of an owner link's token: what the database keeps instead of the token."""
    return hashlib.sha256(token.encode("utf-8", "surrogatepass")).hexdigest()


class OwnerLink(models.Model):
    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="owner_links")
    token_sha256 = models.CharField(max_length=64, unique=True, editable=False)
    expires_on = models.DateField(help_text="The link works until the end of this day.")
    note = models.CharField(max_length=120, blank=True, help_text="Who it was made for.")
    created_at = models.DateTimeField(default=timezone.now, editable=False)
    created_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+"
    )
    revoked_at = models.DateTimeField(null=True, blank=True)
    revoked_by = models.ForeignKey(
        settings.AUTH_USER_MODEL, on_delete=models.PROTECT, null=True, blank=True, related_name="+"
    )
    last_sent_to = models.EmailField(blank=True)
    last_sent_at = models.DateTimeField(null=True, blank=True)

    class Meta:
        ordering = ["-created_at", "-pk"]
        constraints = [
            models.CheckConstraint(
                condition=Q(revoked_at__isnull=True, revoked_by__isnull=True)
                | Q(revoked_at__isnull=False, revoked_by__isnull=False),
                name="owner_link_revoked_by_someone",
            ),
        ]

    def __str__(self) -> str:
        return f"{self.job.number} owner link until {self.expires_on:%Y-%m-%d}"

    @property
    def is_revoked(self) -> bool:
        return self.revoked_at is not None

    def is_expired(self, today=None) -> bool:
        return (today or timezone.localdate()) > self.expires_on

    @property
    def is_usable(self) -> bool:
        return not self.is_revoked and not self.is_expired()


class OwnerLinkVisit(AppendOnlyModel):
    class Outcome(models.TextChoices):
        PAGE = "page", "Opened the page"
        PDF = "pdf", "Downloaded a revision"
        EXPIRED = "expired", "Refused: expired"
        REVOKED = "revoked", "Refused: revoked"

    link = models.ForeignKey(OwnerLink, on_delete=models.PROTECT, related_name="visits")
    at = models.DateTimeField(default=timezone.now)
    address = models.GenericIPAddressField(null=True, blank=True)
    user_agent = models.CharField(max_length=300, blank=True)
    outcome = models.CharField(max_length=8, choices=Outcome.choices)
    revision = models.PositiveIntegerField(null=True, blank=True)

    class Meta:
        ordering = ["-at", "-pk"]

    def __str__(self) -> str:
        return f"{self.link.job.number}: {self.get_outcome_display()} {self.at:%Y-%m-%d %H:%M}"
