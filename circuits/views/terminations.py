"""Edit one termination: its kind, stud size and torque spec (value, unit, tolerance and
where the value comes from). A blank torque takes the device manual's value, else the
shop default for the stud size and kind."""

from __future__ import annotations

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.views.decorators.http import require_http_methods

from circuits.forms import TerminationForm
from circuits.models import Termination
from circuits.services import termination_update
from circuits.views.access import _get_job_for_user
from shop.views.access import safe_next


def _back_url(request: HttpRequest, termination: Termination) -> str:
    # Only a same-site path; anything else (a view name such as "NaN") goes to the circuit.
    return safe_next(request, termination.circuit.get_absolute_url())


@login_required
@require_http_methods(["GET", "POST"])
def termination_edit(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.change_termination", write=True)
    termination = get_object_or_404(
        Termination.objects.select_related(
            "circuit__job", "circuit__from_device", "circuit__to_device", "terminal__device"
        ),
        circuit__job=job,
        pk=pk,
    )
    back = _back_url(request, termination)
    form = TerminationForm(request.POST or None, instance=termination)
    if request.method == "POST" and form.is_valid():
        try:
            saved = termination_update(termination=form.save(commit=False), refill=form.refill)
        except ValidationError as exc:
            form.add_error(None, exc)
        else:
            messages.success(request, f"Termination {saved} saved.")
            return redirect(back)
    context = {"job": job, "termination": termination, "form": form, "back": back}
    return render(request, "circuits/termination_form.html", context)


urlpatterns = [
    path("jobs/<str:number>/terminations/<int:pk>/", termination_edit, name="termination_edit"),
]
