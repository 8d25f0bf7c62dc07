"""Wrenches: per torque wrench, how its readings sit against spec, how often they were
corrected, its calibration date, and a flag when it drifts away from the other wrenches
on the same kind of termination. Leads and office."""

from __future__ import annotations

from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.urls import path
from django.utils import timezone
from django.views.decorators.http import require_GET

from circuits.models import TerminationKind
from insights import queries
from insights.charts import ChartRow, chart
from insights.stats import wilson
from insights.views.common import csv_response, page, period_form, wants_csv
from inspections.models import TorqueWrench
from inspections.services.calibration import AS_FOUND_LIMIT_PCT, calibration_history
from shop.views.access import require_perm

VIEW_PERM = "insights.view_insights"
# The drift check (said in the page's text): the wrench's last DRIFT_LAST current
# readings on a termination kind, against the other wrenches' readings on that kind
# since the first of them; flagged when both sides have DRIFT_MIN readings and the two
# medians differ by more than DRIFT_POINTS percentage points of spec (half of the
# shop's usual ±10 % tolerance: a shop choice, not a standard).
DRIFT_LAST = 30
DRIFT_MIN = 10
DRIFT_POINTS = 5.0


def _drift(until) -> dict[int, list[dict]]:
    """wrench id -> its windows per termination kind, each with the others' median and
    whether it is flagged."""
    windows = queries.wrench_windows(until, DRIFT_LAST)
    by_kind: dict[str, list[dict]] = {}
    for window in windows:
        by_kind.setdefault(window["kind"], []).append(window)
    result: dict[int, list[dict]] = {}
    kinds = dict(TerminationKind.choices)
    for kind, group in by_kind.items():
        others = queries.others_medians(kind, group, until)
        for window in group:
            other = others[window["wrench"]]
            gap = (
                None
                if window["median"] is None or other["median"] is None
                else window["median"] - other["median"]
            )
            flagged = (
                gap is not None
                and window["n"] >= DRIFT_MIN
                and other["n"] >= DRIFT_MIN
                and abs(gap) > DRIFT_POINTS
            )
            result.setdefault(window["wrench"], []).append(
                {
                    **window,
                    "label": kinds.get(kind, kind),
                    "others_n": other["n"],
                    "others_median": other["median"],
                    "gap": gap,
                    "flagged": flagged,
                }
            )
    return result


def _rows(period) -> list[dict]:
    figures = {row["wrench"]: row for row in queries.wrench_figures(period)}
    drift = _drift(period.end)
    today = timezone.localdate()
    rows = []
    for wrench in TorqueWrench.objects.all():
        row = figures.get(wrench.pk)
        if row is None and not wrench.in_service:
            continue
        row = row or {"n_all": 0, "corrected": 0, "n": 0, "q1": None, "median": None, "q3": None}
        kinds = drift.get(wrench.pk, [])
        rows.append(
            {
                **row,
                "wrench": wrench,
                "corrections": wilson(row["corrected"], row["n_all"]),
                "due_in": (wrench.calibration_due - today).days,
                "kinds": kinds,
                "flagged": any(k["flagged"] for k in kinds),
                "calibrations": calibration_history(wrench),
            }
        )
    # Flagged wrenches first (they want calibrating early), then by shop id.
    rows.sort(key=lambda r: (not r["flagged"], r["wrench"].code))
    return rows


def _chart(rows: list[dict]):
    return chart(
        [
            ChartRow(
                r["wrench"].code,
                r["median"],
                r["q1"],
                r["q3"],
                f"n = {r['n']}",
                flagged=r["flagged"],
            )
            for r in rows
        ],
        title="Deviation from spec per wrench",
        desc=(
            "For each wrench, the median deviation of its current readings from their spec in"
            " percent, as a point, with the middle half of its readings (quartiles) as a line;"
            " a triangle marks a wrench flagged for early calibration."
        ),
        unit=" %",
        bars=False,
    )


def _csv(period, rows: list[dict]) -> HttpResponse:
    header = [
        "wrench",
        "description",
        "calibration due",
        "readings",
        "current readings",
        "median deviation %",
        "lower quartile %",
        "upper quartile %",
        "corrected",
        "corrected %",
        "flagged for early calibration",
        "drift detail",
    ]
    lines = [
        [
            r["wrench"].code,
            r["wrench"].description,
            r["wrench"].calibration_due.isoformat(),
            r["n_all"],
            r["n"],
            r["median"],
            r["q1"],
            r["q3"],
            r["corrected"],
            r["corrections"].pct,
            "yes" if r["flagged"] else "no",
            "; ".join(
                f"{k['label']}: {k['median']:.1f} % over its last {k['n']} vs others"
                f" {k['others_median']:.1f} % (n {k['others_n']})"
                for k in r["kinds"]
                if k["median"] is not None and k["others_median"] is not None
            ),
        ]
        for r in rows
    ]
    return csv_response(f"wrenches-{period.start}-{period.end}.csv", header, lines)


@login_required
@require_GET
def insights_wrenches(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, VIEW_PERM)
    form, period = period_form(request)
    rows = _rows(period) if period is not None else []
    if period is not None and wants_csv(request):
        return _csv(period, rows)
    return page(
        request,
        "insights/wrenches.html",
        form,
        rows=rows,
        figure=_chart(rows) if rows else None,
        drift={"last": DRIFT_LAST, "min": DRIFT_MIN, "points": DRIFT_POINTS},
        calibration_limit=AS_FOUND_LIMIT_PCT,
    )


urlpatterns = [path("insights/wrenches/", insights_wrenches, name="insights_wrenches")]
