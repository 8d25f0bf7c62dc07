"""Staff accounts. For the office, in the app rather than the admin: the staff list, add a
staff member with one role, change the role, deactivate or reactivate, and send a
password-set link. Who may do what is checked by shop.services (which these views call);
the views only read the forms and show the outcome.

For everyone: change your own password, and set it from the office's link (Django's
PasswordChangeView and PasswordResetConfirmView on our templates)."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth import get_user_model
from django.contrib.auth import views as auth_views
from django.contrib.auth.decorators import login_required
from django.contrib.auth.models import Group
from django.core.exceptions import ValidationError
from django.db.models import Prefetch
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.views.decorators.http import require_GET, require_http_methods, require_POST

from shop import roles
from shop.security import security_log
from shop.services import (
    MANAGE_STAFF_PERM,
    staff_change_role,
    staff_create,
    staff_send_password_link,
    staff_set_active,
)
from shop.staff_forms import StaffCreateForm, StaffRoleForm
from shop.views.access import require_perm
from shop.views.errors import bad_request_page


def _members():
    role_groups = Group.objects.filter(name__in=roles.ROLES)
    return (
        get_user_model()
        .objects.prefetch_related(Prefetch("groups", queryset=role_groups, to_attr="role_groups"))
        .order_by("-is_active", "first_name", "last_name", "username")
    )


def _role_of(member) -> str:
    names = {g.name for g in getattr(member, "role_groups", member.groups.all())}
    found = [role for role in roles.ROLES if role in names]
    return ", ".join(found)


def _role_label(member) -> str:
    role = _role_of(member)
    if member.is_superuser:
        return f"Administrator · {role}" if role else "Administrator"
    return role or "No role"


def _may_manage(actor, member) -> bool:
    """Whether the page offers changes for `member` (the services decide again on POST)."""
    return not member.is_superuser or actor.is_superuser


def _add_errors(form, exc: ValidationError) -> None:
    if hasattr(exc, "error_dict"):
        for field, errors in exc.message_dict.items():
            form.add_error(field if field in form.fields else None, errors)
    else:
        form.add_error(None, exc.messages)


def _name(member) -> str:
    return member.get_full_name() or member.username


@login_required
@require_GET
def staff_list(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    members = [(m, _role_label(m)) for m in _members()]
    return render(request, "shop/staff_list.html", {"members": members})


@login_required
@require_http_methods(["GET", "POST"])
def staff_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    form = StaffCreateForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        data = form.cleaned_data
        try:
            member = staff_create(
                actor=request.user,
                username=data["username"],
                email=data["email"],
                role=data["role"],
                first_name=data["first_name"],
                last_name=data["last_name"],
            )
        except ValidationError as exc:
            _add_errors(form, exc)
        else:
            messages.success(request, f"{_name(member)} added as {data['role']}.")
            if data["send_link"]:
                try:
                    _send_link(request, member)
                except ValidationError as exc:
                    messages.error(request, " ".join(exc.messages))
                else:
                    messages.success(request, f"A password-set link was sent to {member.email}.")
            return redirect("staff_detail", pk=member.pk)
    return render(request, "shop/staff_new.html", {"form": form})


def _detail(request, member, *, role_form=None, error: str = "", status: int = 200):
    context = {
        "member": member,
        "role": _role_label(member),
        "role_form": role_form or StaffRoleForm(initial={"role": _role_of(member) or None}),
        "may_manage": _may_manage(request.user, member),
        "is_self": member.pk == request.user.pk,
        "error": error,
    }
    return render(request, "shop/staff_detail.html", context, status=status)


def _member(pk: int):
    return get_object_or_404(get_user_model(), pk=pk)


@login_required
@require_GET
def staff_detail(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    return _detail(request, _member(pk))


@login_required
@require_POST
def staff_role(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    member = _member(pk)
    form = StaffRoleForm(request.POST)
    if form.is_valid():
        try:
            member = staff_change_role(
                actor=request.user, member=member, role=form.cleaned_data["role"]
            )
        except ValidationError as exc:
            _add_errors(form, exc)
        else:
            messages.success(request, f"{_name(member)} is now {form.cleaned_data['role']}.")
            return redirect("staff_detail", pk=member.pk)
    return _detail(request, member, role_form=form)


@login_required
@require_POST
def staff_active(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    member = _member(pk)
    wanted = request.POST.get("active")
    if wanted not in ("0", "1"):
        # The page posts 0 or 1; anything else was not sent by it.
        return bad_request_page(request, "The form did not say whether to deactivate or not.")
    try:
        member = staff_set_active(actor=request.user, member=member, active=wanted == "1")
    except ValidationError as exc:
        return _detail(request, member, error=" ".join(exc.messages))
    state = "reactivated" if member.is_active else "deactivated; they can no longer sign in"
    messages.success(request, f"{_name(member)} {state}.")
    return redirect("staff_detail", pk=member.pk)


def _send_link(request: HttpRequest, member) -> None:
    staff_send_password_link(
        actor=request.user, member=member, domain=request.get_host(), use_https=request.is_secure()
    )


@login_required
@require_POST
def staff_password_link(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, MANAGE_STAFF_PERM)
    member = _member(pk)
    try:
        _send_link(request, member)
    except ValidationError as exc:
        return _detail(request, member, error=" ".join(exc.messages))
    messages.success(request, f"A password-set link was sent to {member.email}.")
    return redirect("staff_detail", pk=member.pk)


# ---- own account ----


class _PasswordChange(auth_views.PasswordChangeView):
    def form_valid(self, form):
        response = super().form_valid(form)
        security_log("password_changed", request=self.request)
        return response


class _PasswordSet(auth_views.PasswordResetConfirmView):
    def form_valid(self, form):
        response = super().form_valid(form)
        security_log("password_set", request=self.request, member=form.user.get_username())
        return response


# PasswordChangeView is login_required itself; the templates are ours (registration/).
password_change = _PasswordChange.as_view()
password_change_done = auth_views.PasswordChangeDoneView.as_view()
password_set = _PasswordSet.as_view()
password_set_done = auth_views.PasswordResetCompleteView.as_view()
