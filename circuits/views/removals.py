"""Deleting a circuit or a device: a confirmation page first, and the delete only for a
POST that carries the page's `confirm` field (an empty POST shows the page again and
deletes nothing). Each delete is written to the security log with who, when and what.

The URL patterns stay with their page families (editor.py: circuit_delete, devices.py:
device_delete), which import these views."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.views.decorators.http import require_http_methods

from circuits.models import Termination
from circuits.services import circuit_delete as delete_circuit
from circuits.services import device_circuit_tags
from circuits.services import device_delete as delete_device
from circuits.views.access import _get_circuit_for_user, _get_device_for_user
from shop.security import security_log

CONFIRM_VALUE = "yes"
NOT_CONFIRMED = "Nothing was deleted: press the delete button on this page to confirm."


def _confirmed(request: HttpRequest) -> bool:
    return request.method == "POST" and request.POST.get("confirm") == CONFIRM_VALUE


@login_required
@require_http_methods(["GET", "POST"])
def circuit_delete(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, circuit = _get_circuit_for_user(
        request.user, number, pk, perm="circuits.delete_circuit", write=True
    )
    refusal = ""
    if _confirmed(request):
        tag = circuit.tag
        try:
            ends = delete_circuit(circuit=circuit, user=request.user)
        except ValidationError as exc:
            refusal = " ".join(exc.messages)
        else:
            security_log(
                "delete",
                request=request,
                record="circuit",
                job=job.number,
                tag=tag,
                pk=pk,
                terminations=ends,
            )
            messages.success(request, f"Circuit {tag} deleted.")
            return redirect(job)
    context = {
        "job": job,
        "circuit": circuit,
        "termination_count": Termination.objects.filter(circuit=circuit).count(),
        "confirm_value": CONFIRM_VALUE,
        "not_confirmed": refusal or (NOT_CONFIRMED if request.method == "POST" else ""),
    }
    return render(request, "circuits/circuit_delete.html", context, status=409 if refusal else 200)


@login_required
@require_http_methods(["GET", "POST"])
def device_delete(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, device = _get_device_for_user(
        request.user, number, pk, perm="circuits.delete_device", write=True
    )
    in_use = device_circuit_tags(device)
    refusal = ""
    if _confirmed(request) and not in_use:
        name = device.name
        try:
            delete_device(device=device, user=request.user)
        except ValidationError as exc:
            # A circuit was added to it since the page was read (shown as in use), or the
            # job is locked, or its terminals carry readings: show the refusal.
            in_use = device_circuit_tags(device)
            refusal = "" if in_use else " ".join(exc.messages)
        else:
            security_log(
                "delete", request=request, record="device", job=job.number, name=name, pk=pk
            )
            messages.success(request, f"Device {name} deleted.")
            return redirect("device_list", number=job.number)
    context = {
        "job": job,
        "device": device,
        "in_use": in_use,
        "confirm_value": CONFIRM_VALUE,
        "not_confirmed": refusal
        or (NOT_CONFIRMED if request.method == "POST" and not in_use else ""),
    }
    refused = request.method == "POST" and (in_use or refusal)
    return render(request, "circuits/device_delete.html", context, status=409 if refused else 200)
