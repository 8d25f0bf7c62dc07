"""Torque readings on the tablet: the work list, the entry, corrections, the offline
queue's endpoint, the label scan and the walking order.

Every write goes through inspections.services (readings, corrections) or
inspections.services.walking (the order of the devices); the service decides and the page
shows its messages beside the fields. A reading carries a key made for the form (by the
page's script, or by the server when the page is shown), so a double submit or a resend
is stored once.
"""

from __future__ import annotations

import uuid

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import Http404, HttpRequest, HttpResponse
from django.shortcuts import get_object_or_404, redirect, render
from django.urls import path, reverse
from django.views.decorators.http import require_GET, require_http_methods, require_POST

from circuits.models import Circuit, Termination
from inspections import services
from inspections.models import Stage, TorqueRecord, TorqueWrench
from inspections.services.return_visit import last_readings
from inspections.services.walking import ORDER_PERM, device_move, devices_in_walking_order
from inspections.units import format_number, to_nm
from inspections.views import torque_rows as rows
from inspections.views.torque_sync import torque_sync_response
from shop.models import Job
from shop.views.access import _get_job_for_user, job_access, may_write_job

VIEW_PERM = "inspections.view_torquerecord"
RECORD_PERM = "inspections.add_torquerecord"
# Fields the entry form shows a message beside; anything else goes in the box above it.
ENTRY_FIELDS = ("value", "unit", "wrench", "found_loose", "note", "photo", "reason")


def _errors(exc: ValidationError) -> dict[str, list[str]]:
    return exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}


def _general(errors: dict[str, list[str]]) -> list[str]:
    return [m for key, msgs in errors.items() if key not in ENTRY_FIELDS for m in msgs]


def _saved(job: Job, pk: object) -> TorqueRecord | None:
    """The reading named by ?saved= (shown as the result of the last save), only when
    it is one of this job's."""
    text = str(pk or "")
    if not text.isascii() or not text.isdigit() or len(text) > 18:
        return None
    return (
        TorqueRecord.objects.select_related("termination__circuit", "wrench")
        .filter(pk=int(text), termination__circuit__job=job)
        .first()
    )


def _entry_url(job: Job, termination_pk: int, **query) -> str:
    url = reverse("torque_entry", args=[job.number, termination_pk])
    pairs = "&".join(f"{k}={v}" for k, v in query.items() if v not in (None, ""))
    return f"{url}?{pairs}" if pairs else url


@login_required
@require_GET
def stage_work(request: HttpRequest, number: str) -> HttpResponse:
    """The stage taking readings now: its progress, then every termination by device in
    walking order with its spec and state; a tap opens the entry."""
    job = _get_job_for_user(request.user, number, perm=VIEW_PERM)
    stage = rows.shown_stage(job, request.GET.get("stage"))
    access = job_access(request.user, job, request)
    context = {
        "job": job,
        "stage": stage,
        "taking": stage is not None and stage.accepts_work,
        "progress": services.torque_progress(stage) if stage is not None else None,
        "groups": rows.work_groups(job, stage),
        "saved": _saved(job, request.GET.get("saved")),
        "access": access,
        "may_record": request.user.has_perm(RECORD_PERM) and access.may_edit,
        "may_order": request.user.has_perm(ORDER_PERM) and access.may_edit,
        "stages": Stage.objects.filter(job=job, kind__in=rows.TORQUE_KINDS).order_by("kind"),
        "first_unread": rows.next_unread(job, stage, None) if stage is not None else None,
    }
    if context["saved"] is not None:
        context["saved_words"] = rows.result_words(context["saved"])
    return render(request, "inspections/work.html", context)


def _entry_context(
    request, job, termination, stage, *, posted=None, errors=None, saved=None
) -> dict:
    posted = posted or {}
    choices = rows.wrench_choices(termination)
    unit = posted.get("unit") or rows.default_unit(request.user, termination)
    if unit not in {o.code for o in rows.unit_options()}:
        unit = termination.torque_unit
    wrench = posted.get("wrench") or rows.default_wrench(request.user, choices)
    current = services.current_readings(stage).get(termination.pk) if stage else None
    history = (
        TorqueRecord.objects.filter(termination=termination, stage=stage)
        .select_related("wrench", "technician")
        .order_by("-recorded_at", "-pk")
        if stage is not None
        else []
    )
    after = rows.next_unread(job, stage, termination.pk) if stage is not None else None
    saved = saved or _saved(job, request.GET.get("saved"))
    errors = errors or {}
    last = last_readings(job) if job.kind == Job.Kind.RETURN_VISIT else {}
    return {
        "job": job,
        "termination": termination,
        "stage": stage,
        "taking": stage is not None and stage.accepts_work,
        "progress": services.torque_progress(stage) if stage is not None else None,
        "spec": rows.spec_text(termination),
        "terminal": rows.terminal_text(termination),
        "device": termination.device,
        "spec_nm": (
            to_nm(termination.torque_value, termination.torque_unit)
            if termination.torque_value is not None
            else None
        ),
        "spec_in_unit": rows.spec_in_unit(termination, unit),
        "units": rows.unit_options(),
        "unit": unit,
        "wrenches": choices,
        "wrench": str(wrench or ""),
        "value": posted.get("value", ""),
        "note": posted.get("note", ""),
        "found_loose": posted.get("found_loose") == "on",
        "client_key": str(uuid.uuid4()),
        "current": current,
        "history": history,
        "next_termination": after,
        "next_url": _entry_url(job, after.pk)
        if after
        else reverse("stage_work", args=[job.number]),
        "saved": saved,
        "saved_words": rows.result_words(saved) if saved else "",
        "errors": errors,
        "general_errors": _general(errors),
        "access": job_access(request.user, job, request),
        "last_words": rows.Row(termination, None, False, last=last.get(termination.pk)).last_words,
    }


def _entry_stage(job: Job, wanted: object) -> Stage | None:
    """The stage an entry is for: the one named (a torque stage's kind), else the one
    taking readings now."""
    if wanted not in (None, ""):
        stage = rows.shown_stage(job, wanted)
        if stage is not None and stage.kind in rows.TORQUE_KINDS:
            return stage
    return rows.torque_stage(job)


def _after_save(request: HttpRequest, job: Job, termination: Termination, record) -> HttpResponse:
    """On to the next unread termination (walking order), showing this result there."""
    nxt = rows.next_unread(job, record.stage, termination.pk)
    if nxt is None:
        url = f"{reverse('stage_work', args=[job.number])}?saved={record.pk}"
    else:
        url = _entry_url(job, nxt.pk, saved=record.pk)
    if request.htmx:
        if nxt is None:
            response = HttpResponse(status=204)
            response["HX-Redirect"] = url
            return response
        context = _entry_context(request, job, nxt, record.stage, saved=record)
        response = render(request, "inspections/torque_entry.html#entry", context)
        response["HX-Push-Url"] = url
        return response
    if nxt is None:
        messages.success(request, "Saved. Every termination of this stage has a reading now.")
    return redirect(url, permanent=False)


@login_required
@require_http_methods(["GET", "POST"])
def torque_entry(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    """One termination's reading: value, unit, wrench, (retorque) found loose, note,
    photo. ?saved=<reading> shows the result of the reading saved a moment ago; ?next=1
    goes on to the next unread termination instead."""
    job = _get_job_for_user(request.user, number, perm=RECORD_PERM, write=True)
    termination = get_object_or_404(
        Termination.objects.select_related(
            "circuit__from_device", "circuit__to_device", "terminal"
        ),
        pk=pk,
        circuit__job=job,
    )
    errors: dict[str, list[str]] = {}
    posted = None
    stage = _entry_stage(job, request.POST.get("stage") or request.GET.get("stage"))
    if request.method == "GET" and request.GET.get("next") == "1":
        saved = _saved(job, request.GET.get("saved"))
        if saved is not None:
            return _after_save(request, job, termination, saved)
    if request.method == "POST":
        posted = request.POST
        wrench_id = str(posted.get("wrench", ""))
        wrench = (
            TorqueWrench.objects.filter(pk=int(wrench_id)).first()
            if wrench_id.isascii() and wrench_id.isdigit() and len(wrench_id) < 18
            else None
        )
        errors = rows.nul_errors(posted, ("value", "unit", "note", "client_key"))
        if stage is None:
            errors.setdefault("stage", ["No torque stage of this job is open for readings now."])
        if not errors:
            try:
                record = services.torque_record_create(
                    termination=termination,
                    stage=stage,
                    value=posted.get("value", ""),
                    unit=posted.get("unit", ""),
                    wrench=wrench,
                    technician=request.user,
                    found_loose=posted.get("found_loose") == "on",
                    note=posted.get("note", ""),
                    client_key=posted.get("client_key", ""),
                    photo=request.FILES.get("photo"),
                )
            except ValidationError as exc:
                errors = _errors(exc)
            else:
                return _after_save(request, job, termination, record)
    context = _entry_context(request, job, termination, stage, posted=posted, errors=errors)
    template = "inspections/torque_entry.html"
    if request.htmx and request.headers.get("HX-Target") == "torque-entry":
        template += "#entry"
    return render(request, template, context)


@login_required
@require_http_methods(["GET", "POST"])
def torque_correct(request: HttpRequest, number: str, pk: int) -> HttpResponse:
    """Put a wrongly entered reading right: a new reading, with a reason, that takes the
    old one's place (which stays on record)."""
    job = _get_job_for_user(request.user, number, perm=RECORD_PERM, write=True)
    record = get_object_or_404(
        TorqueRecord.objects.select_related("termination__circuit", "stage", "wrench"),
        pk=pk,
        termination__circuit__job=job,
    )
    errors: dict[str, list[str]] = {}
    posted = request.POST if request.method == "POST" else {}
    if request.method == "POST":
        wrench_id = str(posted.get("wrench", ""))
        wrench = (
            TorqueWrench.objects.filter(pk=int(wrench_id)).first()
            if wrench_id.isascii() and wrench_id.isdigit() and len(wrench_id) < 18
            else None
        )
        errors = rows.nul_errors(posted, ("value", "unit", "note", "reason", "client_key"))
        try:
            if errors:
                raise ValidationError(errors)
            correction = services.torque_record_correct(
                record=record,
                value=posted.get("value", ""),
                unit=posted.get("unit", ""),
                wrench=wrench,
                technician=request.user,
                reason=posted.get("reason", ""),
                client_key=posted.get("client_key", ""),
                found_loose=(
                    posted.get("found_loose") == "on"
                    if record.stage.kind in (Stage.Kind.RETORQUE, Stage.Kind.RECHECK)
                    else None
                ),
                note=posted.get("note", ""),
            )
        except ValidationError as exc:
            errors = _errors(exc)
        else:
            messages.success(request, f"Corrected: {rows.result_words(correction)}")
            return redirect(_entry_url(job, record.termination_id, saved=correction.pk))
    choices = rows.wrench_choices(record.termination)
    context = {
        "job": job,
        "record": record,
        "later": TorqueRecord.objects.filter(supersedes=record).first(),
        "termination": record.termination,
        "terminal": rows.terminal_text(record.termination),
        "units": rows.unit_options(),
        "unit": posted.get("unit") or record.unit,
        "wrenches": choices,
        "wrench": str(posted.get("wrench") or record.wrench_id),
        "value": posted.get("value", format_value(record)),
        "reason": posted.get("reason", ""),
        "note": posted.get("note", ""),
        "found_loose": (posted.get("found_loose") == "on" if posted else record.found_loose),
        "retorque": record.stage.kind in (Stage.Kind.RETORQUE, Stage.Kind.RECHECK),
        "result_words": rows.result_words(record),
        "client_key": str(uuid.uuid4()),
        "errors": errors,
        "general_errors": _general(errors),
        "access": job_access(request.user, job, request),
    }
    return render(request, "inspections/torque_correct.html", context)


def format_value(record: TorqueRecord) -> str:
    return format_number(record.value)


@login_required
@require_POST
def torque_sync(request: HttpRequest, number: str) -> HttpResponse:
    """The offline queue's endpoint (inspections/views/torque_sync.py has the contract)."""
    return torque_sync_response(request, number)


@login_required
@require_GET
def label_scan(request: HttpRequest, pk: int, end: str) -> HttpResponse:
    """From the QR on a wire label: the first unread termination of that circuit end at
    the stage taking readings now. Those who do not record readings on this job, or
    when no torque stage is open, land on the circuit's page."""
    if end not in Termination.End.values:
        raise Http404("A label marks the from end or the to end of a circuit.")
    circuit = get_object_or_404(Circuit.objects.select_related("job"), pk=pk)
    job = _get_job_for_user(request.user, circuit.job.number, perm="circuits.view_circuit")
    stage = rows.torque_stage(job)
    if stage is None:
        messages.info(
            request, f"No torque stage of job {job.number} is open; this is circuit {circuit.tag}."
        )
        return redirect(circuit.get_absolute_url())
    if not (request.user.has_perm(RECORD_PERM) and may_write_job(request.user, job)):
        return redirect(circuit.get_absolute_url())
    ends = [
        row
        for row in rows.walking_terminations(job, stage)
        if row.termination.circuit_id == circuit.pk and row.termination.end == end
    ]
    unread = [row for row in ends if row.state == "not_read"]
    if unread:
        return redirect(_entry_url(job, unread[0].termination.pk))
    if len(ends) == 1:
        return redirect(_entry_url(job, ends[0].termination.pk))
    messages.info(
        request,
        f"Every termination of {circuit.tag}, {end} end, has a reading at the"
        f" {stage.get_kind_display().lower()}; choose one to read again.",
    )
    first = ends[0].termination.pk if ends else ""
    return redirect(f"{reverse('stage_work', args=[job.number])}#termination-{first}")


@login_required
@require_http_methods(["GET", "POST"])
def walking_order(request: HttpRequest, number: str) -> HttpResponse:
    """Put the job's devices in the order they sit in the vehicle: a device moves one
    place up or down per tap (works without a script)."""
    job = _get_job_for_user(request.user, number, perm=ORDER_PERM, write=True)
    errors: list[str] = []
    moved = None
    if request.method == "POST":
        try:
            device_move(
                job=job,
                device=request.POST.get("device", ""),
                direction=request.POST.get("move", ""),
                by=request.user,
            )
        except ValidationError as exc:
            errors = [m for msgs in _errors(exc).values() for m in msgs]
        else:
            moved = request.POST.get("device")
            if not request.htmx:
                return redirect(f"{reverse('walking_order', args=[job.number])}#device-{moved}")
    context = {
        "job": job,
        "devices": devices_in_walking_order(job),
        "errors": errors,
        "moved": str(moved or ""),
        "access": job_access(request.user, job, request),
    }
    template = "inspections/walking_order.html"
    if request.htmx:
        template += "#order"
    return render(request, template, context)


urlpatterns = [
    path("jobs/<str:number>/work/", stage_work, name="stage_work"),
    path("jobs/<str:number>/terminations/<int:pk>/torque/", torque_entry, name="torque_entry"),
    path("jobs/<str:number>/readings/<int:pk>/correct/", torque_correct, name="torque_correct"),
    path("jobs/<str:number>/readings/sync/", torque_sync, name="torque_sync"),
    path("scan/<int:pk>/<str:end>/", label_scan, name="label_scan"),
    path("jobs/<str:number>/walking-order/", walking_order, name="walking_order"),
]
