"""Sign-offs: who signed what, in which role, meaning what, when, with the drawn signature
and a SHA-256 of everything the signature covers.

Canonical serialisation (what `content_sha256` is computed over)
----------------------------------------------------------------

The content of a sign-off is a JSON object built by
inspections.services.signoff_content(stage=...). It is serialised as

    json.dumps(content, sort_keys=True, separators=(",", ":"), ensure_ascii=False,
               allow_nan=False).encode("utf-8")

that is: keys of every object sorted, no whitespace at all (no space after "," or ":"),
non-ASCII characters written as themselves and encoded as UTF-8 (so "N·m" is the bytes
4e c2 b7 6d, not "\\u00b7"), and no NaN or Infinity. Only JSON strings, integers,
true/false/null, arrays and objects appear: decimal quantities (torque values, amps,
temperatures) are written as decimal strings exactly as stored ("10.500" stays "10.500"),
because a float's text is not the same in every language and library; `canonical_json`
refuses a float so one cannot slip in. Times are ISO 8601 in UTC with microseconds
("2026-03-12T14:05:09.123456+00:00"), so the server's time zone setting cannot change a
hash. Arrays are in a defined order (by id), so the same facts always give the same bytes,
and the order keys were inserted in never matters.

The hash is the lower-case hex SHA-256 of those bytes (`content_hash`). The canonical text
itself is stored beside it (`content`), so anyone can re-hash it with a few lines of any
language and compare with what the record shows, and so the page can say what changed.

Append-only like the other evidence (inspections.models.base; triggers in migration 0005).
"""

from __future__ import annotations

import hashlib
import json

from django.conf import settings
from django.db import models
from django.db.models import Q
from django.utils import timezone

from inspections.models.base import AppendOnlyModel
from inspections.models.stages import Stage


def _refuse_float(value):
    raise TypeError(
        f"{value!r} ({type(value).__name__}) has no canonical form: write decimals as strings"
    )


def canonical_json(content: dict) -> str:
    """The canonical text of `content` (see the module docstring)."""

    def check(value) -> None:
        if isinstance(value, float):
            _refuse_float(value)
        elif isinstance(value, dict):
            for key, item in value.items():
                if not isinstance(key, str):
                    raise TypeError(f"Object keys must be strings, not {key!r}")
                check(item)
        elif isinstance(value, list | tuple):
            for item in value:
                check(item)
        elif not (value is None or isinstance(value, bool | int | str)):
            _refuse_float(value)

    check(content)
    return json.dumps(
        content, sort_keys=True, separators=(",", ":"), ensure_ascii=False, allow_nan=False
    )


def content_hash(content: dict) -> str:
    """Lower-case hex SHA-256 of the canonical UTF-8 serialisation of `content`."""
    return hashlib.sha256(canonical_json(content).encode("utf-8")).hexdigest()


class SignOff(AppendOnlyModel):
    """One signature. Install and retorque sign-offs are a technician's (or a lead's who
    did the work); approval is the lead's; receipt is the owner's, who has no account
    (`signer` empty, `printed_name` typed). All hang on a stage: approval and receipt on
    the job's handover stage, and both cover the same content (the whole record), so an
    owner's receipt with the approval's hash shows they received exactly what was
    approved."""

    class Kind(models.TextChoices):
        RECHECK = "recheck", "Re-check"
        FIRST_INSTALL = "first_install", "First install"
        RETORQUE = "retorque", "Retorque"
        APPROVAL = "approval", "Approval"
        RECEIPT = "receipt", "Owner's receipt"

    class Role(models.TextChoices):
        TECHNICIAN = "technician", "Technician"
        LEAD = "lead", "Lead"
        ADMIN = "admin", "Administrator"
        OWNER = "owner", "Owner"

    # What each kind's signature means, in plain words (shown above the signing pad).
    MEANINGS = {
        Kind.RECHECK: "re-checked as found, before any re-tightening",
        Kind.FIRST_INSTALL: "installed and torqued",
        Kind.RETORQUE: "retorqued after heat cycle",
        Kind.APPROVAL: "reviewed and approved",
        Kind.RECEIPT: "received by the owner",
    }

    job = models.ForeignKey("shop.Job", on_delete=models.PROTECT, related_name="signoffs")
    stage = models.ForeignKey(Stage, on_delete=models.PROTECT, related_name="signoffs")
    kind = models.CharField(max_length=14, choices=Kind.choices)
    signer = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="signoffs",
        help_text="Empty for the owner, who has no account.",
    )
    # The name as it stood when signed (a later change of the account does not rewrite it).
    printed_name = models.CharField(max_length=120)
    role = models.CharField(max_length=12, choices=Role.choices)
    meaning = models.CharField(max_length=200)
    signed_at = models.DateTimeField(default=timezone.now)
    signature_png = models.BinaryField("drawn signature (PNG)")
    content = models.TextField(help_text="The canonical JSON the hash is computed over.")
    content_sha256 = models.CharField(max_length=64)

    class Meta:
        ordering = ["signed_at", "pk"]
        permissions = [
            ("sign_stage", "Can sign the first install and retorque stages"),
            ("approve_job", "Can review a job: approve it for handover or send a stage back"),
            ("reopen_job", "Can reopen an approved job"),
        ]
        constraints = [
            models.CheckConstraint(
                condition=(Q(role="owner", signer__isnull=True, kind="receipt"))
                | (~Q(role="owner") & Q(signer__isnull=False) & ~Q(kind="receipt")),
                name="signoff_owner_has_no_account",
            ),
            models.CheckConstraint(condition=~Q(printed_name=""), name="signoff_printed_name"),
            models.CheckConstraint(condition=~Q(meaning=""), name="signoff_meaning_given"),
            models.CheckConstraint(
                condition=Q(
                    kind__in=["recheck", "first_install", "retorque", "approval", "receipt"]
                ),
                name="signoff_kind_known",
            ),
        ]
        indexes = [models.Index(fields=["job", "kind", "signed_at"], name="signoff_by_job")]

    def __str__(self) -> str:
        return f"{self.printed_name}, {self.meaning}, {self.signed_at:%Y-%m-%d %H:%M}"
