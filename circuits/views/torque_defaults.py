"""The shop's table of default torque specs by stud size and termination kind. They fill
new terminations unless the device manual's value is known. Leads edit it;
everyone who works on the system can read it."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.views.decorators.http import require_GET, require_http_methods

from circuits.forms import TorqueDefaultForm
from circuits.models import TorqueDefault
from shop.views.access import require_perm


@login_required
@require_GET
def torque_defaults(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "circuits.view_torquedefault")
    specs = TorqueDefault.objects.all()
    return render(request, "circuits/torque_defaults.html", {"specs": specs})


def _form_page(request, form, spec: TorqueDefault | None) -> HttpResponse:
    return render(request, "circuits/torque_default_form.html", {"form": form, "spec": spec})


@login_required
@require_http_methods(["GET", "POST"])
def torque_default_new(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, "circuits.add_torquedefault")
    form = TorqueDefaultForm(request.POST or None)
    if request.method == "POST" and form.is_valid():
        spec = form.save()
        messages.success(request, f"Default torque for {spec} saved.")
        return redirect("torque_defaults")
    return _form_page(request, form, None)


@login_required
@require_http_methods(["GET", "POST"])
def torque_default_edit(request: HttpRequest, pk: int) -> HttpResponse:
    require_perm(request.user, "circuits.change_torquedefault")
    spec = get_object_or_404(TorqueDefault, pk=pk)
    form = TorqueDefaultForm(request.POST or None, instance=spec)
    if request.method == "POST" and form.is_valid():
        spec = form.save()
        messages.success(request, f"Default torque for {spec} saved.")
        return redirect("torque_defaults")
    return _form_page(request, form, spec)


urlpatterns = [
    path("torque-specs/", torque_defaults, name="torque_defaults"),
    path("torque-specs/new/", torque_default_new, name="torque_default_new"),
    path("torque-specs/<int:pk>/", torque_default_edit, name="torque_default_edit"),
]
