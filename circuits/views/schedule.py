"""The circuit schedule: one row per circuit with its sizing and worst finding, sortable
by column (htmx swaps the table; each header is also a plain link)."""

from __future__ import annotations

from collections.abc import Callable

from django.contrib.auth.decorators import login_required
from django.http import HttpRequest, HttpResponse
from django.shortcuts import render
from django.urls import path
from django.views.decorators.http import require_GET

from circuits.system import CircuitSizing, job_system_report
from circuits.tags import tag_key
from circuits.views.access import _get_job_for_user

_UNKNOWN_LAST = float("inf")


def _result(row: CircuitSizing):
    return row.report.result if row.report is not None else None


def _largest_first(value: float | None) -> float:
    return -value if value is not None else _UNKNOWN_LAST


def _worst_key(row: CircuitSizing) -> tuple:
    if row.error:  # a circuit the engine cannot size needs attention first
        return (-1, 0)
    worst = row.worst
    return worst.rank if worst is not None else (9, 9)


# Sort key of each column: tag in natural order (D-2 before D-10, circuits.tags) and name
# A to Z; numbers largest first; worst finding most
# serious first. Rows without a value (a circuit that cannot be sized) go last.
SORTS: dict[str, tuple[str, Callable[[CircuitSizing], object]]] = {
    "tag": ("tag", lambda r: tag_key(r.circuit.tag)),
    "name": ("name", lambda r: (r.circuit.name.lower(), r.circuit.tag)),
    "current": ("design current", lambda r: -float(r.circuit.design_current_a)),
    "length": ("length", lambda r: -r.circuit.length_m),
    "ampacity": (
        "ampacity",
        lambda r: _largest_first(_result(r).ampacity_a if _result(r) else None),
    ),
    "drop": (
        "voltage drop",
        lambda r: _largest_first(_result(r).voltage_drop_pct if _result(r) else None),
    ),
    "worst": ("worst finding", _worst_key),
}
DEFAULT_SORT = "tag"


def sort_rows(rows: list[CircuitSizing], sort: str) -> list[CircuitSizing]:
    _, key = SORTS.get(sort, SORTS[DEFAULT_SORT])
    by_tag = sorted(rows, key=lambda r: tag_key(r.circuit.tag))
    return sorted(by_tag, key=key)  # stable: ties stay in tag order


@login_required
@require_GET
def circuit_schedule(request: HttpRequest, number: str) -> HttpResponse:
    job = _get_job_for_user(request.user, number, perm="circuits.view_circuit")
    system = job_system_report(job)
    sort = request.GET.get("sort", DEFAULT_SORT)
    if sort not in SORTS:
        sort = DEFAULT_SORT
    context = {
        "job": job,
        "system": system,
        "rows": sort_rows(system.circuits, sort),
        "sort": sort,
        "sort_label": SORTS[sort][0],
    }
    template = "circuits/schedule.html#table" if request.htmx else "circuits/schedule.html"
    return render(request, template, context)


urlpatterns = [
    path("jobs/<str:number>/circuits/", circuit_schedule, name="circuit_schedule"),
]
