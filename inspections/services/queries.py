"""Reads the gates and pages need: the current reading per termination, a stage's
progress, the soak timer, and the thermal results (with the leads' waivers). Nothing
here writes."""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.utils import timezone

from circuits.models import Termination
from inspections import thermal
from inspections.models import HeatCycleRun, Stage, ThermalReading, ThermalWaiver, TorqueRecord
from inspections.services.common import Errors, add_error, plural
from shop.models import ShopProfile


def current_readings(stage: Stage) -> dict[int, TorqueRecord]:
    """termination id -> its current reading at this stage: the latest (by the time it
    was taken) of the readings no correction has superseded. A re-read after an
    out-of-tolerance reading is a new reading and becomes current; a correction takes the
    place of the reading it corrects."""
    records = (
        TorqueRecord.objects.current()
        .filter(stage=stage)
        .select_related("wrench", "technician")
        .order_by("termination_id", "-recorded_at", "-pk")
    )
    current: dict[int, TorqueRecord] = {}
    for record in records:
        current.setdefault(record.termination_id, record)
    return current


@dataclass(frozen=True)
class TorqueProgress:
    total: int
    read: int
    out_of_tolerance: int
    found_loose: int
    show_found_loose: bool
    loose_words: str = "found loose"

    @property
    def complete(self) -> bool:
        """Every termination has a current reading within tolerance."""
        return self.read == self.total and self.out_of_tolerance == 0

    def __str__(self) -> str:
        parts = [
            f"{self.read} of {plural(self.total, 'termination')} read",
            f"{self.out_of_tolerance} out of tolerance",
        ]
        if self.show_found_loose:
            parts.append(f"{self.found_loose} {self.loose_words}")
        return ", ".join(parts)


def torque_progress(stage: Stage) -> TorqueProgress:
    """The stage's progress: "37 of 52 terminations read, 2 out of tolerance, 1 found
    loose".

    Found loose counts terminations with any current reading found loose at this stage,
    not only the latest: a connection found loose is re-torqued and read again, tight
    this time, and the fact that it was loose (the most valuable one in the record) must
    not drop out of the count."""
    ids = set(Termination.objects.filter(circuit__job=stage.job_id).values_list("pk", flat=True))
    current = {pk: r for pk, r in current_readings(stage).items() if pk in ids}
    loose = set(
        TorqueRecord.objects.current()
        .filter(stage=stage, found_loose=True)
        .values_list("termination_id", flat=True)
    )
    if stage.kind == Stage.Kind.RECHECK:
        # As found, below the band is loose again too (the fastener had backed off).
        loose |= {pk for pk, r in current.items() if r.result == TorqueRecord.Result.LOW}
    return TorqueProgress(
        total=len(ids),
        read=len(current),
        out_of_tolerance=sum(1 for r in current.values() if not r.within_tolerance),
        found_loose=len(loose & ids),
        show_found_loose=stage.kind in (Stage.Kind.RETORQUE, Stage.Kind.RECHECK),
        loose_words="found loose again" if stage.kind == Stage.Kind.RECHECK else "found loose",
    )


def latest_run(job) -> HeatCycleRun | None:
    """The latest heat-cycle run (a return visit's re-check run is not one: it signs
    nothing and starts no soak)."""
    return HeatCycleRun.objects.filter(job=job, recheck=False).order_by("-ended_at", "-pk").first()


def recheck_run(job) -> HeatCycleRun | None:
    """The latest run logged for a return visit's re-check thermal check."""
    return HeatCycleRun.objects.filter(job=job, recheck=True).order_by("-ended_at", "-pk").first()


def soak_ends_at(job) -> datetime.datetime | None:
    """When the shop's minimum soak after the latest run is over; None with no run."""
    run = latest_run(job)
    if run is None:
        return None
    return run.ended_at + datetime.timedelta(minutes=ShopProfile.load().soak_minutes)


def check_soak(
    stage: Stage, *, at: datetime.datetime, errors: Errors, field: str = "stage"
) -> None:
    """Retorque work (readings, checklist marks) begins only after the heat-cycle run is
    logged and the shop's soak time has passed since its end; add why not to `errors`."""
    if stage.kind != Stage.Kind.RETORQUE:
        return
    ends = soak_ends_at(stage.job)
    if ends is None:
        add_error(
            errors,
            field,
            "No heat-cycle run is logged yet; the retorque begins after the run and its soak.",
        )
    elif at < ends:
        left = ends - at
        minutes = max(1, -(-int(left.total_seconds()) // 60))  # rounded up: never "0 left"
        add_error(
            errors,
            field,
            f"The soak after the heat-cycle run lasts until"
            f" {timezone.localtime(ends):%d %b %H:%M} ({plural(minutes, 'minute')} left);"
            " retorque work begins after it.",
        )


def soak_remaining(job, *, now: datetime.datetime | None = None) -> datetime.timedelta | None:
    """How long until the retorque may begin: zero once the soak is over, None while no
    run is logged (the soak has not begun)."""
    ends = soak_ends_at(job)
    if ends is None:
        return None
    return max(datetime.timedelta(0), ends - (now or timezone.now()))


@dataclass(frozen=True)
class ThermalResult:
    reading: ThermalReading
    assessment: thermal.Assessment

    @property
    def thermal_class(self) -> thermal.ThermalClass:
        return self.assessment.thermal_class

    @property
    def blocks_retorque(self) -> bool:
        return self.assessment.blocks_retorque


def _device_of(termination: Termination) -> int:
    circuit = termination.circuit
    return (
        circuit.from_device_id if termination.end == Termination.End.FROM else circuit.to_device_id
    )


def thermal_results(job, *, recheck: bool = False) -> dict[int, ThermalResult]:
    """termination id -> its latest temperature reading, classed against its run's
    ambient and the other connections on the same device read on that run under similar
    load (inspections.thermal). The heat-cycle runs' readings, or with `recheck` those of
    a return visit's re-check runs (as found, kept apart: they neither block the
    retorque nor count as read cooler after re-making)."""
    readings = (
        ThermalReading.objects.filter(run__job=job, run__recheck=recheck)
        .select_related("run", "termination__circuit", "taken_by")  # the record names the taker
        .order_by("taken_at", "pk")
    )
    per_run: dict[int, dict[int, ThermalReading]] = {}
    latest: dict[int, ThermalReading] = {}
    for reading in readings:
        per_run.setdefault(reading.run_id, {})[reading.termination_id] = reading
        latest[reading.termination_id] = reading
    assessed: dict[tuple[int, int], thermal.Assessment] = {}
    for run_id, by_termination in per_run.items():
        run = next(iter(by_termination.values())).run
        connections = [
            thermal.Connection(
                key=termination_id,
                group=_device_of(r.termination),
                load_a=float(r.termination.circuit.design_current_a),
                temperature_c=float(r.temperature_c),
            )
            for termination_id, r in by_termination.items()
        ]
        for termination_id, assessment in thermal.assess_run(
            float(run.ambient_c), connections
        ).items():
            assessed[(run_id, termination_id)] = assessment
    return {
        termination_id: ThermalResult(reading, assessed[(reading.run_id, termination_id)])
        for termination_id, reading in latest.items()
    }


def thermal_blocking(job) -> list[ThermalResult]:
    """Connections whose latest temperature is a probable deficiency or worse (waived or
    not: see thermal_unwaived for what still blocks the retorque sign-off)."""
    return [result for result in thermal_results(job).values() if result.blocks_retorque]


def thermal_waivers(job) -> dict[int, ThermalWaiver]:
    """thermal reading id -> the lead's waiver of it."""
    return {
        waiver.reading_id: waiver
        for waiver in ThermalWaiver.objects.filter(reading__run__job=job).select_related("lead")
    }


def thermal_unwaived(job) -> list[ThermalResult]:
    """Hot connections that block the retorque sign-off: latest temperature a probable
    deficiency or worse, and no lead's waiver of that very reading."""
    waived = thermal_waivers(job)
    return [result for result in thermal_blocking(job) if result.reading.pk not in waived]
