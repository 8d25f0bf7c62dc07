"""The owner's private link to the wiring record.

Office pages (OWNER_LINKS_PERM, any job): list a job's links with their visits, make one
(the address is shown once, as only its hash is stored), e-mail it, revoke it.

The owner's page, no sign-in, read-only, GET only: the vehicle, the record's revisions
with their PDFs, and the receipt sign-off if given. It reaches nothing else: the token
is looked up by its hash and every query below is bound to that link's job, so a token
never reaches another job's files. Expired or revoked: a page in words (410). Every
opening is logged (time, client address as ClientAddressMiddleware left it in
REMOTE_ADDR, user agent). The pages say no-store and no-referrer, so the address with
the token stays out of caches and out of other sites' logs."""

from __future__ import annotations

import datetime
import ipaddress

from django import forms
from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import Http404, HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path, reverse
from django.utils import timezone
from django.views.decorators.http import require_GET, require_http_methods, require_POST

from inspections.services.status import receipt_in_force
from reminders.queries import recheck_for_vehicle
from shop.models import ShopProfile
from shop.views.access import _get_job_for_user
from wiring.models import OwnerLink, OwnerLinkVisit, RecordRevision
from wiring.services import (
    DEFAULT_LINK_DAYS,
    OWNER_LINKS_PERM,
    owner_link_create,
    owner_link_for_token,
    owner_link_matches,
    owner_link_revoke,
    owner_link_send,
    owner_link_url,
    owner_link_visit,
)
from wiring.views.revisions import serve_revision


class OwnerLinkForm(forms.Form):
    expires_on = forms.DateField(
        label="Works until",
        widget=forms.DateInput(attrs={"type": "date"}),
        help_text="The last day the link opens; at most ten years ahead.",
        error_messages={
            "required": "Give the last day the link works.",
            "invalid": "Enter a date.",
        },
    )
    note = forms.CharField(
        label="Note", required=False, max_length=120, help_text="Who it is for (only you see it)."
    )
    send_to = forms.EmailField(
        label="E-mail it to",
        required=False,
        max_length=254,
        help_text="Leave empty to copy the link yourself.",
    )


class SendForm(forms.Form):
    token = forms.CharField(max_length=100, widget=forms.HiddenInput)
    to = forms.EmailField(label="E-mail it to", max_length=254)


def _base_url(request: HttpRequest) -> str:
    return request.build_absolute_uri("/").rstrip("/")


def _office_job(request: HttpRequest, number: str):
    return _get_job_for_user(request.user, number, perm=OWNER_LINKS_PERM, write=True)


def _links_page(request, job, *, form=None, created=None, send_form=None, status=200):
    links = list(OwnerLink.objects.filter(job=job).select_related("created_by", "revoked_by"))
    visits = (
        OwnerLinkVisit.objects.filter(link__job=job).select_related("link").order_by("-at")[:50]
    )
    context = {
        "job": job,
        "links": links,
        "visits": visits,
        "form": form
        or OwnerLinkForm(
            initial={
                "expires_on": timezone.localdate() + datetime.timedelta(days=DEFAULT_LINK_DAYS),
                "send_to": job.vehicle.owner.email,
            }
        ),
        "created": created,
        "send_form": send_form,
        "revisions": RecordRevision.objects.filter(job=job).count(),
    }
    return render(request, "wiring/owner_links.html", context, status=status)


@login_required
@require_http_methods(["GET", "POST"])
def owner_links(request: HttpRequest, number: str) -> HttpResponse:
    job = _office_job(request, number)
    if request.method == "GET":
        return _links_page(request, job)
    form = OwnerLinkForm(request.POST)
    if not form.is_valid():
        return _links_page(request, job, form=form)
    try:
        link, token = owner_link_create(
            job=job,
            by=request.user,
            expires_on=form.cleaned_data["expires_on"],
            note=form.cleaned_data["note"],
        )
    except ValidationError as error:
        _add_errors(form, error)
        return _links_page(request, job, form=form)
    created = {"link": link, "token": token, "url": owner_link_url(token, _base_url(request))}
    send_form = SendForm(initial={"token": token, "to": form.cleaned_data["send_to"]})
    if form.cleaned_data["send_to"]:
        send_form = SendForm({"token": token, "to": form.cleaned_data["send_to"]})
        if send_form.is_valid():
            created["sent"] = _send(request, link, send_form)
    return _links_page(request, job, created=created, send_form=send_form)


def _add_errors(form: forms.Form, error: ValidationError) -> None:
    for field, problems in error.message_dict.items():
        form.add_error(field if field in form.fields else None, problems)


def _send(request, link: OwnerLink, send_form: SendForm) -> bool:
    try:
        owner_link_send(
            link=link,
            token=send_form.cleaned_data["token"],
            to=send_form.cleaned_data["to"],
            by=request.user,
            base_url=_base_url(request),
        )
    except ValidationError as error:
        _add_errors(send_form, error)
        return False
    return True


@login_required
@require_POST
def owner_link_send_view(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job = _office_job(request, number)
    link = get_object_or_404(OwnerLink, pk=pk, job=job)
    send_form = SendForm(request.POST)
    if send_form.is_valid() and _send(request, link, send_form):
        messages.success(request, f"The link was e-mailed to {send_form.cleaned_data['to']}.")
        return redirect("owner_links", number=job.number)
    token = str(request.POST.get("token", ""))[:100]
    created = None  # shown again only to whoever sent back the link's own token
    if owner_link_matches(link, token):
        created = {"link": link, "token": token, "url": owner_link_url(token, _base_url(request))}
    elif "token" not in send_form.errors:
        send_form.add_error(None, "This link's address was shown once, when it was made.")
    return _links_page(request, job, created=created, send_form=send_form)


@login_required
@require_POST
def owner_link_revoke_view(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job = _office_job(request, number)
    link = get_object_or_404(OwnerLink.objects.select_related("job"), pk=pk, job=job)
    if request.POST.get("confirm") != "yes" or link.is_revoked:
        # A confirmation step: an empty or repeated post revokes nothing and asks.
        return render(request, "wiring/owner_revoke.html", {"job": job, "link": link})
    owner_link_revoke(link=link, by=request.user)
    messages.success(request, "The link is revoked: it no longer opens anything.")
    return redirect("owner_links", number=job.number)


# ---- the owner's pages ----


def _client(request: HttpRequest) -> tuple[str | None, str]:
    address = request.META.get("REMOTE_ADDR") or None
    try:
        ipaddress.ip_address(address or "")
    except ValueError:
        address = None
    return address, str(request.META.get("HTTP_USER_AGENT", ""))


def _private(response: HttpResponse) -> HttpResponse:
    response["Cache-Control"] = "private, no-store"
    response["Referrer-Policy"] = "no-referrer"
    response["X-Robots-Tag"] = "noindex, nofollow"
    return response


def _open_link(request: HttpRequest, token: str, *, revision: int | None = None):
    """(link, None) for a usable link, visit logged; (None, response) otherwise."""
    link = owner_link_for_token(token)
    shop = ShopProfile.load()
    if link is None:
        page = render(
            request, "wiring/owner_gone.html", {"shop": shop, "why": "unknown"}, status=404
        )
        return None, _private(page)
    address, agent = _client(request)
    why = "revoked" if link.is_revoked else "expired" if link.is_expired() else ""
    if why:
        owner_link_visit(link=link, address=address, user_agent=agent, outcome=why)
        context = {"shop": shop, "why": why, "link": link}
        return None, _private(render(request, "wiring/owner_gone.html", context, status=410))
    outcome = OwnerLinkVisit.Outcome.PDF if revision is not None else OwnerLinkVisit.Outcome.PAGE
    owner_link_visit(
        link=link, address=address, user_agent=agent, outcome=outcome, revision=revision
    )
    return link, None


@require_GET
def owner_record(request: HttpRequest, token: str) -> HttpResponse:
    link, refusal = _open_link(request, token)
    if refusal is not None:
        return refusal
    job = link.job
    context = {
        "shop": ShopProfile.load(),
        "job": job,
        "vehicle": job.vehicle,
        "link": link,
        "token": token,
        "revisions": list(RecordRevision.objects.filter(job=job).order_by("-number")),
        "receipt": receipt_in_force(job),
        "verify_url": reverse("record_verify"),
        # The vehicle's next re-check (reminders.queries), whichever job it counts from.
        "recheck": recheck_for_vehicle(job.vehicle),
    }
    return _private(render(request, "wiring/owner_record.html", context))


@require_GET
def owner_record_pdf(request: HttpRequest, token: str, revision: int) -> HttpResponse:
    if revision > 2_147_483_647:
        # Past any revision number the visit log can hold (a PositiveIntegerField).
        raise Http404("This record has no such revision.")
    link, refusal = _open_link(request, token, revision=revision)
    if refusal is not None:
        return refusal
    found = (
        RecordRevision.objects.filter(job_id=link.job_id, number=revision)
        .select_related("job")
        .first()
    )
    if found is None:
        raise Http404("This record has no such revision.")
    return _private(serve_revision(found))


urlpatterns = [
    path("jobs/<str:number>/owner-links/", owner_links, name="owner_links"),
    path(
        "jobs/<str:number>/owner-links/<int:pk>/revoke/",
        owner_link_revoke_view,
        name="owner_link_revoke",
    ),
    path(
        "jobs/<str:number>/owner-links/<int:pk>/send/",
        owner_link_send_view,
        name="owner_link_send",
    ),
    path("o/<str:token>/", owner_record, name="owner_record"),
    path("o/<str:token>/<int:revision>.pdf", owner_record_pdf, name="owner_record_pdf"),
]
