"""A job's devices: list, detail (terminals, circuits and the terminations landing on
it, with their torque specs), new and edit (with the terminals inline); delete lives in
removals.py and is routed here.

Writes need the job assignment (shop.views.access). The terminal rows are checked against
the device before anything is validated: a row claiming to be a terminal the device does
not have, or an existing terminal posted as a new row (a lie in the formset's management
form), gets a 400 page and saves nothing; removing a terminal needs
circuits.delete_terminal, and the form offers it only to those who hold it."""

from __future__ import annotations

from django import forms
from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import PermissionDenied, ValidationError
from django.db import IntegrityError
from django.db.models import Count, Q
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path
from django.views.decorators.http import require_GET, require_http_methods

from circuits.forms import DeviceForm, TerminalFormSet, device_save_values
from circuits.models import Circuit, Device, Termination
from circuits.services import device_save
from circuits.tags import natural_by_tag
from circuits.views.access import _get_device_for_user, _get_job_for_user
from circuits.views.removals import device_delete
from shop.views.errors import bad_request_page

PREFIX = "terminals"
DELETE_TERMINAL_PERM = "circuits.delete_terminal"
# Far above any real device (DATA_UPLOAD_MAX_NUMBER_FIELDS stops larger posts earlier).
MAX_ROWS = 1000


def _circuits_of(device: Device):
    return Circuit.objects.filter(Q(from_device=device) | Q(to_device=device))


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
        # The rows link their circuit (its job's number) and name its end's device.
        .select_related(
            "circuit__job", "circuit__from_device", "circuit__to_device", "terminal__device"
        )
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    circuits = _circuits_of(device).select_related("job", "from_device", "to_device")
    context = {
        "job": job,
        "device": device,
        "terminals": device.terminals.all(),
        "circuits": natural_by_tag(circuits),
        "terminations": landing,
    }
    return render(request, "circuits/device_detail.html", context)


def _device_form(request, job, device: Device | None):
    """The device form and its terminals formset, bound on POST. The formset offers
    "remove" only to users who may delete terminals."""
    data = request.POST if request.method == "POST" else None
    form = DeviceForm(data, instance=device, job=job)
    terminals = TerminalFormSet(data, instance=form.instance, prefix=PREFIX)
    # Before the rows are built (they are built on first use), so no DELETE field exists.
    terminals.can_delete = request.user.has_perm(DELETE_TERMINAL_PERM)
    return form, terminals


def _count(data, name: str) -> int | None:
    try:
        return int(data.get(f"{PREFIX}-{name}", ""))
    except (TypeError, ValueError):
        return None


def _formset_lie(data, device: Device | None) -> str:
    """Why the posted terminal rows cannot come from this device's form, or "".

    Our form posts the device's terminals first (each with its id, INITIAL_FORMS of them),
    then new rows without an id. A missing or unreadable count is left to the formset,
    which reports it beside the terminals."""
    total, initial = _count(data, "TOTAL_FORMS"), _count(data, "INITIAL_FORMS")
    if total is None or initial is None:
        return ""
    stale = (
        "The terminal rows do not match this device's terminals (they were changed since "
        "the page was opened, or the form was altered). Nothing was saved; open the device "
        "again and redo the change."
    )
    if not 0 <= initial <= total or total > MAX_ROWS:
        return stale
    known = {str(pk) for pk in device.terminals.values_list("pk", flat=True)} if device else set()
    seen: set[str] = set()
    for index in range(total):
        posted = str(data.get(f"{PREFIX}-{index}-id", "")).strip()
        if index < initial:
            if posted not in known or posted in seen:
                return stale
            seen.add(posted)
        elif posted:
            return stale
    return ""


def _posted_deletes(data) -> bool:
    """Whether any terminal row was posted with its remove box ticked."""
    total = _count(data, "TOTAL_FORMS") or 0
    checkbox = forms.CheckboxInput()
    return any(
        checkbox.value_from_datadict(data, None, f"{PREFIX}-{index}-DELETE")
        for index in range(min(total, MAX_ROWS))
    )


def _refused(request, device: Device | None) -> HttpResponse | None:
    """The answer to a POST the terminal rows forbid, or None when it may go ahead."""
    if request.method != "POST":
        return None
    if not request.user.has_perm(DELETE_TERMINAL_PERM) and _posted_deletes(request.POST):
        raise PermissionDenied("Removing a terminal is lead or office work; ask a lead.")
    lie = _formset_lie(request.POST, device)
    return bad_request_page(request, lie) if lie else None


def _save(form, terminals) -> Device | None:
    """Save the device and its terminals together; a clash the validation could not see
    (someone saved a terminal of the same name at the same moment) is shown beside the
    form, and nothing is saved."""
    try:
        return device_save(**device_save_values(form, terminals))
    except ValidationError as exc:
        # Locked by approval, or a terminal to be removed carries readings.
        form.add_error(None, exc)
        return None
    except IntegrityError:
        form.add_error(
            None,
            "Another change to this device or its terminals was saved at the same moment; "
            "nothing of yours was saved. Check the names and save again.",
        )
        return None


def _after_save(request, job, device: Device) -> HttpResponse:
    # "Save and add terminals" comes back to the form with fresh empty terminal rows.
    if request.POST.get("more"):
        return redirect("device_edit", number=job.number, pk=device.pk)
    return redirect(device)


def _render_form(request, job, form, terminals, device: Device | None) -> HttpResponse:
    context = {"job": job, "form": form, "terminals": terminals, "device": device}
    return render(request, "circuits/device_form.html", context)


def _form_page(request, job, device: Device | None) -> HttpResponse:
    """New and edit alike: refuse a forbidden or tampered post, else validate and save."""
    if (refusal := _refused(request, device)) is not None:
        return refusal
    form, terminals = _device_form(request, job, device)
    valid = request.method == "POST" and form.is_valid() and terminals.is_valid()
    if valid and (saved := _save(form, terminals)) is not None:
        messages.success(request, f"Device {saved.name} saved.")
        return _after_save(request, job, saved)
    return _render_form(request, job, form, terminals, device)


@login_required
@require_http_methods(["GET", "POST"])
def device_new(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_device", write=True)
    return _form_page(request, job, None)


@login_required
@require_http_methods(["GET", "POST"])
def device_edit(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, device = _get_device_for_user(
        request.user, number, pk, perm="circuits.change_device", write=True
    )
    return _form_page(request, job, device)


urlpatterns = [
    path("jobs/<str:number>/devices/", device_list, name="device_list"),
    path("jobs/<str:number>/devices/new/", device_new, name="device_new"),
    path("jobs/<str:number>/devices/<int:pk>/", device_detail, name="device_detail"),
    path("jobs/<str:number>/devices/<int:pk>/edit/", device_edit, name="device_edit"),
    path("jobs/<str:number>/devices/<int:pk>/delete/", device_delete, name="device_delete"),
]
