"""The insight pages' aggregates, computed in the database: grouped queries
(annotate / values().annotate(), window functions), never a Python loop over readings.

The loosening figures (and found loose per installer) come from one statement per
request: a pass of window functions over the current first-install and retorque
readings reduces them to one row per retorqued termination, made once in a common
table expression and grouped there for every breakdown (see _retorqued_groups; the ORM
writes its inner queries, the grouping over them is written by hand because the ORM
cannot select from a common table expression). Periods compare the stored times with
the first instants of local days (Period.q), which indexes and plain comparisons serve.

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

from django.db import NotSupportedError, connection
from django.db.models import (
    Aggregate,
    Case,
    CharField,
    Count,
    ExpressionWrapper,
    F,
    FloatField,
    Max,
    Min,
    Q,
    QuerySet,
    Subquery,
    Value,
    When,
    Window,
)
from django.db.models.functions import RowNumber
from django.utils import timezone

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
        """From the first instant of `start` up to, not including, the first instant of
        the day after `end`, in the current time zone: the same readings as comparing
        the local date (`__date`), but a plain comparison of the stored values (SQLite
        otherwise converts every row's time to a local date in a Python function,
        about half a second for 50,000 readings)."""
        return Q(**{f"{field}__gte": first_instant(self.start)}) & up_to(self.end, field)


def first_instant(day: datetime.date) -> datetime.datetime:
    """The first instant of local `day` in the current time zone. fold=0: a midnight
    skipped by a change to summer time becomes the instant of the change, the first
    one of that day. (Comparing with it differs from comparing local dates only
    where a clock steps back across midnight, so that a date comes round twice: in
    the time zone database from 2000 to 2037, once, at one Antarctic station in 2010.)"""
    zone = timezone.get_current_timezone()
    return timezone.make_aware(datetime.datetime.combine(day, datetime.time()), zone)


def up_to(day: datetime.date, field: str = "recorded_at") -> Q:
    """Up to the end of local `day` (as `field__date__lte=day`)."""
    return Q(**{f"{field}__lt": first_instant(day + datetime.timedelta(days=1))})


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


# --- one row per retorqued termination ----------------------------------------------------

# Breakdown name -> (heading, the expression grouped by, on Termination).
BREAKDOWNS: dict[str, tuple[str, object]] = {
    "termination_kind": ("Termination kind", F("kind")),
    "stud_size": ("Stud size", F("stud_size")),
    "device_kind": ("Device kind", device_side("kind", prefix="")),
    "conductor_size": ("Conductor size (as written)", F("circuit__conductor_size")),
    "mounting": ("Mounting body", device_side("mounting", prefix="")),
}


def _windowed(period: Period) -> QuerySet:
    """Every current first-install and retorque reading, narrow, with two window
    columns computed over the readings of its termination at its stage (one pass, no
    correlated subquery per reading):

    nth        1 for the latest current reading of its termination at its stage;
    loose_any  1 when any current reading of its termination at its stage was
               recorded found loose;

    and is_retorque, in_period, and the reading's pk, time, termination, value, spec
    and technician. The windows are computed over all of these readings before
    anything is filtered by period or stage, so a termination's latest reading is the
    latest one whether or not the period includes it (as the stage pages count). The
    rows are kept narrow (the breakdowns' keys are joined on after the reduction):
    sorting wide rows for the windows costs more than the windows themselves."""
    at_stage = [F("stage"), F("termination")]
    columns = {
        "nth": Window(
            RowNumber(), partition_by=at_stage, order_by=[F("recorded_at").desc(), F("pk").desc()]
        ),
        "loose_any": Window(
            Max(Case(When(found_loose=True, then=Value(1)), default=Value(0))),
            partition_by=at_stage,
        ),
        "is_retorque": Case(When(stage__kind=Stage.Kind.RETORQUE, then=Value(1)), default=Value(0)),
        "in_period": Case(When(period.q(), then=Value(1)), default=Value(0)),
        "r_pk": F("pk"),
        "r_at": F("recorded_at"),
        "r_termination": F("termination"),
        "r_value_nm": F("value_nm"),
        "r_spec_nm": F("spec_nm"),
        "r_technician": F("technician"),
    }
    return (
        TorqueRecord.objects.current()
        .filter(stage__kind__in=[Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE])
        .annotate(**columns)
        .values(*columns)
        .order_by()
    )


def _keys() -> QuerySet:
    """Every termination's pk (t_pk) and its key for each breakdown (k_<name>)."""
    columns = {f"k_{name}": expression for name, (_h, expression) in BREAKDOWNS.items()}
    return Termination.objects.annotate(t_pk=F("pk"), **columns).values("t_pk", *columns).order_by()


def _percentile_sql(column: str, fraction: float) -> str:
    """Percentile's SQL for a column of the statement below (written by hand there,
    as the ORM cannot group over a common table expression)."""
    if connection.vendor == "postgresql":
        return f"PERCENTILE_CONT({fraction!r}) WITHIN GROUP (ORDER BY {column})"
    if connection.vendor == "sqlite":
        return f"{SQLITE_PERCENTILE}({column}, {fraction!r})"
    raise NotSupportedError("Percentile runs on PostgreSQL and SQLite only.")


def _retorqued_groups(period: Period, groups: dict[str, str]) -> dict[str, list[dict]]:
    """One statement: the readings of _windowed reduced to one row per retorqued
    termination (its latest current retorque reading, taken in `period`) with its
    change since its install reading (the termination's latest current first-install
    reading, whenever taken; NULL when it has none, and then left out of the medians
    but counted in n), the technician who took that one (installer), and the keys of
    _keys; then grouped by each column of `groups` (name -> column):
    {name: [{key, n, loose, median_nm, median_pct}]}.

    The ORM writes the two inner queries (joins, time zone, quoting); the grouping
    over them is written here, as the ORM cannot select from a common table
    expression. The reduced rows are made once and grouped five times, not rebuilt
    per breakdown. Column names in it come from this module, never from a request."""
    readings, readings_params = _windowed(period).query.sql_with_params()
    keys, keys_params = _keys().query.sql_with_params()
    median_nm, median_pct = _percentile_sql("change_nm", 0.5), _percentile_sql("change_pct", 0.5)
    names = list(groups)
    parts = [
        f"SELECT {i} AS part, {column} AS group_key, COUNT(*) AS n, SUM(loose_any) AS loose,"
        f" {median_nm} AS median_nm, {median_pct} AS median_pct"
        f" FROM retorqued GROUP BY {column}"
        for i, column in enumerate(groups.values())
    ]
    sql = (
        f"WITH readings AS ({readings}), terminations AS ({keys}),"
        # The latest current reading of each termination at each stage, with the
        # termination's install reading: the latest of those at a first-install stage,
        # first when they are ordered install first, latest first (a window over these
        # rows, not a join: no plan can turn it into a loop over rows).
        " latest AS (SELECT *,"
        " FIRST_VALUE(CASE WHEN is_retorque = 0 THEN r_value_nm END) OVER install AS install_nm,"
        " FIRST_VALUE(CASE WHEN is_retorque = 0 THEN r_technician END) OVER install AS installer"
        " FROM readings WHERE nth = 1"
        " WINDOW install AS"
        " (PARTITION BY r_termination ORDER BY is_retorque, r_at DESC, r_pk DESC)),"
        " retorqued AS (SELECT terminations.*, loose_any, installer,"
        " r_value_nm - install_nm AS change_nm,"
        " (r_value_nm - install_nm) * 100.0 / r_spec_nm AS change_pct"
        " FROM latest INNER JOIN terminations ON t_pk = r_termination"
        " WHERE is_retorque = 1 AND in_period = 1) "
        + " UNION ALL ".join(parts)
        + " ORDER BY part, group_key"
    )
    result: dict[str, list[dict]] = {name: [] for name in names}
    with connection.cursor() as cursor:
        cursor.execute(sql, (*readings_params, *keys_params))
        for part, key, n, loose, m_nm, m_pct in cursor.fetchall():
            result[names[part]].append(
                {"key": key, "n": n, "loose": loose, "median_nm": m_nm, "median_pct": m_pct}
            )
    return result


# --- loosening ----------------------------------------------------------------------------


def loosening_all(period: Period, breakdowns: list[str] | None = None) -> dict[str, list[dict]]:
    """Per breakdown (all of BREAKDOWNS unless named), per group: key, n, loose,
    median_nm, median_pct; in one statement."""
    names = list(BREAKDOWNS) if breakdowns is None else breakdowns
    unknown = set(names) - set(BREAKDOWNS)
    if unknown:
        # The names become column names of the statement: only the known ones.
        raise KeyError(f"no such breakdown: {', '.join(sorted(unknown))}")
    return _retorqued_groups(period, {name: f"k_{name}" for name in names})


def loosening(period: Period, breakdown: str) -> list[dict]:
    """Per group of `breakdown`: key, n, loose, median_nm, median_pct."""
    return loosening_all(period, [breakdown])[breakdown]


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
        .filter(up_to(until))
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
            up_to(until),
            termination__kind=kind,
            recorded_at__gte=min(w["since"] for w in windows),
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
    tolerance: {technician id: {n, within}}.

    Ranked by a window over every reading (corrections too, and outside the period:
    a correction keeps the time of the reading it corrects and is written after it,
    a larger pk, so the first by time and pk is always an original), then counted over
    that one pass in the same statement. Not `pk IN (ranked)`: without fresh table
    statistics PostgreSQL ran that as a loop over every pair of readings."""
    ranked = (
        TorqueRecord.objects.annotate(
            nth=Window(
                RowNumber(),
                partition_by=[F("stage"), F("termination")],
                order_by=[F("recorded_at").asc(), F("pk").asc()],
            ),
            counted=Case(
                When(period.q(), supersedes__isnull=True, then=Value(1)), default=Value(0)
            ),
            within=Case(When(result=TorqueRecord.Result.WITHIN, then=Value(1)), default=Value(0)),
            r_technician=F("technician"),
        )
        .values("nth", "counted", "within", "r_technician")
        .order_by()
    )
    inner, params = ranked.query.sql_with_params()
    sql = (
        f"WITH ranked AS ({inner}) SELECT r_technician, COUNT(*), SUM(within) FROM ranked"
        " WHERE nth = 1 AND counted = 1 GROUP BY r_technician"
    )
    with connection.cursor() as cursor:
        cursor.execute(sql, params)
        rows = cursor.fetchall()
    return {tech: {"technician": tech, "n": n, "within": within} for tech, n, within in rows}


def loose_by_installer(period: Period) -> dict[int, dict]:
    """Per technician who took the current first-install reading: of those retorqued in
    `period`, how many were found loose: {technician id: {n, loose}}."""
    (rows,) = _retorqued_groups(period, {"installer": "installer"}).values()
    return {
        row["key"]: {"installer": row["key"], "n": row["n"], "loose": row["loose"]}
        for row in rows
        if row["key"] is not None
    }
