"""Loosening: which connections loosen between first install and retorque, by kind of
hardware, over a chosen period. Leads and office; leads turn a row into a shop rule."""

from __future__ import annotations

from urllib.parse import urlencode

from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.urls import path, reverse
from django.views.decorators.http import require_GET

from circuits.models import Device, Mounting, StudSize, TerminationKind
from circuits.sizing import SizeNotationError, parse_size
from insights import queries
from insights.charts import ChartRow, chart
from insights.stats import wilson
from insights.views.common import csv_response, page, period_form, wants_csv
from inspections.models import Stage
from shop.views.access import require_perm

VIEW_PERM = "insights.view_insights"
# Breakdowns a shop rule can name (conductor size is not hardware a rule matches).
RULE_FIELD = {
    "termination_kind": "termination_kind",
    "stud_size": "stud_size",
    "device_kind": "device_kind",
    "mounting": "mounting",
}


def _label(breakdown: str, key: str | None) -> str:
    if not key:
        return "not recorded"
    choices = {
        "termination_kind": TerminationKind,
        "stud_size": StudSize,
        "device_kind": Device.Kind,
        "mounting": Mounting,
    }.get(breakdown)
    if choices is not None:
        return dict(choices.choices).get(key, key)
    try:
        return parse_size(key).label
    except SizeNotationError:
        return key


def _rows(breakdown: str, groups: list[dict]) -> list[dict]:
    rows = []
    for group in groups:
        rate = wilson(group["loose"], group["n"])
        rows.append({**group, "label": _label(breakdown, group["key"]), "rate": rate})
    # Worst first by the interval's lower bound: the rate the shop can be confident is
    # at least that high. A 1-of-1 (100 %, but as low as 21 %) then does not outrank a
    # 30-of-100 (30 %, at least 22 %), and a small group rises as its count grows.
    rows.sort(key=lambda r: (-r["rate"].low, -r["n"], r["label"]))
    return rows


def _rule_link(period, breakdown: str, heading: str, row: dict) -> str | None:
    field = RULE_FIELD.get(breakdown)
    if field is None or not row["key"]:
        return None
    made_from = (
        f"Loosening {period.start:%Y-%m-%d} to {period.end:%Y-%m-%d}: {heading.lower()}"
        f" {row['label']}, {row['loose']} of {row['n']} found loose"
    )
    query = {
        field: row["key"],
        "stage_kind": Stage.Kind.RETORQUE.value,
        "text": "Second retorque of these connections, found loose often in this shop",
        "made_from": made_from,
    }
    return f"{reverse('shop_rules')}?{urlencode(query)}#new-rule"


def _section(period, breakdown: str, groups: list[dict], may_rule: bool) -> dict:
    heading, _ = queries.BREAKDOWNS[breakdown]
    rows = _rows(breakdown, groups)
    for row in rows:
        row["rule_link"] = _rule_link(period, breakdown, heading, row) if may_rule else None
    figure = chart(
        [
            ChartRow(
                r["label"], r["rate"].pct, r["rate"].low_pct, r["rate"].high_pct, f"n = {r['n']}"
            )
            for r in rows
        ],
        title=f"Found-loose rate by {heading.lower()}",
        desc=(
            f"For each {heading.lower()}, the share of retorqued connections found loose, as a"
            " bar, with its 95 % Wilson interval as a line; worst first."
        ),
        unit=" %",
        bars=True,
        lo=0,
        hi=100,
    )
    return {"name": breakdown, "heading": heading, "rows": rows, "chart": figure}


def _csv(period, sections: list[dict]) -> HttpResponse:
    header = [
        "breakdown",
        "group",
        "retorqued",
        "found loose",
        "rate %",
        "95% low %",
        "95% high %",
        "median change N·m",
        "median change % of spec",
    ]
    lines = [
        [
            s["heading"],
            r["label"],
            r["n"],
            r["loose"],
            r["rate"].pct,
            r["rate"].low_pct,
            r["rate"].high_pct,
            r["median_nm"],
            r["median_pct"],
        ]
        for s in sections
        for r in s["rows"]
    ]
    return csv_response(f"loosening-{period.start}-{period.end}.csv", header, lines)


@login_required
@require_GET
def insights_loosening(request: HttpRequest) -> HttpResponse:
    require_perm(request.user, VIEW_PERM)
    form, period = period_form(request)
    sections = []
    if period is not None:
        may_rule = request.user.has_perm("insights.manage_shop_rules")
        # All five breakdowns from one statement (insights.queries.loosening_all).
        sections = [
            _section(period, name, groups, may_rule)
            for name, groups in queries.loosening_all(period).items()
        ]
        if wants_csv(request):
            return _csv(period, sections)
    total = sum(r["n"] for r in sections[0]["rows"]) if sections else 0
    return page(request, "insights/loosening.html", form, sections=sections, total=total)


urlpatterns = [path("insights/loosening/", insights_loosening, name="insights_loosening")]
