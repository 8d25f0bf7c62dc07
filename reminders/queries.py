"""Which vehicles are due for their re-check, and when.

Computed, not stored: the due date follows from facts that are already stored and
append-only (the approval sign-off, the torque records), so a stored copy could only
drift from them. What must be stored is what was *done* about it, the reminder log
(reminders.models.ReminderSent), keyed by job and due date; a due date that moves is a
new key, and so a new reminder.

The rule, per vehicle:

* its due job is the approved job (status approved or handed over: the handover stage is
  signed, so the latest approval sign-off is in force) whose latest approval is the
  newest; a reopened job is not approved and so bears no due date until approved again;
* due on: the approval's local date + ShopProfile.recheck_months, or
  + recheck_months_after_loose when any connection of the job was found loose at its
  retorque (or at a return visit's re-check: found loose again is the most telling fact);
  current readings only, a superseded reading does not count (reminders.dates.add_months
  clamps 31 January + 1 month to the end of February);
* not due at all once a return visit of the same vehicle that follows that job
  (Job.follows) has signed its re-check stage: the vehicle has been re-checked, and its
  next due date comes from the return visit's own approval.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.db.models import Count, OuterRef, Subquery
from django.db.models.functions import Coalesce
from django.utils import timezone

from inspections.models import SignOff, Stage, TorqueRecord
from reminders.dates import add_months, due_words, long_date
from reminders.models import ReminderSent
from shop.models import Job, ShopProfile, Vehicle

APPROVED = (Job.Status.APPROVED, Job.Status.HANDED_OVER)
LOOSE_STAGES = (Stage.Kind.RETORQUE, Stage.Kind.RECHECK)
DEFAULT_WINDOW_DAYS = 30


@dataclass(frozen=True)
class Recheck:
    """One vehicle's next re-check."""

    job: Job  # the approved job the due date counts from (vehicle and owner selected)
    approved_at: datetime.datetime
    months: int
    usual_months: int  # the shop's interval without found-loose connections
    found_loose: int  # connections found loose at its retorque (or re-check)
    due_on: datetime.date
    reminded: ReminderSent | None  # the reminder for this very due date, if sent
    in_shop: Job | None  # a later job on the vehicle, not approved yet

    @property
    def vehicle(self) -> Vehicle:
        return self.job.vehicle

    @property
    def approved_on(self) -> datetime.date:
        return timezone.localdate(self.approved_at)

    @property
    def sooner(self) -> bool:
        return self.found_loose > 0

    def days_left(self, today: datetime.date) -> int:
        return (self.due_on - today).days

    def words(self, today: datetime.date) -> str:
        return due_words(self.due_on, today)

    @property
    def is_overdue(self) -> bool:
        return self.due_on < timezone.localdate()

    @property
    def due_long(self) -> str:
        return long_date(self.due_on)

    @property
    def why(self) -> str:
        """The reason for the interval, in words an owner reads."""
        if self.sooner:
            count = self.found_loose
            noun = "connection was" if count == 1 else "connections were"
            return (
                f"{count} {noun} found loose at the retorque after the heat-cycle run,"
                f" so the shop asks to see it after {self.months} months rather than the"
                f" usual {self.usual_months}."
            )
        return f"The shop re-checks every system {self.months} months after its approval."


def _approved_jobs():
    approval = (
        SignOff.objects.filter(job=OuterRef("pk"), kind=SignOff.Kind.APPROVAL)
        .order_by("-signed_at", "-pk")
        .values("signed_at")[:1]
    )
    loose = (
        TorqueRecord.objects.current()
        .filter(stage__job=OuterRef("pk"), stage__kind__in=LOOSE_STAGES, found_loose=True)
        .order_by()
        .values("stage__job")
        .annotate(n=Count("termination", distinct=True))
        .values("n")
    )
    return (
        Job.objects.filter(status__in=APPROVED)
        .annotate(approved_at=Subquery(approval), loose=Coalesce(Subquery(loose), 0))
        .filter(approved_at__isnull=False)
        .select_related("vehicle__owner")
    )


def _rechecked(latest: dict[int, Job]) -> set[int]:
    """Ids of the jobs a return visit of the same vehicle has re-checked (its re-check
    stage signed)."""
    visits = Job.objects.filter(
        kind=Job.Kind.RETURN_VISIT,
        follows_id__in=[job.pk for job in latest.values()],
        stages__kind=Stage.Kind.RECHECK,
        stages__state=Stage.State.SIGNED,
    ).values_list("follows_id", "vehicle_id")
    return {
        follows
        for follows, vehicle in visits
        if vehicle in latest and latest[vehicle].pk == follows
    }


def _in_shop(latest: dict[int, Job]) -> dict[int, Job]:
    """vehicle id -> its newest job created after the due job and not approved yet (the
    vehicle is back in the shop: the office need not chase the owner)."""
    found: dict[int, Job] = {}
    later = (
        Job.objects.filter(vehicle_id__in=list(latest))
        .exclude(status__in=APPROVED)
        .order_by("created_at", "pk")
    )
    for job in later:
        due_job = latest[job.vehicle_id]
        if job.created_at > due_job.created_at:
            found[job.vehicle_id] = job
    return found


def rechecks(
    *, profile: ShopProfile | None = None, vehicle: Vehicle | None = None
) -> list[Recheck]:
    """Every vehicle's next re-check (see the module docstring), soonest first; only
    `vehicle`'s when given."""
    profile = profile or ShopProfile.load()
    jobs = _approved_jobs()
    if vehicle is not None:
        jobs = jobs.filter(vehicle=vehicle)
    latest: dict[int, Job] = {}
    for job in jobs:
        held = latest.get(job.vehicle_id)
        if held is None or (job.approved_at, job.pk) > (held.approved_at, held.pk):
            latest[job.vehicle_id] = job
    if not latest:
        return []
    ids = [job.pk for job in latest.values()]
    rechecked = _rechecked(latest)
    sent = {
        (row.job_id, row.due_on): row
        for row in ReminderSent.objects.filter(job_id__in=ids).order_by("sent_at", "pk")
    }
    in_shop = _in_shop(latest)
    out = []
    for job in latest.values():
        if job.pk in rechecked:
            continue
        months = profile.recheck_months_after_loose if job.loose else profile.recheck_months
        due_on = add_months(timezone.localdate(job.approved_at), months)
        out.append(
            Recheck(
                job=job,
                approved_at=job.approved_at,
                months=months,
                usual_months=profile.recheck_months,
                found_loose=job.loose,
                due_on=due_on,
                reminded=sent.get((job.pk, due_on)),
                in_shop=in_shop.get(job.vehicle_id),
            )
        )
    out.sort(key=lambda r: (r.due_on, r.job.number))
    return out


def due_within(
    entries: list[Recheck], *, days: int, today: datetime.date | None = None
) -> list[Recheck]:
    """The entries due within `days` days of `today`, or overdue."""
    today = today or timezone.localdate()
    return [entry for entry in entries if entry.days_left(today) <= days]


def recheck_for_vehicle(vehicle: Vehicle, *, profile: ShopProfile | None = None):
    """The vehicle's next re-check, or None (never approved, or re-checked since)."""
    found = rechecks(profile=profile, vehicle=vehicle)
    return found[0] if found else None
