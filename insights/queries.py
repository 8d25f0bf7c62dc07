"""The insight pages' aggregates, computed in the database: one grouped query per
breakdown (annotate / values().annotate()), never a Python loop over readings.

Medians and quartiles: PostgreSQL has percentile_cont; SQLite has no percentile
aggregate, so every SQLite connection is given one (register_sqlite_percentile, from
InsightsConfig.ready), the way Django itself gives SQLite its STDDEV and VARIANCE. It
runs inside the query and computes the same value as percentile_cont (insights.stats).

Which readings count (the same rules as the stage pages, inspections.services.queries):
a reading is *current* when no correction superseded it; a termination's current
reading at a stage is the latest current one. One *retorque* is one termination's
current retorque reading; it is *found loose* when any current retorque reading of that
termination was recorded found loose (a loose connection is tightened and read again,
and the fact that it was loose must not drop out); its *change* is that reading minus
the termination's current first-install reading, in N·m and in percent of the spec.
"""

from __future__ import annotations

import datetime
from dataclasses import dataclass

from django.db import NotSupportedError
from django.db.models import (
    Aggregate,
    Case,
    CharField,
    Count,
    Exists,
    ExpressionWrapper,
    F,
    FloatField,
    Min,
    OuterRef,
    Q,
    QuerySet,
    Subquery,
    When,
    Window,
)
from django.db.models.functions import RowNumber

from circuits.models import Termination
from insights import stats
from inspections.models import Stage, TorqueRecord

# --- a percentile aggregate for both databases --------------------------------------------

SQLITE_PERCENTILE = "AMPWRIGHT_PERCENTILE"


class _SqlitePercentile:
    """SQLite aggregate: collects the group's values and gives their percentile."""

    def __init__(self) -> None:
        self.values: list[float] = []
        self.fraction = 0.5

    def step(self, value, fraction) -> None:
        if value is not None:
            self.values.append(float(value))
            self.fraction = float(fraction)

    def finalize(self):
        return stats.percentile(self.values, self.fraction)


def register_sqlite_percentile(sender, connection, **kwargs) -> None:
    if connection.vendor == "sqlite":
        connection.connection.create_aggregate(SQLITE_PERCENTILE, 2, _SqlitePercentile)


class Percentile(Aggregate):
    """The `fraction` percentile of an expression over the group, by linear
    interpolation (percentile_cont); NULLs are left out."""

    name = "Percentile"
    output_field = FloatField()

    def __init__(self, expression, fraction: float, *, filter=None, **extra) -> None:
        if not 0 <= float(fraction) <= 1:
            raise ValueError("fraction must be from 0 to 1")
        self.fraction = float(fraction)
        if filter is not None:
            # Left out as NULL (CASE without ELSE) rather than by a FILTER clause: the
            # same SQL on both databases, and NULLs never count.
            expression = Case(When(filter, then=expression), output_field=FloatField())
        super().__init__(expression, **extra)

    def as_sql(self, compiler, connection, **extra_context):
        raise NotSupportedError("Percentile runs on PostgreSQL and SQLite only.")

    def as_postgresql(self, compiler, connection, **extra_context):
        template = f"PERCENTILE_CONT({self.fraction!r}) WITHIN GROUP (ORDER BY %(expressions)s)"
        return super().as_sql(compiler, connection, template=template, **extra_context)

    def as_sqlite(self, compiler, connection, **extra_context):
        template = f"{SQLITE_PERCENTILE}(%(expressions)s, {self.fraction!r})"
        return super().as_sql(compiler, connection, template=template, **extra_context)


# --- the period ---------------------------------------------------------------------------


@dataclass(frozen=True)
class Period:
    """From the start of `start` to the end of `end` (local dates, both included)."""

    start: datetime.date
    end: datetime.date

    def q(self, field: str = "recorded_at") -> Q:
        return Q(**{f"{field}__date__gte": self.start, f"{field}__date__lte": self.end})


# --- building blocks ----------------------------------------------------------------------


def _pct(value: str, spec: str = "spec_nm") -> ExpressionWrapper:
    return ExpressionWrapper((F(value) - F(spec)) * 100.0 / F(spec), output_field=FloatField())


DEVIATION_PCT = _pct("value_nm")  # a reading's deviation from its spec, in percent


def device_side(field: str, prefix: str = "termination__") -> Case:
    """The reading's device's `field` (a termination sits on its circuit's from device
    at the from end, on its to device at the to end)."""
    return Case(
        When(
            **{f"{prefix}end": Termination.End.FROM},
            then=F(f"{prefix}circuit__from_device__{field}"),
        ),
        default=F(f"{prefix}circuit__to_device__{field}"),
        output_field=CharField(),
    )


def _latest_current_pk() -> Subquery:
    """The pk of the latest current reading of the same termination at the same stage
    (served by the index on stage, termination, recorded_at)."""
    return Subquery(
        TorqueRecord.objects.current()
        .filter(stage=OuterRef("stage"), termination=OuterRef("termination"))
        .order_by("-recorded_at", "-pk")
        .values("pk")[:1]
    )


def _install_current(field: str) -> Subquery:
    return Subquery(
        TorqueRecord.objects.current()
        .filter(termination=OuterRef("termination"), stage__kind=Stage.Kind.FIRST_INSTALL)
        .order_by("-recorded_at", "-pk")
        .values(field)[:1]
    )


def retorques(period: Period) -> QuerySet:
    """One row per retorqued termination whose current retorque reading was taken in
    `period`: found_loose_any, install_nm, change_nm, change_pct, installer."""
    loose = TorqueRecord.objects.current().filter(
        stage=OuterRef("stage"), termination=OuterRef("termination"), found_loose=True
    )
    return (
        TorqueRecord.objects.current()
        .filter(period.q(), stage__kind=Stage.Kind.RETORQUE)
        .annotate(latest_pk=_latest_current_pk())
        .filter(pk=F("latest_pk"))
        .annotate(
            loose_any=Exists(loose),
            install_nm=_install_current("value_nm"),
            installer=_install_current("technician"),
        )
        .annotate(
            change_nm=ExpressionWrapper(F("value_nm") - F("install_nm"), output_field=FloatField()),
            change_pct=ExpressionWrapper(
                (F("value_nm") - F("install_nm")) * 100.0 / F("spec_nm"), output_field=FloatField()
            ),
        )
    )


# --- loosening ----------------------------------------------------------------------------

# Breakdown name -> (heading, the expression grouped by).
BREAKDOWNS: dict[str, tuple[str, object]] = {
    "termination_kind": ("Termination kind", F("termination__kind")),
    "stud_size": ("Stud size", F("termination__stud_size")),
    "device_kind": ("Device kind", device_side("kind")),
    "conductor_size": ("Conductor size (as written)", F("termination__circuit__conductor_size")),
    "mounting": ("Mounting body", device_side("mounting")),
}


def loosening(period: Period, breakdown: str) -> list[dict]:
    """Per group of `breakdown`: key, n, loose, median_nm, median_pct."""
    _heading, expression = BREAKDOWNS[breakdown]
    return list(
        retorques(period)
        .annotate(key=expression)
        .values("key")
        .annotate(
            n=Count("pk"),
            loose=Count("pk", filter=Q(loose_any=True)),
            median_nm=Percentile("change_nm", 0.5),
            median_pct=Percentile("change_pct", 0.5),
        )
        .order_by("key")
    )


# --- wrenches -----------------------------------------------------------------------------


def wrench_figures(period: Period) -> list[dict]:
    """Per wrench with readings in `period`: n_all (every reading, corrections too),
    corrected (readings a correction later superseded), n (current readings), and the
    quartiles of the current readings' deviation from spec in percent (q1, median, q3)."""
    current = Q(superseded_by__isnull=True)
    return list(
        TorqueRecord.objects.filter(period.q())
        .values("wrench")
        .annotate(
            n_all=Count("pk"),
            corrected=Count("pk", filter=Q(superseded_by__isnull=False)),
            n=Count("pk", filter=current),
            q1=Percentile(DEVIATION_PCT, 0.25, filter=current),
            median=Percentile(DEVIATION_PCT, 0.5, filter=current),
            q3=Percentile(DEVIATION_PCT, 0.75, filter=current),
        )
        .order_by("wrench")
    )


def wrench_windows(until: datetime.date, last: int) -> list[dict]:
    """Per wrench and termination kind: its `last` current readings up to `until`:
    n, since (the first of them) and their median deviation in percent."""
    ranked = (
        TorqueRecord.objects.current()
        .filter(recorded_at__date__lte=until)
        .annotate(
            rank=Window(
                RowNumber(),
                partition_by=[F("wrench"), F("termination__kind")],
                order_by=[F("recorded_at").desc(), F("pk").desc()],
            )
        )
        .filter(rank__lte=last)
        .values("pk")
    )
    return list(
        TorqueRecord.objects.filter(pk__in=Subquery(ranked))
        .values("wrench", kind=F("termination__kind"))
        .annotate(n=Count("pk"), since=Min("recorded_at"), median=Percentile(DEVIATION_PCT, 0.5))
        .order_by("wrench", "kind")
    )


def others_medians(kind: str, windows: list[dict], until: datetime.date) -> dict[int, dict]:
    """For each window on termination `kind` (of wrench_windows): the other wrenches'
    current readings on that kind over the same time (from the window's first reading
    to `until`): n and median deviation. One query for all the wrenches of the kind."""
    if not windows:
        return {}
    aggregates = {}
    for window in windows:
        others = ~Q(wrench=window["wrench"]) & Q(recorded_at__gte=window["since"])
        aggregates[f"n_{window['wrench']}"] = Count("pk", filter=others)
        aggregates[f"m_{window['wrench']}"] = Percentile(DEVIATION_PCT, 0.5, filter=others)
    figures = (
        TorqueRecord.objects.current()
        .filter(
            termination__kind=kind,
            recorded_at__gte=min(w["since"] for w in windows),
            recorded_at__date__lte=until,
        )
        .aggregate(**aggregates)
    )
    return {
        w["wrench"]: {"n": figures[f"n_{w['wrench']}"], "median": figures[f"m_{w['wrench']}"]}
        for w in windows
    }


# --- technicians --------------------------------------------------------------------------


def first_readings(period: Period) -> dict[int, dict]:
    """Per technician: of the first readings taken on a termination at a stage (the
    earliest reading there, before any re-read or correction), how many were within
    tolerance: {technician id: {n, within}}."""
    first_pk = Subquery(
        # No filter on supersedes here: a correction keeps the time of the reading it
        # corrects and is written after it (a larger pk), so the first by time and pk is
        # always an original; and a filter on it would steer SQLite to the supersedes
        # index (nearly every row is NULL there) instead of the stage index.
        TorqueRecord.objects.filter(stage=OuterRef("stage"), termination=OuterRef("termination"))
        .order_by("recorded_at", "pk")
        .values("pk")[:1]
    )
    rows = (
        TorqueRecord.objects.filter(period.q(), supersedes__isnull=True)
        .annotate(first_pk=first_pk)
        .filter(pk=F("first_pk"))
        .values("technician")
        .annotate(n=Count("pk"), within=Count("pk", filter=Q(result=TorqueRecord.Result.WITHIN)))
        .order_by()
    )
    return {row["technician"]: row for row in rows}


def loose_by_installer(period: Period) -> dict[int, dict]:
    """Per technician who took the current first-install reading: of those retorqued in
    `period`, how many were found loose: {technician id: {n, loose}}."""
    rows = (
        retorques(period)
        .filter(installer__isnull=False)
        .values("installer")
        .annotate(n=Count("pk"), loose=Count("pk", filter=Q(loose_any=True)))
        .order_by()
    )
    return {row["installer"]: row for row in rows}
