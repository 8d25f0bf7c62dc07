"""The heat-cycle run and the thermal readings taken after it.

Logging the run signs the heat-cycle stage and starts the soak (inspections.services.heat);
the page then says when the retorque may begin, live (static/js/countdown.js, with the
same words rendered by the server first). Temperatures are posted for one connection or
several at once; several are stored all or nothing, so a page with one typo saves none of
them and shows the typo beside its field."""

from __future__ import annotations

import datetime
import uuid
from dataclasses import dataclass

from django.contrib import messages
from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.db import transaction
from django.http import HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path
from django.utils import timezone
from django.views.decorators.http import require_http_methods

from circuits.models import Device, Termination
from inspections import services
from inspections.forms_checks import HeatCycleForm, merge_errors
from inspections.models import HeatCycleRun, Stage
from inspections.services import ThermalResult
from shop.models import Job, ShopProfile
from shop.views.access import _get_job_for_user, job_access

RUN_VIEW = "inspections.view_heatcyclerun"
RUN_PERM = "inspections.add_heatcyclerun"
THERMAL_VIEW = "inspections.view_thermalreading"
THERMAL_PERM = "inspections.add_thermalreading"
WAIVE_PERM = "inspections.waive_thermal"
# Keys of the service's messages that are about one connection (shown beside its field);
# the rest (stage closed, job locked, a stale page) are about the whole post.
READING_KEYS = ("temperature_c", "termination", "note")
MAX_TEMPERATURE_TEXT = 40


def error_dict(exc: ValidationError) -> dict[str, list[str]]:
    return exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}


def left_in_words(left: datetime.timedelta) -> str:
    """ "3 h 12 min left", rounded up to the minute (never "0 min left" while it runs);
    static/js/countdown.js writes the same words."""
    minutes = max(1, -(-int(left.total_seconds()) // 60))
    hours, minutes = divmod(minutes, 60)
    return f"{hours} h {minutes} min left" if hours else f"{minutes} min left"


@dataclass(frozen=True)
class Soak:
    run: HeatCycleRun | None
    ends_at: datetime.datetime | None
    remaining: datetime.timedelta | None
    minutes: int

    @property
    def running(self) -> bool:
        return self.remaining is not None and self.remaining > datetime.timedelta(0)

    @property
    def over(self) -> bool:
        return self.remaining is not None and not self.running

    @property
    def left(self) -> str:
        return left_in_words(self.remaining) if self.running else ""

    @property
    def minutes_words(self) -> str:
        hours, minutes = divmod(self.minutes, 60)
        if hours and minutes:
            return f"{hours} h {minutes} min"
        return f"{hours} h" if hours else f"{minutes} min"


def soak_for(job: Job) -> Soak:
    now = timezone.now()
    return Soak(
        run=services.latest_run(job),
        ends_at=services.soak_ends_at(job),
        remaining=services.soak_remaining(job, now=now),
        minutes=ShopProfile.load().soak_minutes,
    )


def _stages(job: Job) -> dict[int, Stage]:
    return {stage.kind: stage for stage in Stage.objects.filter(job=job)}


@login_required
@require_http_methods(["GET", "POST"])
def heat_cycle_log(request: HttpRequest, number: str) -> HttpResponse:
    """Log the run (technicians and leads on the job); everyone who reads the job sees
    the run and the soak."""
    posting = request.method == "POST"
    job = _get_job_for_user(
        request.user, number, perm=RUN_PERM if posting else RUN_VIEW, write=posting
    )
    form = HeatCycleForm(request.POST if posting else None)
    latest = timezone.localtime().strftime("%Y-%m-%dT%H:%M")
    for name in ("start", "end"):  # the picker offers no time in the future
        form.fields[name].widget.attrs["max"] = latest
    if posting and form.is_valid():
        data = form.cleaned_data
        try:
            services.heat_cycle_log(
                job=job,
                start=data["start"],
                end=data["end"],
                peak_current_a=data["peak_current_a"],
                ambient_c=data["ambient_c"],
                notes=data["notes"],
                by=request.user,
            )
        except ValidationError as exc:
            merge_errors(form, error_dict(exc))
        else:
            ends = services.soak_ends_at(job)
            if _recheck_open(_stages(job)) or ends is None:
                messages.success(
                    request, "Re-check run logged; take each connection's temperature now."
                )
                return redirect("thermal_readings", number=job.number)
            messages.success(
                request,
                f"Heat-cycle run logged; the retorque begins after the soak, at"
                f" {timezone.localtime(ends):%d %b %H:%M}.",
            )
            return redirect("heat_cycle_log", number=job.number)
    stages = _stages(job)
    # A return visit's open re-check takes the run for its thermal check (as found).
    recheck = _recheck_open(stages)
    heat = recheck or stages.get(Stage.Kind.HEAT_CYCLE)
    access = job_access(request.user, job, request)
    can_log = (
        heat is not None
        and heat.accepts_work
        and access.may_edit
        and request.user.has_perm(RUN_PERM)
    )
    context = {
        "job": job,
        "access": access,
        "form": form,
        "heat": heat,
        "retorque": stages.get(Stage.Kind.RETORQUE),
        "can_log": can_log,
        "recheck": recheck,
        "soak": Soak(
            run=services.recheck_run(job),
            ends_at=None,
            remaining=None,
            minutes=ShopProfile.load().soak_minutes,
        )
        if recheck
        else soak_for(job),
        "runs": HeatCycleRun.objects.filter(job=job).count(),
    }
    return render(request, "inspections/heat_cycle.html", context, status=200)


# --- thermal readings ---------------------------------------------------------------------


@dataclass
class ThermalRow:
    termination: Termination
    result: ThermalResult | None
    blocks: bool  # blocks the retorque now: probable deficiency or worse, not waived
    waived: bool
    value: str = ""  # what was typed, shown back after a refused post
    errors: list[str] | None = None
    key: str = ""

    @property
    def field(self) -> str:
        return f"t-{self.termination.pk}"

    @property
    def over_ambient(self) -> str:
        return _rise_words(self.result.assessment.rise_over_ambient_c) if self.result else ""

    @property
    def over_similar(self) -> str:
        if self.result is None:
            return ""
        rise = self.result.assessment.rise_over_similar_c
        return "no similar connection read" if rise is None else _rise_words(rise)


def _rise_words(rise: float) -> str:
    """ "8.0 °C", or "3.5 °C cooler" (a cool connection is not a "−3.5 °C rise")."""
    return f"{-rise:.1f} °C cooler" if rise < 0 else f"{rise:.1f} °C"


def _device_order() -> tuple[str, ...]:
    names = {f.name for f in Device._meta.get_fields()}
    return ("walking_order", "name", "pk") if "walking_order" in names else ("name", "pk")


def _terminations_by_device(job: Job) -> list[tuple[Device, list[Termination]]]:
    """The job's terminations under the device each sits on, the devices in walking order."""
    devices = list(Device.objects.filter(job=job).order_by(*_device_order()))
    terminations = (
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    on: dict[int, list[Termination]] = {}
    for termination in terminations:
        circuit = termination.circuit
        device_id = (
            circuit.from_device_id
            if termination.end == Termination.End.FROM
            else circuit.to_device_id
        )
        on.setdefault(device_id, []).append(termination)
    return [(device, on[device.pk]) for device in devices if device.pk in on]


def _save_temperatures(request, run, terminations) -> tuple[dict[int, list[str]], list[str], int]:
    """Store every temperature typed, all or nothing: (messages per termination id,
    messages about the whole post, how many were stored)."""
    entries = []
    per_row: dict[int, list[str]] = {}
    general: list[str] = []
    for termination in terminations:
        raw = request.POST.get(f"t-{termination.pk}", "").strip()
        if not raw:
            continue
        if len(raw) > MAX_TEMPERATURE_TEXT:
            per_row[termination.pk] = ["The temperature must be a number, e.g. 41.5."]
            continue
        entries.append((termination, raw, request.POST.get(f"k-{termination.pk}", "")))
    if run is None:
        general.append("No heat-cycle run is logged yet; log the run before its temperatures.")
    elif not entries and not per_row:
        general.append("Enter the temperature of at least one connection.")
    if general or per_row:
        return per_row, general, 0
    with transaction.atomic():
        for termination, raw, key in entries:
            try:
                services.thermal_reading_create(
                    run=run,
                    termination=termination,
                    temperature_c=raw,
                    by=request.user,
                    client_key=key,
                )
            except ValidationError as exc:
                for field, found in error_dict(exc).items():
                    if field in READING_KEYS:
                        per_row.setdefault(termination.pk, []).extend(found)
                    else:
                        general.extend(m for m in found if m not in general)
        if per_row or general:
            transaction.set_rollback(True)  # one refused: none stored
            return per_row, general, 0
    return per_row, general, len(entries)


def _recheck_open(stages: dict[int, Stage]) -> Stage | None:
    """A return visit's re-check while it takes work (its run and temperatures are as
    found, kept apart from the heat cycle's)."""
    stage = stages.get(Stage.Kind.RECHECK)
    return stage if stage is not None and stage.accepts_work else None


def _work_stage(stages: dict[int, Stage]) -> Stage | None:
    for kind in (Stage.Kind.RECHECK, Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE):
        stage = stages.get(kind)
        if stage is not None and stage.accepts_work:
            return stage
    return None


@login_required
@require_http_methods(["GET", "POST"])
def thermal_readings(request: HttpRequest, number: str) -> HttpResponse:
    """Each connection's temperature after the run, classed by its rise over ambient and
    over similar connections; hot ones block the retorque until re-made or waived."""
    posting = request.method == "POST"
    job = _get_job_for_user(
        request.user, number, perm=THERMAL_PERM if posting else THERMAL_VIEW, write=posting
    )
    recheck = _recheck_open(_stages(job)) is not None
    run = services.recheck_run(job) if recheck else services.latest_run(job)
    groups = _terminations_by_device(job)
    terminations = [t for _, ts in groups for t in ts]
    per_row: dict[int, list[str]] = {}
    general: list[str] = []
    if posting:
        per_row, general, stored = _save_temperatures(request, run, terminations)
        if not per_row and not general:
            messages.success(request, f"{stored} temperature{'' if stored == 1 else 's'} saved.")
            return redirect("thermal_readings", number=job.number)
    results = services.thermal_results(job, recheck=recheck)
    # Hot at a re-check is a finding (the connection is re-made at first install), not
    # something to waive; every hot one is shown as blocking the build stages' skip.
    unwaived = (
        {r.reading.pk for r in results.values() if r.blocks_retorque}
        if recheck
        else {r.reading.pk for r in services.thermal_unwaived(job)}
    )
    rows = []
    for device, device_terminations in groups:
        device_rows = []
        for termination in device_terminations:
            result = results.get(termination.pk)
            hot = result is not None and result.blocks_retorque
            device_rows.append(
                ThermalRow(
                    termination=termination,
                    result=result,
                    blocks=hot and result.reading.pk in unwaived,
                    waived=hot and result.reading.pk not in unwaived,
                    value=request.POST.get(f"t-{termination.pk}", "") if per_row else "",
                    errors=per_row.get(termination.pk),
                    key=str(uuid.uuid4()),
                )
            )
        rows.append((device, device_rows))
    access = job_access(request.user, job, request)
    stage = _work_stage(_stages(job))
    flat = [row for _, device_rows in rows for row in device_rows]
    context = {
        "job": job,
        "access": access,
        "run": run,
        "groups": rows,
        "general": general,
        "stage": stage,
        "can_enter": (
            run is not None
            and stage is not None
            and access.may_edit
            and request.user.has_perm(THERMAL_PERM)
        ),
        "may_waive": request.user.has_perm(WAIVE_PERM) and access.may_edit and not recheck,
        "recheck": recheck,
        "read": sum(1 for row in flat if row.result is not None),
        "blocking": sum(1 for row in flat if row.blocks),
        "waived": sum(1 for row in flat if row.waived),
        "total": len(flat),
    }
    return render(request, "inspections/thermal_readings.html", context)


urlpatterns = [
    path("jobs/<str:number>/heat-cycle/", heat_cycle_log, name="heat_cycle_log"),
    path("jobs/<str:number>/thermal/", thermal_readings, name="thermal_readings"),
]
