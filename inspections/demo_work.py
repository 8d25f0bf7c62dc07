"""The demo's hands: a technician's readings, checklist marks, temperatures and
signatures on one demo job, each written through the inspections services (never to the
models directly), at times in the past where a service takes a time.

Values are made up but plausible: a reading lands a few per cent either side of its spec,
in the unit of the wrench that took it (so the record mixes N·m and lbf·in); each entry
carries a key derived from the job, so a resend of the same entry stores nothing twice.
"""

from __future__ import annotations

import base64
import datetime
import io
import math
import random
from decimal import Decimal

from django.utils import timezone
from PIL import Image, ImageDraw

from circuits.models import Circuit, Termination
from inspections.models import Stage, TorqueRecord, TorqueWrench
from inspections.services import (
    checklist_item_mark,
    checklist_items_for,
    stage_sign,
    thermal_reading_create,
    torque_record_correct,
    torque_record_create,
)
from inspections.units import from_nm, to_nm

# How far a demo reading strays from its spec: inside the shop's default ±10 % band with
# room to spare, as a wrench set to the spec clicks (our choice for realistic-looking data).
SCATTER = (-0.04, 0.05)


def signature_png(seed: int, *, width: int = 480, height: int = 160) -> str:
    """A drawn-looking signature as the signing pad sends it (a PNG data URL): a looping
    pen line with a slant and an underline flourish, different for each seed."""
    rng = random.Random(seed)
    image = Image.new("RGBA", (width, height), (255, 255, 255, 0))
    draw = ImageDraw.Draw(image)
    loops = rng.randint(5, 8)
    points = []
    for step in range(181):
        t = step / 180
        x = 30 + t * (width - 80) + 14 * math.sin(t * loops * 2 * math.pi + 1.3)
        y = (
            height * 0.5
            - 34 * math.sin(t * loops * 2 * math.pi) * (0.6 + 0.4 * math.sin(t * 3.1 + seed))
            - 18 * t
        )
        points.append((x, y))
    draw.line(points, fill=(20, 24, 40, 255), width=3, joint="curve")
    y0 = height * 0.78
    draw.line(
        [(40, y0 + 6), (width * 0.45, y0 - 4), (width - 50, y0 + 2)],
        fill=(20, 24, 40, 255),
        width=2,
    )
    buffer = io.BytesIO()
    image.save(buffer, format="PNG")
    return "data:image/png;base64," + base64.b64encode(buffer.getvalue()).decode("ascii")


def terminations_of(job) -> list[Termination]:
    """The job's terminations in the order a technician walks them: by circuit tag."""
    return list(
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit", "terminal__device")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )


def _no_bulkhead(circuit: Circuit) -> bool:
    """Runs that stay inside one box or cabinet pass no bulkhead (the chafe item does
    not apply): battery interconnects and runs under a metre."""
    return circuit.role == Circuit.Role.BATTERY_INTERCONNECT or circuit.length_m < 1.0


class Work:
    """One demo job's work, with its own repeatable random numbers and entry keys."""

    def __init__(self, job, *, wrenches: list[TorqueWrench], seed: int) -> None:
        self.job = job
        self.wrenches = wrenches
        self.rng = random.Random(seed)
        self.seed = seed
        self._n = 0

    def key(self, what: str) -> str:
        self._n += 1
        return f"demo-{self.job.number}-{what}-{self._n}"

    def stage(self, kind: int) -> Stage:
        return Stage.objects.select_related("job").get(job=self.job, kind=kind)

    def wrench_for(self, spec_nm: float, unit: str = "N*m") -> TorqueWrench:
        """An in-service, calibrated wrench whose range covers the spec's band, one that
        reads in the spec's own unit first (as a technician would reach for)."""
        today = timezone.localdate()
        for wrench in sorted(self.wrenches, key=lambda w: w.unit != unit):
            low, high = wrench.range_nm()
            if (
                wrench.in_service
                and not wrench.days_overdue(today)
                and low <= spec_nm * 0.85
                and spec_nm * 1.15 <= high
            ):
                return wrench
        raise LookupError(f"No demo wrench reads {spec_nm:.2f} N·m")

    def value(self, termination: Termination, wrench: TorqueWrench, factor: float) -> Decimal:
        """The spec times `factor`, in the wrench's unit, rounded as its scale reads."""
        spec_nm = to_nm(termination.torque_value, termination.torque_unit)
        places = Decimal("1") if wrench.unit == "lbf*in" else Decimal("0.1")
        return Decimal(str(from_nm(spec_nm * factor, wrench.unit))).quantize(places)

    def read(
        self,
        termination: Termination,
        stage: Stage,
        *,
        by,
        at: datetime.datetime,
        factor: float | None = None,
        found_loose: bool = False,
        note: str = "",
    ) -> TorqueRecord:
        spec_nm = to_nm(termination.torque_value, termination.torque_unit)
        wrench = self.wrench_for(spec_nm, termination.torque_unit)
        if factor is None:
            factor = 1 + self.rng.uniform(*SCATTER)
        return torque_record_create(
            termination=termination,
            stage=stage,
            value=self.value(termination, wrench, factor),
            unit=wrench.unit,
            wrench=wrench,
            technician=by,
            found_loose=found_loose,
            note=note,
            client_key=self.key("torque"),
            at=at,
        )

    def correct(self, record: TorqueRecord, *, value: str, by, reason: str) -> TorqueRecord:
        return torque_record_correct(
            record=record,
            value=value,
            unit=record.unit,
            wrench=record.wrench,
            technician=by,
            reason=reason,
            client_key=self.key("correction"),
        )

    def read_all(
        self, stage: Stage, *, by, start: datetime.datetime, every_min: float = 3.0
    ) -> datetime.datetime:
        """Read every termination not yet read at `stage`, a few minutes apart from
        `start`; returns the time after the last one."""
        done = set(
            TorqueRecord.objects.current()
            .filter(stage=stage)
            .values_list("termination_id", flat=True)
        )
        at = start
        for termination in terminations_of(self.job):
            if termination.pk in done:
                continue
            self.read(termination, stage, by=by, at=at)
            at += datetime.timedelta(minutes=every_min * self.rng.uniform(0.6, 1.4))
        return at

    def mark(self, stage: Stage, item, *, by, result: str = "pass", note: str = "") -> None:
        checklist_item_mark(
            stage=stage,
            item_key=item.key,
            result=result,
            note=note,
            by=by,
            client_key=self.key("mark"),
        )

    def mark_all(self, stage: Stage, *, by, share: float = 1.0) -> None:
        """Mark the hand-marked items not yet marked (the first `share` of them): pass,
        or not applicable with the reason where the run passes no bulkhead."""
        items = [i for i in checklist_items_for(stage=stage) if not i.derived and not i.marked]
        for item in items[: round(len(items) * share)]:
            if item.kind == "chafe" and item.circuit is not None and _no_bulkhead(item.circuit):
                self.mark(
                    stage,
                    item,
                    by=by,
                    result="na",
                    note="Run stays inside one box; it passes no bulkhead.",
                )
            else:
                self.mark(stage, item, by=by)

    def sign(self, stage: Stage, *, by, password: str):
        return stage_sign(
            stage=stage, user=by, password=password, signature_png=signature_png(by.pk + self.seed)
        )

    def temperature(self, run, termination: Termination, celsius: str, *, by, at, note=""):
        return thermal_reading_create(
            run=run,
            termination=termination,
            temperature_c=celsius,
            by=by,
            client_key=self.key("thermal"),
            at=at,
            note=note,
        )
