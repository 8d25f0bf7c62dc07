"""Writes that touch several records: creating and updating jobs; staff accounts."""

from __future__ import annotations

import smtplib
import warnings
from collections.abc import Iterable

from django.contrib.auth import get_user_model
from django.contrib.auth.forms import PasswordResetForm
from django.contrib.auth.models import Group
from django.core.exceptions import PermissionDenied, ValidationError
from django.core.validators import validate_email
from django.db import transaction
from django.utils import timezone

from inspections.services import job_is_locked, lock_message, stages_ensure
from shop import roles
from shop.models import Job, JobSequence, ShopProfile
from shop.security import security_log


def job_number_next(*, prefix: str, year: int) -> str:
    """Hand out the next number for (prefix, year). Call inside a transaction.

    The counter row only moves forward, so a deleted job's number is never issued again.
    """
    seq, _ = JobSequence.objects.select_for_update().get_or_create(prefix=prefix, year=year)
    seq.last += 1
    seq.save(update_fields=["last"])
    return f"{prefix}-{year}-{seq.last:04d}"


# Set by the stages alone (inspections.services.job_status_sync), never by hand.
STAGE_DRIVEN_FIELDS = frozenset({"status", "handed_over_on"})


def _refuse_stage_driven(fields: dict) -> None:
    hand_set = sorted(STAGE_DRIVEN_FIELDS & fields.keys())
    if hand_set:
        raise TypeError(
            f"{', '.join(hand_set)} follow the job's stages (inspections.services."
            "job_status_sync) and are never set by hand"
        )


def job_create(*, technicians: Iterable = (), **fields) -> Job:
    """Create a job with a fresh number and its four stages (first install open, so the
    status is "First install"). `fields` are Job model fields (vehicle, title, ...).

    The status is the stages' to set: one passed in is dropped with a warning (the stages
    would overwrite it in this same transaction anyway)."""
    hand_set = sorted(STAGE_DRIVEN_FIELDS & fields.keys())
    if hand_set:
        warnings.warn(
            f"job_create ignores {', '.join(hand_set)}: set by the job's stages",
            stacklevel=2,
        )
        for name in hand_set:
            fields.pop(name)
    with transaction.atomic():
        job = Job(**fields)
        job.full_clean(exclude=["number"])
        prefix = ShopProfile.load().job_prefix
        job.number = job_number_next(prefix=prefix, year=timezone.localdate().year)
        job.save()
        job.technicians.set(technicians)
        stages_ensure(job=job)
    return job


def job_update(*, job: Job, technicians: Iterable | None = None, **fields) -> Job:
    """Change a job's booking facts (title, people, dates). Refused while the job is
    approved (locked): what was approved and handed over stays as it was."""
    _refuse_stage_driven(fields)
    with transaction.atomic():
        if job_is_locked(job):
            raise ValidationError(lock_message(job))
        for name, value in fields.items():
            setattr(job, name, value)
        job.full_clean()
        # Only the edited fields: the status is written by the stages, possibly at this
        # very moment on another tablet, and a stale copy must not overwrite it.
        job.save(update_fields=[*fields.keys(), "updated_at"])
        if technicians is not None:
            job.technicians.set(technicians)
    return job


# ---- staff accounts ----
#
# Office users (shop.manage_staff) add staff, give each one role, deactivate and reactivate
# them and send them a password-set link; nothing more. These functions never set
# is_superuser, never take a password, and set is_staff only from the role: Office users
# reach the Django admin to read records and edit the shop profile (the admin pages of
# everything else are read-only for them, and the user and group pages are a superuser's
# alone); technicians and leads have nothing to do there.

MANAGE_STAFF_PERM = "shop.manage_staff"


def _require_manager(actor, member=None) -> None:
    if not actor.has_perm(MANAGE_STAFF_PERM):
        raise PermissionDenied("Only the office manages staff accounts.")
    if member is not None and member.is_superuser and not actor.is_superuser:
        raise PermissionDenied("Only a superuser can change a superuser's account.")


def _clean_role(role: str) -> str:
    if role not in roles.ROLES:
        raise ValidationError({"role": f"Choose one role: {', '.join(roles.ROLES)}."})
    return role


def _set_role(member, role: str) -> None:
    """Give `member` exactly one role group (other, non-role groups are left alone) and the
    admin access that goes with it."""
    member.groups.remove(*Group.objects.filter(name__in=roles.ROLES))
    member.groups.add(Group.objects.get(name=role))
    # A superuser's admin access is the superuser's own business (done in the admin).
    member.is_staff = member.is_superuser or role == roles.OFFICE
    member.save(update_fields=["is_staff"])


def staff_create(
    *, actor, username: str, email: str, role: str, first_name: str = "", last_name: str = ""
):
    """Add a staff member with one role and no usable password: they choose one through
    the password-set link (staff_send_password_link)."""
    _require_manager(actor)
    User = get_user_model()
    username = (username or "").strip()
    email = (email or "").strip()
    errors: dict[str, str] = {}
    try:
        _clean_role(role)
    except ValidationError as exc:
        errors.update({k: v[0] for k, v in exc.message_dict.items()})
    try:
        validate_email(email)
    except ValidationError:
        errors["email"] = "Enter the e-mail address the password-set link goes to."
    if User.objects.filter(username__iexact=username).exists():
        errors["username"] = f"There is already a staff member called {username}."
    if errors:
        raise ValidationError(errors)
    with transaction.atomic():
        member = User(
            username=username,
            email=email,
            first_name=(first_name or "").strip(),
            last_name=(last_name or "").strip(),
            is_active=True,
            is_staff=False,
            is_superuser=False,
        )
        member.set_unusable_password()
        member.full_clean(exclude=["password", "last_login", "date_joined"])
        member.save()
        _set_role(member, role)
    security_log("staff_create", user=actor, member=member.username, role=role)
    return member


def staff_change_role(*, actor, member, role: str):
    """Give a staff member another role (exactly one)."""
    _require_manager(actor, member)
    _clean_role(role)
    if member.pk == actor.pk:
        raise ValidationError({"role": "You cannot change your own role; ask another office user."})
    User = get_user_model()
    with transaction.atomic():
        member = User.objects.select_for_update().get(pk=member.pk)
        before = roles.role_names(member)
        _set_role(member, role)
    security_log(
        "staff_role", user=actor, member=member.username, role=role, before=",".join(before)
    )
    return member


def staff_set_active(*, actor, member, active: bool):
    """Deactivate a staff member (they can no longer sign in; their records keep their
    name) or reactivate them. Never yourself, never a superuser unless you are one."""
    _require_manager(actor, member)
    if member.pk == actor.pk and not active:
        raise ValidationError("You cannot deactivate your own account; ask another office user.")
    User = get_user_model()
    with transaction.atomic():
        member = User.objects.select_for_update().get(pk=member.pk)
        member.is_active = bool(active)
        member.save(update_fields=["is_active"])
    security_log(
        "staff_activate" if active else "staff_deactivate", user=actor, member=member.username
    )
    return member


class _PasswordLinkForm(PasswordResetForm):
    """Django's password-reset e-mail, sent to one chosen member rather than to everyone
    who has the address (and also to a new member who has no usable password yet)."""

    def __init__(self, member) -> None:
        super().__init__(data={"email": member.email})
        self.member = member

    def get_users(self, email):
        yield self.member


def staff_send_password_link(*, actor, member, domain: str, use_https: bool) -> None:
    """E-mail the member a link to set their own password (Django's password-reset token:
    it works once and lapses after PASSWORD_RESET_TIMEOUT). Nobody else sees the password."""
    _require_manager(actor, member)
    if not member.is_active:
        raise ValidationError("Reactivate this staff member before sending a password link.")
    if not member.email:
        raise ValidationError("This staff member has no e-mail address to send the link to.")
    form = _PasswordLinkForm(member)
    if not form.is_valid():
        raise ValidationError("This staff member's e-mail address is not valid.")
    try:
        form.save(
            domain_override=domain,
            use_https=use_https,
            subject_template_name="registration/password_set_subject.txt",
            email_template_name="registration/password_set_email.html",
            extra_email_context={"shop_name": ShopProfile.load().name, "member": member},
        )
    except (OSError, smtplib.SMTPException) as exc:
        # A mail server that is down or refuses: say so instead of a server error.
        raise ValidationError(
            f"The link could not be sent ({exc.__class__.__name__}); check the mail server "
            "settings and send it again."
        ) from exc
    security_log("staff_password_link", user=actor, member=member.username)
