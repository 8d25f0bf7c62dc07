"""A lead's waiver of a finding, bound to the facts it was granted on.

Kept apart from circuits/models.py (which imports it, so `circuits.models.Waiver` is the
name everywhere) to keep that module under the house size limit.

A waiver is matched to a recomputed finding by (code, subject), and it covers the finding
only while the finding rests on the same facts (`facts_hash`, see circuits.waiver_facts):
when a circuit it names changes materially, the waiver has lapsed and the finding is open
again until a lead renews it. Rows are never deleted by the app: a withdrawn waiver keeps
who withdrew it and when, a renewed one keeps the time it was superseded and the new
waiver points back at it (`renews`). Only one waiver per finding is in force at a time.

Waivers from before facts were recorded have an empty `facts_hash`: they never cover a
finding and are shown as needing renewal (migration 0003 explains why).
"""

from __future__ import annotations

from django.conf import settings
from django.db import models
from django.db.models import Q

IN_FORCE = Q(withdrawn_at__isnull=True, superseded_at__isnull=True)


class WaiverQuerySet(models.QuerySet):
    def active(self) -> WaiverQuerySet:
        """Waivers in force: neither withdrawn nor replaced by a renewal."""
        return self.filter(IN_FORCE)


class Waiver(models.Model):
    """A lead's written acceptance of one finding, on the facts it was granted on."""

    job = models.ForeignKey("shop.Job", on_delete=models.CASCADE, related_name="waivers")
    code = models.CharField(max_length=60)
    subject = models.CharField(max_length=120, help_text="What the finding is about.")
    reason = models.TextField()
    lead = models.ForeignKey(settings.AUTH_USER_MODEL, on_delete=models.PROTECT, related_name="+")
    created_at = models.DateTimeField(auto_now_add=True)
    # What was accepted: the finding's words (shown, never compared) and the facts it rested
    # on (compared through their hash; circuits.waiver_facts.finding_facts).
    message = models.TextField(blank=True, help_text="The finding's words when it was waived.")
    facts = models.JSONField(default=dict, blank=True)
    facts_hash = models.CharField(
        max_length=64, blank=True, help_text="SHA-256 of the facts; empty: none recorded."
    )
    renews = models.OneToOneField(
        "self",
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="renewal",
        help_text="The lapsed waiver this one replaced.",
    )
    superseded_at = models.DateTimeField(null=True, blank=True)
    withdrawn_at = models.DateTimeField(null=True, blank=True)
    withdrawn_by = models.ForeignKey(
        settings.AUTH_USER_MODEL,
        on_delete=models.PROTECT,
        null=True,
        blank=True,
        related_name="+",
    )
    withdrawal_reason = models.TextField(blank=True)

    objects = WaiverQuerySet.as_manager()

    class Meta:
        # Oldest first: a finding's history reads in order, and where waivers are put in a
        # dict by (code, subject) the newest (the one in force, if any) wins.
        ordering = ["created_at", "pk"]
        constraints = [
            models.UniqueConstraint(
                fields=["job", "code", "subject"],
                condition=IN_FORCE,
                name="waiver_one_in_force_per_finding",
                violation_error_message="This finding is already waived.",
            ),
            models.CheckConstraint(
                condition=Q(withdrawn_at__isnull=True, withdrawn_by__isnull=True)
                | Q(withdrawn_at__isnull=False, withdrawn_by__isnull=False),
                name="waiver_withdrawn_by_whom_and_when",
            ),
        ]

    def __str__(self) -> str:
        return f"{self.code} on {self.subject}"

    @property
    def is_active(self) -> bool:
        return self.withdrawn_at is None and self.superseded_at is None

    @property
    def has_facts(self) -> bool:
        return bool(self.facts_hash)

    def covers(self, facts_hash: str) -> bool:
        """In force and granted on exactly these facts."""
        return self.is_active and self.has_facts and self.facts_hash == facts_hash
