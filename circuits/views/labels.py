"""A printable sheet of wire-marker labels: one per circuit end, each with its own QR code
that opens that end's torque entry (the label scan page, inspections.views.torque), or
the circuit's page when no torque stage is open."""

from __future__ import annotations

from dataclasses import dataclass

import segno
from django.contrib.auth.decorators import login_required
from django.http import Http404, HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, render
from django.urls import path, reverse
from django.utils.safestring import SafeString, mark_safe
from django.views.decorators.http import require_GET

from circuits.diagram import size_text
from circuits.models import Circuit
from circuits.tags import natural_by_tag
from circuits.views.access import _get_job_for_user
from shop.fields import parse_id


@dataclass(frozen=True)
class WireLabel:
    circuit: Circuit
    end: str  # "from" or "to"
    device_name: str
    size: str
    url: str
    qr: SafeString

    @property
    def end_text(self) -> str:
        return f"{self.end} {self.device_name}"


def qr_svg(url: str) -> SafeString:
    """A QR code for the URL as inline SVG: sized by CSS, medium error correction (a
    scuffed label still reads), a full-size code rather than a micro one (phones read it)."""
    code = segno.make_qr(url, error="m")
    svg = code.svg_inline(scale=1, border=2, omitsize=True, svgclass="qr", lineclass="qr-dark")
    return mark_safe(svg)  # segno escapes the data it writes


def wire_labels(circuits, absolute_url) -> list[WireLabel]:
    """Two labels per circuit, its from end then its to end, each coding its own end."""
    labels = []
    for circuit in circuits:
        for end, device in (("from", circuit.from_device), ("to", circuit.to_device)):
            url = absolute_url(reverse("label_scan", args=[circuit.pk, end]))
            labels.append(
                WireLabel(circuit, end, device.name, size_text(circuit), url, qr_svg(url))
            )
    return labels


@login_required
@require_GET
def circuit_labels(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.view_circuit")
    circuits = job.circuits.for_schedule()
    one = request.GET.get("circuit", "")
    if one:  # reprint the two labels of one circuit
        # ASCII digits within 64 bits only: "²" passes isdigit() but not int(), and
        # 10**308 overflows the database's integers.
        circuit_id = parse_id(one)
        if circuit_id is None:
            raise Http404("No such circuit.")
        circuits = [get_object_or_404(circuits, pk=circuit_id)]
    labels = wire_labels(natural_by_tag(circuits), request.build_absolute_uri)
    return render(request, "circuits/labels.html", {"job": job, "labels": labels, "one": one})


urlpatterns = [
    path("jobs/<str:number>/labels/", circuit_labels, name="circuit_labels"),
]
