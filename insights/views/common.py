"""What the insight pages share: the period form, the CSV download and the page
context."""

from __future__ import annotations

import csv
import math

from django.http import HttpRequest, HttpResponse
from django.shortcuts import render

from insights.forms import PeriodForm
from insights.queries import Period

# Cells a spreadsheet would take for a formula; written with a leading apostrophe.
_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


def _cell(value: object) -> object:
    if value is None:
        return ""
    if isinstance(value, float):
        return "" if not math.isfinite(value) else round(value, 2)
    if isinstance(value, str) and value.startswith(_FORMULA_START):
        return "'" + value
    return value


def csv_response(filename: str, header: list[str], rows: list[list[object]]) -> HttpResponse:
    response = HttpResponse(content_type="text/csv; charset=utf-8")
    response["Content-Disposition"] = f'attachment; filename="{filename}"'
    writer = csv.writer(response)
    writer.writerow(header)
    for row in rows:
        writer.writerow([_cell(value) for value in row])
    return response


def wants_csv(request: HttpRequest) -> bool:
    return request.GET.get("format") == "csv"


def period_form(request: HttpRequest) -> tuple[PeriodForm, Period | None]:
    form = PeriodForm(request.GET)
    return form, form.period


def page(request: HttpRequest, template: str, form: PeriodForm, **context) -> HttpResponse:
    query = form.query()
    context.update(form=form, period=form.period, csv_query=f"?{query}&format=csv")
    return render(request, template, context)


def pct(value: float | None, places: int = 1) -> str:
    return "–" if value is None else f"{value:.{places}f} %"
