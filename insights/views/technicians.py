"""Technicians (leads only): per technician, how often a first reading was within
tolerance and how often the connections they installed were found loose at retorque,
for coaching. Never shown to technicians, nor to the office."""

from __future__ import annotations

from django.contrib.auth import get_user_model
from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.urls import path
from django.views.decorators.http import require_GET

from insights import queries
from insights.charts import ChartRow, chart
from insights.stats import wilson
from insights.views.common import csv_response, page, period_form, wants_csv
from shop.views.access import require_perm

VIEW_PERM = "insights.view_technician_insights"


def _name(user) -> str:
    return user.get_full_name() or user.get_username()


def _rows(period) -> list[dict]:
    first = queries.first_readings(period)
    loose = queries.loose_by_installer(period)
    people = get_user_model().objects.filter(pk__in={*first, *loose})
    rows = []
    for person in people:
        f = first.get(person.pk, {"n": 0, "within": 0})
        lo = loose.get(person.pk, {"n": 0, "loose": 0})
        rows.append(
            {
                "name": _name(person),
                "first_n": f["n"],
                "first_within": f["within"],
                "first": wilson(f["within"], f["n"]),
                "installed_n": lo["n"],
                "loose_k": lo["loose"],
                "loose": wilson(lo["loose"], lo["n"]),
            }
        )
    rows.sort(key=lambda r: r["name"].lower())
    return rows


def _charts(rows: list[dict]) -> list:
    first = chart(
        [
            ChartRow(
                r["name"],
                r["first"].pct,
                r["first"].low_pct,
                r["first"].high_pct,
                f"n = {r['first_n']}",
            )
            for r in rows
        ],
        title="First reading within tolerance, per technician",
        desc="For each technician, the share of first readings within tolerance as a bar,"
        " with its 95 % Wilson interval as a line.",
        unit=" %",
        bars=True,
        lo=0,
        hi=100,
    )
    loose = chart(
        [
            ChartRow(
                r["name"],
                r["loose"].pct,
                r["loose"].low_pct,
                r["loose"].high_pct,
                f"n = {r['installed_n']}",
            )
            for r in rows
        ],
        title="Installed connections found loose at retorque, per technician",
        desc="For each technician, the share of the connections they installed that were"
        " found loose at retorque as a bar, with its 95 % Wilson interval as a line.",
        unit=" %",
        bars=True,
        lo=0,
        hi=100,
    )
    return [("first", first), ("loose", loose)]


def _csv(period, rows: list[dict]) -> HttpResponse:
    header = [
        "technician",
        "first readings",
        "within tolerance",
        "rate %",
        "95% low %",
        "95% high %",
        "installed and retorqued",
        "found loose",
        "loose rate %",
        "loose 95% low %",
        "loose 95% high %",
    ]
    lines = [
        [
            r["name"],
            r["first_n"],
            r["first_within"],
            r["first"].pct,
            r["first"].low_pct,
            r["first"].high_pct,
            r["installed_n"],
            r["loose_k"],
            r["loose"].pct,
            r["loose"].low_pct,
            r["loose"].high_pct,
        ]
        for r in rows
    ]
    return csv_response(f"technicians-{period.start}-{period.end}.csv", header, lines)


@login_required
@require_GET
def insights_technicians(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, VIEW_PERM)
    form, period = period_form(request)
    rows = _rows(period) if period is not None else []
    if period is not None and wants_csv(request):
        return _csv(period, rows)
    return page(
        request,
        "insights/technicians.html",
        form,
        rows=rows,
        figures=_charts(rows) if rows else [],
    )


urlpatterns = [path("insights/technicians/", insights_technicians, name="insights_technicians")]
