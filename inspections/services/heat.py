"""The heat-cycle run, the temperature readings taken right after it, and a lead's
waiver of a hot connection.

Logging the run is what signs the heat-cycle stage (decided for issue 8): the run's
figures, who logged it and when are the record, and there is nothing else to attest, so
no drawn signature is asked for. In the same transaction the retorque stage opens; its
work (readings, checklist marks) and its sign-off wait for the shop's soak time after the
run's end (inspections.services.queries.check_soak). Temperatures are taken while the
retorque is open, soak or not: right after the run is when they mean something. A second
run needs a lead to send the heat-cycle stage back first (which sets the retorque back to
not started); the soak then counts from the new run, and only retorque readings made
after it count."""

from __future__ import annotations

import datetime
from decimal import Decimal

from django.core.exceptions import ValidationError
from django.db import IntegrityError, transaction
from django.utils import timezone

from circuits.models import Termination
from inspections.models import AuditEvent, HeatCycleRun, Stage, ThermalReading, ThermalWaiver
from inspections.services.common import (
    Errors,
    add_error,
    audit,
    clean_client_key,
    clean_text,
    not_in_future,
    parse_decimal,
    parse_moment,
    person,
    raise_if,
    require_perm,
)
from inspections.services.queries import soak_ends_at, thermal_results, thermal_waivers
from inspections.services.signing import open_next, set_state
from inspections.services.status import check_unlocked, job_status_sync
from inspections.units import format_number

# Sensible ranges; a value outside is a typo far more often than a fact. Our choices
# (common practice for vehicle DC systems and the air a shop works in), not a standard's.
PEAK_CURRENT_A = (Decimal("0.1"), Decimal("2000"))
AMBIENT_C = (Decimal("-40"), Decimal("60"))
# What a handheld IR thermometer reads; above it the connection is on fire, not hot.
CONNECTION_C = (Decimal("-40"), Decimal("250"))
MAX_RUN = datetime.timedelta(hours=24)
MAX_NOTES = 4000


def _in_range(number, bounds, *, field: str, what: str, unit: str, errors: Errors) -> None:
    low, high = bounds
    if number is not None and not low <= number <= high:
        add_error(
            errors,
            field,
            f"A {what} of {format_number(number, 1)} {unit} is outside"
            f" {format_number(low, 1)} to {format_number(high, 1)} {unit}; check the value.",
        )


def _working_stage(job, kinds: tuple[int, ...], errors: Errors, *, doing: str) -> Stage | None:
    """The first of `kinds` that is open for work (locked on PostgreSQL), else an error."""
    stages = list(
        Stage.objects.select_for_update().filter(job=job, kind__in=kinds).order_by("kind")
    )
    if not stages:
        add_error(errors, "job", f"Job {job.number} has no stages yet; open its first install.")
        return None
    for stage in stages:
        if stage.accepts_work:
            return stage
    states = "; ".join(
        f"{s.get_kind_display().lower()} is {s.get_state_display().lower()}" for s in stages
    )
    add_error(errors, "job", f"{doing} only while its stage is open: {states}.")
    return None


def heat_cycle_log(
    *,
    job,
    start: datetime.datetime,
    end: datetime.datetime,
    peak_current_a: object,
    ambient_c: object,
    by,
    notes: str = "",
) -> HeatCycleRun:
    """Log a run: it ended after it started, not in the future, within a day, with a
    sensible peak current and ambient temperature, while the heat-cycle stage is open."""
    require_perm(by, "inspections.add_heatcyclerun", "Only technicians and leads log a run.")
    errors: Errors = {}
    start = parse_moment(start, field="start", what="start of the run", errors=errors)
    end = parse_moment(end, field="end", what="end of the run", errors=errors)
    if start is not None:
        not_in_future(start, field="start", what="start of the run", errors=errors)
    if end is not None:
        not_in_future(end, field="end", what="end of the run", errors=errors)
    if start is not None and end is not None:
        if end <= start:
            add_error(errors, "end", "The run must end after it starts.")
        elif end - start > MAX_RUN:
            hours = (end - start).total_seconds() / 3600
            add_error(
                errors,
                "end",
                f"A run of {hours:.0f} hours is longer than a day; check the dates.",
            )
    peak = parse_decimal(
        peak_current_a, field="peak_current_a", what="peak current", places=1, errors=errors
    )
    _in_range(
        peak, PEAK_CURRENT_A, field="peak_current_a", what="peak current", unit="A", errors=errors
    )
    ambient = parse_decimal(
        ambient_c, field="ambient_c", what="ambient temperature", places=1, errors=errors
    )
    _in_range(
        ambient, AMBIENT_C, field="ambient_c", what="ambient temperature", unit="°C", errors=errors
    )
    notes = clean_text(notes, field="notes", what="notes", limit=MAX_NOTES, errors=errors)
    with transaction.atomic():
        # A return visit's open re-check takes the run for its thermal check (as found):
        # it signs nothing and starts no soak.
        recheck = (
            Stage.objects.filter(job=job, kind=Stage.Kind.RECHECK)
            .filter(state__in=Stage.WORKING_STATES)
            .exists()
        )
        kinds = (Stage.Kind.RECHECK,) if recheck else (Stage.Kind.HEAT_CYCLE,)
        heat = _working_stage(job, kinds, errors, doing="A run is logged")
        check_unlocked(job, errors)
        raise_if(errors)
        run = HeatCycleRun.objects.create(
            job=job,
            started_at=start,
            ended_at=end,
            peak_current_a=peak,
            ambient_c=ambient,
            logged_by=by,
            notes=notes,
            recheck=recheck,
        )
        local_end = timezone.localtime(end)
        audit(
            job=job,
            kind=AuditEvent.Kind.RUN_LOGGED,
            actor=by,
            summary=(
                f"{'Re-check run' if recheck else 'Heat-cycle run'}"
                f" {timezone.localtime(start):%d %b %H:%M}–{local_end:%H:%M},"
                f" peak {format_number(peak, 1)} A, ambient {format_number(ambient, 1)} °C"
            ),
            after={
                "started_at": start.isoformat(),
                "ended_at": end.isoformat(),
                "peak_current_a": str(peak),
                "ambient_c": str(ambient),
                "notes": notes,
            },
            subject=run,
        )
        if not recheck:
            _sign_by_logging(heat, run, by)
    return run


def _sign_by_logging(heat: Stage, run: HeatCycleRun, by) -> None:
    """The run signs the heat-cycle stage and opens the retorque (soak counting)."""
    job = heat.job
    before = set_state(heat, Stage.State.SIGNED)
    audit(
        job=job,
        kind=AuditEvent.Kind.STAGE_SIGNED,
        actor=by,
        summary=f"Heat-cycle run stage signed by logging its run ({person(by)})",
        before={"state": before},
        after={"state": Stage.State.SIGNED, "run": run.pk},
        subject=heat,
    )
    stages = {
        stage.kind: stage
        for stage in Stage.objects.select_for_update(of=("self",))
        .select_related("job")
        .filter(job=job)
    }
    ends = timezone.localtime(soak_ends_at(job))
    open_next(
        stages,
        heat,
        actor=by,
        note=f"; its work begins after the soak, at {ends:%d %b %H:%M}",
        after={"soak_ends_at": ends.isoformat()},
    )
    job_status_sync(job=job)


def thermal_reading_create(
    *,
    run: HeatCycleRun,
    termination: Termination,
    temperature_c: object,
    by,
    client_key: object,
    at: datetime.datetime | None = None,
    note: str = "",
) -> ThermalReading:
    """One connection's temperature after a run, stored once per key. Taken while the
    heat-cycle stage is open, or at retorque (a re-made connection read again)."""
    require_perm(
        by, "inspections.add_thermalreading", "Only technicians and leads take temperatures."
    )
    key = clean_client_key(client_key)
    errors: Errors = {}
    temperature = parse_decimal(
        temperature_c, field="temperature_c", what="temperature", places=1, errors=errors
    )
    _in_range(
        temperature,
        CONNECTION_C,
        field="temperature_c",
        what="temperature",
        unit="°C",
        errors=errors,
    )
    moment = (
        timezone.now() if at is None else parse_moment(at, field="at", what="time", errors=errors)
    )
    note = clean_text(note, field="note", what="note", limit=1000, errors=errors)
    with transaction.atomic():
        run = HeatCycleRun.objects.select_related("job").get(pk=run.pk)
        termination = Termination.objects.select_related("circuit__job").get(pk=termination.pk)
        stored = ThermalReading.objects.filter(client_key=key).first()
        if stored is not None:
            same = (
                stored.run_id == run.pk
                and stored.termination_id == termination.pk
                and stored.temperature_c == temperature
                and stored.taken_by_id == by.pk
            )
            if not same:
                raise ValidationError(
                    {
                        "client_key": "This entry's key was already used for another reading;"
                        " reload the page and enter it again."
                    }
                )
            return stored
        if termination.circuit.job_id != run.job_id:
            add_error(
                errors,
                "termination",
                f"{termination} belongs to job {termination.circuit.job.number},"
                f" not to job {run.job.number}.",
            )
        if moment is not None:
            not_in_future(moment, field="at", what="reading's time", errors=errors)
            if moment < run.started_at:
                add_error(errors, "at", "A temperature after a run is taken after it started.")
        _working_stage(
            run.job,
            (Stage.Kind.RECHECK,) if run.recheck else (Stage.Kind.HEAT_CYCLE, Stage.Kind.RETORQUE),
            errors,
            doing="Temperatures are taken",
        )
        check_unlocked(run.job, errors)
        raise_if(errors)
        reading = ThermalReading(
            run=run,
            termination=termination,
            temperature_c=temperature,
            taken_by=by,
            taken_at=moment,
            note=note,
            client_key=key,
        )
        try:
            with transaction.atomic():
                reading.save()
        except IntegrityError:
            stored = ThermalReading.objects.filter(client_key=key).first()
            if stored is None:
                raise
            return stored
        rise = temperature - run.ambient_c
        audit(
            job=run.job,
            kind=AuditEvent.Kind.THERMAL_READING,
            actor=by,
            summary=(
                f"{termination}: {format_number(temperature, 1)} °C,"
                f" {format_number(rise, 1)} °C over ambient"
            ),
            after={
                "termination": str(termination),
                "temperature_c": str(temperature),
                "ambient_c": str(run.ambient_c),
                "taken_at": moment.isoformat(),
            },
            subject=reading,
        )
    return reading


WAIVE_PERM = "inspections.waive_thermal"
MIN_REASON = 10


def thermal_waive(*, reading: ThermalReading, lead, reason: str) -> ThermalWaiver:
    """A lead accepts a hot connection with a written reason, so it no longer blocks the
    retorque sign-off. Only the connection's latest temperature, only one that blocks,
    only while the retorque is open; a later reading hot again needs its own waiver."""
    require_perm(lead, WAIVE_PERM, "Only a lead waives a hot connection.")
    errors: Errors = {}
    reason = clean_text(reason, field="reason", what="reason", limit=2000, errors=errors)
    if len(reason) < MIN_REASON:
        add_error(
            errors,
            "reason",
            f"Say why the connection is accepted as it is, in at least {MIN_REASON} characters.",
        )
    with transaction.atomic():
        reading = ThermalReading.objects.select_related("run__job", "termination__circuit").get(
            pk=reading.pk
        )
        job = reading.run.job
        check_unlocked(job, errors)
        retorque = (
            Stage.objects.select_for_update(of=("self",))
            .filter(job=job, kind=Stage.Kind.RETORQUE)
            .first()
        )
        if retorque is None or not retorque.accepts_work:
            state = retorque.get_state_display().lower() if retorque else "missing"
            add_error(
                errors,
                "reading",
                f"A hot connection is waived while the retorque is open; it is {state}.",
            )
        existing = thermal_waivers(job).get(reading.pk)
        result = thermal_results(job).get(reading.termination_id)
        if existing is not None:
            add_error(
                errors,
                "reading",
                f"{person(existing.lead)} already waived this reading"
                f" on {timezone.localtime(existing.waived_at):%d %b %Y at %H:%M}.",
            )
        elif result is None or result.reading.pk != reading.pk:
            add_error(
                errors,
                "reading",
                f"{reading.termination} has a later temperature reading; waive that one, if it"
                " still blocks.",
            )
        elif not result.blocks_retorque:
            add_error(
                errors,
                "reading",
                f"{reading.termination} at {format_number(reading.temperature_c, 1)} °C does not"
                " block the retorque; there is nothing to waive.",
            )
        raise_if(errors)
        waiver = ThermalWaiver.objects.create(reading=reading, reason=reason, lead=lead)
        audit(
            job=job,
            kind=AuditEvent.Kind.WAIVER_GRANTED,
            actor=lead,
            summary=(
                f"{reading.termination}: {format_number(reading.temperature_c, 1)} °C"
                f" ({result.thermal_class.label.lower()}) waived by {person(lead)}: {reason}"
            ),
            after={
                "reading": reading.pk,
                "temperature_c": str(reading.temperature_c),
                "class": result.thermal_class.name.lower(),
                "reason": reason,
            },
            subject=waiver,
        )
    return waiver
