"""Circuit editor: new, edit, and the live sizing panel beside the form (delete is in
removals.py, routed here).

The panel is rendered from the saved circuit on a plain page load (with the whole-system
findings and waivers), and from the bound form while the person types (htmx posts the
form to `circuit_preview`, which never saves anything).
"""

from __future__ import annotations

import copy
from dataclasses import dataclass, field

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path
from django.views.decorators.http import require_http_methods, require_POST

from circuits.forms import CircuitForm
from circuits.models import Circuit
from circuits.services import circuit_create, circuit_update
from circuits.sizing import CAUTION, Report
from circuits.system import (
    CircuitSizing,
    SystemFinding,
    job_system_report,
    size_one,
)
from circuits.views.access import (
    _get_circuit_for_user,
    _get_job_for_user,
    require_job_write,
    require_perm,
)
from circuits.views.removals import circuit_delete
from shop.fields import parse_id
from shop.views.access import job_access


@dataclass
class Panel:
    """What the live panel shows: the sizing report and findings, or what is missing."""

    state: str  # "blank", "needed", "error" or "sized"
    report: Report | None = None
    findings: list[SystemFinding] = field(default_factory=list)
    needed: list[tuple[str, str]] = field(default_factory=list)
    error: str = ""
    # True when the findings include the whole-system rules (not only the sizing engine).
    whole_system: bool = False
    caution: str = CAUTION

    @property
    def result(self):
        return self.report.result if self.report else None

    @property
    def open_blocking(self) -> int:
        return sum(1 for f in self.findings if f.open_blocking)

    @property
    def open_warnings(self) -> int:
        return sum(1 for f in self.findings if f.severity == "warning" and not f.waived)

    @property
    def entered_size(self):
        """The size the person entered (None when they asked for a recommendation)."""
        return self.report.input.size if self.report else None

    @property
    def size_verdict(self) -> str:
        """How the entered size compares with the smallest size that works."""
        recommended = self.report.recommended_size if self.report else None
        entered = self.entered_size
        if entered is None or recommended is None:
            return "none"
        if entered == recommended:
            return "smallest"
        return "larger" if entered > recommended else "smaller"

    @property
    def nearest_rejected(self):
        rejected = self.report.recommendation.rejected if self.report else ()
        return rejected[-1] if rejected else None

    @property
    def other_rejected(self):
        rejected = self.report.recommendation.rejected if self.report else ()
        return list(reversed(rejected[:-1]))


def _with_waivers(job, findings: list[SystemFinding]) -> list[SystemFinding]:
    # Waivers in force only; each covers its finding only on the facts it was granted on
    # (SystemFinding.waived), so a draft that differs shows the finding open.
    waivers = {(w.code, w.subject): w for w in job.waivers.active().select_related("lead")}
    for finding in findings:
        finding.waiver = waivers.get((finding.code, finding.subject))
    return sorted(findings, key=lambda f: f.rank)


def _panel_from(sizing: CircuitSizing, *, whole_system: bool) -> Panel:
    if sizing.report is None:
        return Panel(state="error", error=sizing.error or "", findings=sizing.findings)
    return Panel(
        state="sized", report=sizing.report, findings=sizing.findings, whole_system=whole_system
    )


def panel_for_form(form: CircuitForm, job) -> Panel:
    """The panel for what is typed in the form, valid or not, without saving.

    A fully valid form is evaluated as part of the job, as if saved (the whole-system
    rules included); otherwise the sizing engine alone runs on the fields it needs."""
    if not form.is_bound:
        return Panel(state="blank")
    if not form.errors:
        draft = form.instance
        system = job_system_report(job, draft=draft)
        return _panel_from(system.by_tag()[draft.tag], whole_system=True)
    draft = form.sizing_draft()
    if draft is None:
        return Panel(state="needed", needed=form.sizing_needed())
    draft.tag = draft.tag or "new circuit"
    sizing = size_one(draft)
    sizing.findings = _with_waivers(job, sizing.findings)
    return _panel_from(sizing, whole_system=False)


def panel_for_saved(circuit: Circuit, job) -> Panel:
    return _panel_from(job_system_report(job).by_tag()[circuit.tag], whole_system=True)


def _ends(from_device, to_device) -> str:
    """The devices the terminal choices on the page were made for, as "from:to"."""
    return f"{from_device or ''}:{to_device or ''}"


def _editor(request, job, form: CircuitForm, circuit: Circuit | None, panel: Panel):
    terminations = []
    if circuit is not None and circuit.pk:
        terminations = circuit.terminations.select_related("terminal__device", "circuit")
    context = {
        "job": job,
        "form": form,
        "circuit": circuit,
        "panel": panel,
        "terminations": terminations,
        "preview_query": f"?circuit={circuit.pk}" if circuit is not None and circuit.pk else "",
        "terminals_for": _ends(form["from_device"].value(), form["to_device"].value()),
        "can_waive": not form.is_bound
        and circuit is not None
        and job_access(request.user, job, request).may_edit,
    }
    return render(request, "circuits/editor.html", context)


def _save(form: CircuitForm, job, circuit: Circuit | None) -> Circuit | None:
    """Save through the services; a model rule the form could not see lands beside the
    form as an error instead of a 500."""
    try:
        if circuit is None:
            return circuit_create(job=job, **form.circuit_fields())
        return circuit_update(circuit=circuit, **form.circuit_fields())
    except ValidationError as exc:
        form.add_error(None, exc)
        return None


@login_required
@require_http_methods(["GET", "POST"])
def circuit_new(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.add_circuit", write=True)
    if request.method == "POST":
        form = CircuitForm(request.POST, job=job)
        if form.is_valid() and (saved := _save(form, job, None)) is not None:
            messages.success(request, f"Circuit {saved.tag} saved.")
            return redirect(saved)
        return _editor(request, job, form, None, panel_for_form(form, job))
    initial = {
        key: request.GET[key] for key in ("from_device", "to_device") if request.GET.get(key)
    }
    form = CircuitForm(job=job, initial=initial)
    return _editor(request, job, form, None, Panel(state="blank"))


@login_required
@require_http_methods(["GET", "POST"])
def circuit_edit(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    job, circuit = _get_circuit_for_user(request.user, number, pk, perm="circuits.view_circuit")
    if request.method == "POST":
        require_perm(request.user, "circuits.change_circuit")
        require_job_write(request.user, job)
        # The form edits a copy, so the page keeps the saved tag while errors are shown.
        form = CircuitForm(request.POST, instance=copy.copy(circuit), job=job)
        if form.is_valid() and (saved := _save(form, job, form.instance)) is not None:
            messages.success(request, f"Circuit {saved.tag} saved.")
            return redirect(saved)
        return _editor(request, job, form, circuit, panel_for_form(form, job))
    form = CircuitForm(instance=circuit, job=job)
    return _editor(request, job, form, circuit, panel_for_saved(circuit, job))


@login_required
@require_POST
def circuit_preview(request: HttpRequest, number: str) -> HttpResponse:
    """The live panel for the form as typed. Binds the form and sizes it; saves nothing."""
    job = _get_job_for_user(request.user, number, perm="circuits.view_circuit")
    instance = None
    # ASCII digits within 64 bits only ("²" or 10**308 is no circuit, not a 500).
    if (circuit_id := parse_id(request.GET.get("circuit", ""))) is not None:
        instance = get_object_or_404(Circuit, job=job, pk=circuit_id)
    form = CircuitForm(request.POST, instance=instance, job=job, for_save=False)
    context = {"job": job, "panel": panel_for_form(form, job), "oob": True}
    ends = _ends(request.POST.get("from_device"), request.POST.get("to_device"))
    if ends != request.POST.get("terminals_for", ""):
        # A device changed: send its terminal choices too (out of band), from an unbound
        # form so no error shows before the person has picked a terminal.
        picked = {k: request.POST.get(k) for k in ("from_device", "to_device")}
        context["terminal_form"] = CircuitForm(job=job, initial=picked)
        context["terminals_for"] = ends
    return render(request, "circuits/editor.html#panel", context)


urlpatterns = [
    path("jobs/<str:number>/circuits/new/", circuit_new, name="circuit_new"),
    path("jobs/<str:number>/circuits/preview/", circuit_preview, name="circuit_preview"),
    path("jobs/<str:number>/circuits/<int:pk>/", circuit_edit, name="circuit_edit"),
    path("jobs/<str:number>/circuits/<int:pk>/delete/", circuit_delete, name="circuit_delete"),
]
