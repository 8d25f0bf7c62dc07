"""What every inspections write shares: the permission check, reading plain values
(numbers, times, keys) into errors listed in plain words, and the audit event."""

from __future__ import annotations

import datetime
import math
import re
from decimal import Decimal, InvalidOperation

from django import forms
from django.core.exceptions import PermissionDenied, ValidationError
from django.db import connection, models
from django.utils import timezone

from inspections.models import AuditEvent, Stage

# A page's clock may run a little ahead of the server's; a time further ahead than this
# is refused as "in the future".
CLOCK_SKEW = datetime.timedelta(minutes=5)

# The page makes the key (a UUID, typically); anything else is refused, not trimmed.
CLIENT_KEY = re.compile(r"^[A-Za-z0-9._:-]{1,64}$")

Errors = dict[str, list[str]]

MAX_PHOTO_BYTES = 10 * 1024 * 1024


def require_perm(user, perm: str, message: str) -> None:
    """PermissionDenied (403 at the page) unless an active, signed-in user holds `perm`."""
    if (
        user is None
        or not getattr(user, "is_authenticated", False)
        or not user.is_active
        or not user.has_perm(perm)
    ):
        raise PermissionDenied(message)


def add_error(errors: Errors, field: str, message: str | ValidationError) -> None:
    messages = message.messages if isinstance(message, ValidationError) else [message]
    errors.setdefault(field, []).extend(messages)


def raise_if(errors: Errors) -> None:
    """One ValidationError naming every unmet condition, keyed by the field it is about."""
    if errors:
        raise ValidationError(errors)


def parse_decimal(
    value: object, *, field: str, what: str, places: int, errors: Errors
) -> Decimal | None:
    """A finite decimal with at most `places` decimal places, from a Decimal, int, float
    or text; None (and an error in `errors`) for anything else. Text takes a decimal
    point only: "1,250" could be one and a quarter or twelve hundred and fifty."""
    number: Decimal | None = None
    if value is None or (isinstance(value, str) and not value.strip()):
        add_error(errors, field, f"Enter the {what}.")
        return None
    if isinstance(value, bool):
        pass
    elif isinstance(value, Decimal):
        number = value
    elif isinstance(value, int):
        number = Decimal(value)
    elif isinstance(value, float):
        number = Decimal(repr(value)) if math.isfinite(value) else Decimal("NaN")
    elif isinstance(value, str):
        text = value.strip()
        if "," in text:
            add_error(errors, field, f"Write the {what} with a decimal point, e.g. 12.5.")
            return None
        try:
            number = Decimal(text)
        except InvalidOperation:
            number = None
    if number is None:
        add_error(errors, field, f"The {what} must be a number, e.g. 12.5.")
        return None
    if not number.is_finite():
        add_error(errors, field, f"The {what} must be a number, e.g. 12.5 (got {value}).")
        return None
    quantum = Decimal(1).scaleb(-places)
    try:
        rounded = number.quantize(quantum)
    except InvalidOperation:  # more digits than a Decimal context holds: absurd
        add_error(errors, field, f"The {what} {value} is far too large.")
        return None
    if rounded != number:
        add_error(errors, field, f"Give the {what} with at most {places} decimal places.")
        return None
    # "12.5000" is the reading 12.5 written with spare zeros; store it in the field's places.
    return rounded if number.as_tuple().exponent < -places else number


def parse_moment(
    value: object, *, field: str, what: str, errors: Errors
) -> datetime.datetime | None:
    """An aware datetime; a naive one is read in the shop's time zone."""
    if not isinstance(value, datetime.datetime):
        add_error(errors, field, f"Give the {what} as a date and time.")
        return None
    if timezone.is_naive(value):
        value = timezone.make_aware(value)
    return value


def not_in_future(moment: datetime.datetime, *, field: str, what: str, errors: Errors) -> None:
    if moment > timezone.now() + CLOCK_SKEW:
        add_error(errors, field, f"The {what} ({moment:%d %b %Y %H:%M}) is in the future.")


def clean_client_key(client_key: object) -> str:
    key = str(client_key or "").strip()
    if not CLIENT_KEY.match(key):
        raise ValidationError(
            {"client_key": "This entry has no valid key from the page; reload it and enter again."}
        )
    return key


def clean_text(value: object, *, field: str, what: str, limit: int, errors: Errors) -> str:
    text = str(value or "").strip()
    if len(text) > limit:
        add_error(errors, field, f"Keep the {what} under {limit} characters (it has {len(text)}).")
    elif "\x00" in text:
        # PostgreSQL refuses NUL in text; say so beside the field instead of failing the write.
        add_error(errors, field, f"The {what} holds a NUL character; type it again.")
    return text


def audit(
    *,
    job,
    kind: str,
    actor,
    summary: str,
    before: dict | None = None,
    after: dict | None = None,
    subject: models.Model | None = None,
    at: datetime.datetime | None = None,
) -> AuditEvent:
    """Record one change of state; call inside the transaction that makes the change.
    `at` (default now) only for history the demo loads in the past."""
    return AuditEvent.objects.create(
        at=at or timezone.now(),
        job=job,
        kind=kind,
        actor=actor,
        summary=summary[:300],
        before=before,
        after=after,
        subject_type=subject._meta.label_lower if subject is not None else "",
        subject_id=str(subject.pk) if subject is not None else "",
    )


def plural(count: int, word: str) -> str:
    return f"{count} {word}{'' if count == 1 else 's'}"


def check_photo(photo, errors: Errors):
    """The uploaded photo, checked to be an image of at most 10 MB; None when none was
    given or it was refused (with the reason in `errors`)."""
    if not photo:
        return None
    if getattr(photo, "size", 0) > MAX_PHOTO_BYTES:
        add_error(errors, "photo", "The photo is larger than 10 MB; take it again at a lower size.")
        return None
    try:
        # The form field's check: Pillow opens and verifies the file as an image.
        return forms.ImageField().clean(photo)
    except ValidationError as exc:
        add_error(errors, "photo", exc)
        return None


def locked_stage(pk: int) -> Stage:
    """The stage as stored now, its row locked on PostgreSQL until the transaction ends, so
    a reading and a signature of the same stage cannot interleave (SQLite's IMMEDIATE
    transactions already run one writer at a time). Only the stage row: not the job's."""
    return Stage.objects.select_for_update(of=("self",)).select_related("job").get(pk=pk)


def shared_stage(pk: int) -> Stage:
    """The stage as stored now, for work recorded ON it (a reading, a checklist mark): on
    PostgreSQL its row is held in share mode until the transaction ends, so any number of
    tablets record at once while a signature, send-back or approval (which lock the row
    exclusively, `locked_stage(s)`) waits for them, and they for it. SQLite's IMMEDIATE
    transactions run one writer at a time anyway."""
    if connection.vendor == "postgresql":
        with connection.cursor() as cursor:
            cursor.execute(f"SELECT 1 FROM {Stage._meta.db_table} WHERE id = %s FOR SHARE", [pk])
    return Stage.objects.select_related("job").get(pk=pk)


def locked_stages(job_id: int) -> dict[int, Stage]:
    """All the job's stages by kind, their rows locked on PostgreSQL in kind order (the
    same order everywhere, so two signers cannot deadlock): a sign-off, approval or
    reopen sees and moves the stages as one."""
    stages = (
        Stage.objects.select_for_update(of=("self",))
        .select_related("job")
        .filter(job_id=job_id)
        .order_by("kind")
    )
    return {stage.kind: stage for stage in stages}


def stage_name(stage_or_kind) -> str:
    """'first install', 'heat-cycle run', 'retorque', 'handover'."""
    kind = getattr(stage_or_kind, "kind", stage_or_kind)
    return Stage.Kind(kind).label.lower()


def person(user) -> str:
    return (user.get_full_name() or user.get_username()) if user is not None else "the system"
