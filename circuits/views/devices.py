"""A job's devices: list, detail (terminals, circuits and the terminations landing on
it, with their torque specs), new and edit (with the terminals inline), delete."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.db.models import Count, Q
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path
from django.views.decorators.http import require_GET, require_http_methods

from circuits.forms import DeviceForm, TerminalFormSet
from circuits.models import Circuit, Device, Termination
from circuits.services import device_save
from circuits.views.access import _get_device_for_user, _get_job_for_user


def _circuits_of(device: Device):
    return Circuit.objects.filter(Q(from_device=device) | Q(to_device=device)).order_by("tag")


@login_required
@require_GET
def device_list(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.view_device")
    devices = job.devices.annotate(
        terminal_count=Count("terminals", distinct=True),
        circuit_count=Count("circuits_out", distinct=True) + Count("circuits_in", distinct=True),
    ).order_by("name")
    return render(request, "circuits/device_list.html", {"job": job, "devices": devices})


@login_required
@require_GET
def device_detail(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, device = _get_device_for_user(request.user, number, pk, perm="circuits.view_device")
    landing = (
        Termination.objects.filter(
            Q(end=Termination.End.FROM, circuit__from_device=device)
            | Q(end=Termination.End.TO, circuit__to_device=device)
        )
        .select_related("circuit", "terminal__device")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    context = {
        "job": job,
        "device": device,
        "terminals": device.terminals.all(),
        "circuits": _circuits_of(device).select_related("from_device", "to_device"),
        "terminations": landing,
    }
    return render(request, "circuits/device_detail.html", context)


def _device_form(request, job, device: Device | None):
    """The device form and its terminals formset, bound on POST."""
    data = request.POST if request.method == "POST" else None
    form = DeviceForm(data, instance=device, job=job)
    terminals = TerminalFormSet(data, instance=form.instance, prefix="terminals")
    return form, terminals


def _after_save(request, job, device: Device) -> HttpResponse:
    # "Save and add terminals" comes back to the form with fresh empty terminal rows.
    if request.POST.get("more"):
        return redirect("device_edit", number=job.number, pk=device.pk)
    return redirect(device)


def _render_form(request, job, form, terminals, device: Device | None) -> HttpResponse:
    context = {"job": job, "form": form, "terminals": terminals, "device": device}
    return render(request, "circuits/device_form.html", context)


@login_required
@require_http_methods(["GET", "POST"])
def device_new(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_device")
    form, terminals = _device_form(request, job, None)
    if request.method == "POST" and form.is_valid() and terminals.is_valid():
        device = device_save(form=form, terminals=terminals)
        messages.success(request, f"Device {device.name} saved.")
        return _after_save(request, job, device)
    return _render_form(request, job, form, terminals, None)


@login_required
@require_http_methods(["GET", "POST"])
def device_edit(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, device = _get_device_for_user(request.user, number, pk, perm="circuits.change_device")
    form, terminals = _device_form(request, job, device)
    if request.method == "POST" and form.is_valid() and terminals.is_valid():
        device = device_save(form=form, terminals=terminals)
        messages.success(request, f"Device {device.name} saved.")
        return _after_save(request, job, device)
    return _render_form(request, job, form, terminals, device)


@login_required
@require_http_methods(["GET", "POST"])
def device_delete(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, device = _get_device_for_user(request.user, number, pk, perm="circuits.delete_device")
    in_use = list(_circuits_of(device).values_list("tag", flat=True))
    if request.method == "POST" and not in_use:
        name = device.name
        device.delete()
        messages.success(request, f"Device {name} deleted.")
        return redirect("device_list", number=job.number)
    context = {"job": job, "device": device, "in_use": in_use}
    refused = request.method == "POST" and in_use
    return render(request, "circuits/device_delete.html", context, status=409 if refused else 200)


urlpatterns = [
    path("jobs/<str:number>/devices/", device_list, name="device_list"),
    path("jobs/<str:number>/devices/new/", device_new, name="device_new"),
    path("jobs/<str:number>/devices/<int:pk>/", device_detail, name="device_detail"),
    path("jobs/<str:number>/devices/<int:pk>/edit/", device_edit, name="device_edit"),
    path("jobs/<str:number>/devices/<int:pk>/delete/", device_delete, name="device_delete"),
]
