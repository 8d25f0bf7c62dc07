"""The stage sheet: the shop's internal copy of one first-install or retorque stage,
printable from the stage page. What was done (every conductor end with its reading that
counts, the checklist), by whom and when, and what is still open (the stage's blockers).
Plain PDF (no embedded data, no signature), styled by record.css like the record."""

from __future__ import annotations

from django.template.loader import render_to_string
from django.utils import timezone

from circuits.models import Termination
from inspections.models import Stage
from inspections.services import (
    checklist_items_for,
    current_readings,
    signoff_in_force,
    stage_blockers,
    torque_progress,
)
from wiring.render.evidence import RESULT_WORDS, termination_label
from wiring.render.pdf import html_to_pdf

SHEET_KINDS = (Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE)
TEMPLATE = "wiring/record/stage_sheet.html"


def stage_sheet_context(stage: Stage) -> dict:
    if stage.kind not in SHEET_KINDS:
        raise ValueError("Stage sheets are made for the first install and the retorque.")
    job = stage.job
    readings = current_readings(stage)
    rows = []
    terminations = (
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    for t in terminations:
        rows.append(
            {"label": termination_label(t), "termination": t, "reading": readings.get(t.pk)}
        )
    items = [
        {"item": item, "word": RESULT_WORDS.get(item.state, item.state)}
        for item in checklist_items_for(stage=stage)
        if not item.derived
    ]
    return {
        "job": job,
        "stage": stage,
        "progress": torque_progress(stage),
        "rows": rows,
        "items": items,
        "blockers": [] if stage.state == Stage.State.SIGNED else stage_blockers(stage),
        "signoff": signoff_in_force(stage),
        "printed_at": timezone.localtime(),
    }


def stage_sheet_html(stage: Stage) -> str:
    return render_to_string(TEMPLATE, stage_sheet_context(stage))


def stage_sheet_pdf(stage: Stage) -> bytes:
    """The stage sheet of a first-install or retorque stage as PDF bytes (ValueError for
    another stage)."""
    return html_to_pdf(stage_sheet_html(stage), variant=None)
