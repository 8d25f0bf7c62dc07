"""Owners and vehicles: list, page, create and edit."""

from __future__ import annotations

from urllib.parse import urlencode

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.paginator import Paginator
from django.db.models import Count, Q
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.views.decorators.http import require_GET, require_http_methods

from shop.forms import OwnerForm, VehicleForm
from shop.models import Owner, Vehicle
from shop.views.access import require_perm

MAX_SEARCH = 100


@login_required
@require_GET
def owner_list(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "shop.view_owner")
    # A bounded search term: longer text cannot match a name, e-mail or phone anyway.
    text = request.GET.get("q", "").strip()[:MAX_SEARCH]
    owners = Owner.objects.annotate(vehicle_count=Count("vehicles")).order_by("name", "pk")
    if text:
        owners = owners.filter(
            Q(name__icontains=text) | Q(email__icontains=text) | Q(phone__icontains=text)
        )
    page = Paginator(owners, 25).get_page(request.GET.get("page"))
    context = {"page": page, "q": text, "query": urlencode({"q": text}) if text else ""}
    template = "shop/owner_list.html#results" if request.htmx else "shop/owner_list.html"
    return render(request, template, context)


@login_required
@require_GET
def owner_detail(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, "shop.view_owner")
    owner = get_object_or_404(Owner, pk=pk)
    vehicles = owner.vehicles.prefetch_related("jobs")
    return render(request, "shop/owner_detail.html", {"owner": owner, "vehicles": vehicles})


def _save_form(request: HttpRequest, form, *, title: str, cancel_url: str) -> HttpResponse:
    if request.method == "POST" and form.is_valid():
        record = form.save()
        messages.success(request, f"{record} saved.")
        return redirect(record)
    return render(
        request, "shop/form.html", {"form": form, "title": title, "cancel_url": cancel_url}
    )


@login_required
@require_http_methods(["GET", "POST"])
def owner_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "shop.add_owner")
    form = OwnerForm(request.POST or None)
    return _save_form(request, form, title="New owner", cancel_url="/owners/")


@login_required
@require_http_methods(["GET", "POST"])
def owner_edit(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, "shop.change_owner")
    owner = get_object_or_404(Owner, pk=pk)
    form = OwnerForm(request.POST or None, instance=owner)
    return _save_form(
        request, form, title=f"Edit owner {owner}", cancel_url=owner.get_absolute_url()
    )


@login_required
@require_GET
def vehicle_detail(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, "shop.view_vehicle")
    vehicle = get_object_or_404(Vehicle.objects.select_related("owner"), pk=pk)
    return render(
        request, "shop/vehicle_detail.html", {"vehicle": vehicle, "jobs": vehicle.jobs.all()}
    )


@login_required
@require_http_methods(["GET", "POST"])
def vehicle_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "shop.add_vehicle")
    owner_id = request.GET.get("owner")
    form = VehicleForm(request.POST or None, initial={"owner": owner_id} if owner_id else None)
    return _save_form(request, form, title="New vehicle", cancel_url="/owners/")


@login_required
@require_http_methods(["GET", "POST"])
def vehicle_edit(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, "shop.change_vehicle")
    vehicle = get_object_or_404(Vehicle, pk=pk)
    form = VehicleForm(request.POST or None, instance=vehicle)
    return _save_form(
        request, form, title=f"Edit vehicle {vehicle}", cancel_url=vehicle.get_absolute_url()
    )
