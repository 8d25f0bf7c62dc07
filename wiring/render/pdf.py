"""The record as PDF/A-3b (WeasyPrint), with its own data attached inside.

`render_record_pdf(job, *, revision, draft, verify_url, issued_at) -> bytes`: the record
of `record_html` on A4 or Letter (the shop's setting), with the circuit schedule as
`schedule.csv` (exactly circuits.csv_io.circuits_to_csv, the app's CSV export) and the
whole record as `record.json` (record_data, schema.md) embedded as PDF/A-3 associated
files. A draft carries the watermark "DRAFT — not a signed record" on every page.

`SIGNATURE_BOX` = (x1, y1, x2, y2) in PDF points, origin at the bottom-left corner of
the LAST page: the empty area inside the frame titled "Digital signature" where the
signing step draws the visible signature. It is measured from the page's bottom-left
corner, so it is the same on A4 and on Letter.

WeasyPrint fetches nothing from the network or the disk while rendering: only data:
URLs (the signatures and photos are inlined); the stylesheet is passed in as a file.
"""

from __future__ import annotations

import datetime
import gc
import io
import json
from contextlib import contextmanager
from functools import lru_cache

from django.contrib.staticfiles import finders
from django.utils import timezone

from circuits.csv_io import circuits_to_csv
from shop.models import ShopProfile
from wiring.render import split

MM = 72 / 25.4  # PDF points per millimetre (1 in = 25.4 mm = 72 pt)

# Page margins of record.css (left 16 mm, bottom 20 mm) and its frame: 100 mm × 50 mm at
# the bottom-left of the text area, a 7 mm title strip on top, a 1 pt border inside.
_LEFT_MM, _BOTTOM_MM, _FRAME_W_MM, _FRAME_H_MM, _TITLE_MM = 16, 20, 100, 50, 7
_BORDER_PT = 1.0
SIGNATURE_BOX: tuple[float, float, float, float] = (
    round(_LEFT_MM * MM + _BORDER_PT, 2),
    round(_BOTTOM_MM * MM + _BORDER_PT, 2),
    round((_LEFT_MM + _FRAME_W_MM) * MM - _BORDER_PT, 2),
    round((_BOTTOM_MM + _FRAME_H_MM - _TITLE_MM) * MM - _BORDER_PT, 2),
)

PAPER_SIZES = {"A4": "A4", "letter": "letter"}
STYLESHEET = "css/record.css"
PDF_VARIANT = "pdf/a-3b"


def paper_size() -> str:
    """The shop's paper: "A4" or "letter" (ShopProfile.paper_size)."""
    value = getattr(ShopProfile.load(), "paper_size", "A4")
    return PAPER_SIZES.get(value, "A4")


@lru_cache(maxsize=1)
def _stylesheet_path() -> str:
    path = finders.find(STYLESHEET)
    if not path:
        raise FileNotFoundError(f"static file {STYLESHEET} not found")
    return path


@contextmanager
def _no_cyclic_gc():
    """Pause Python's cyclic garbage collector while WeasyPrint builds the layout.

    Why: WeasyPrint allocates hundreds of thousands of boxes for a long record, and each
    automatic collection walks every live object: about 15 % of the render time. The
    boxes are freed by reference counting anyway; the collector resumes afterwards, so
    at most a few MB of cyclic garbage wait a few seconds longer."""
    was_enabled = gc.isenabled()
    gc.disable()
    try:
        yield
    finally:
        if was_enabled:
            gc.enable()


def _paper_css() -> str:
    return f"@page {{ size: {paper_size()}; }}"


def html_to_pdf(
    html: str,
    *,
    attachments: list | None = None,
    variant: str | None = PDF_VARIANT,
    extra_css: tuple[str, ...] = (),
):
    """Render record-styled HTML to PDF bytes with the shop's paper size."""
    from weasyprint import CSS, HTML
    from weasyprint.urls import URLFetcher

    fetcher = URLFetcher(allowed_protocols={"data"})
    sheets = [
        CSS(filename=_stylesheet_path(), url_fetcher=fetcher),
        *(CSS(string=s) for s in (_paper_css(), *extra_css)),
    ]
    with _no_cyclic_gc():
        document = HTML(string=html, base_url="data:,", url_fetcher=fetcher)
        return document.write_pdf(
            stylesheets=sheets, attachments=attachments or [], pdf_variant=variant
        )


def record_attachments(job, data: dict) -> list:
    from weasyprint import Attachment

    created = timezone.now()
    return [
        Attachment(
            string=circuits_to_csv(job),
            name="schedule.csv",
            description="Circuit schedule (CSV, the columns of the app's CSV export)",
            created=created,
            modified=created,
            relationship="Data",
        ),
        Attachment(
            string=json.dumps(data, ensure_ascii=False, indent=1),
            name="record.json",
            description=f"The whole record ({data['schema']} version {data['schema_version']})",
            created=created,
            modified=created,
            relationship="Data",
        ),
    ]


def render_record_pdf(
    job,
    *,
    revision: int | None,
    draft: bool,
    verify_url: str,
    issued_at: datetime.datetime | None = None,
) -> bytes:
    """The record of `job` as PDF/A-3b bytes (see the module docstring). A long record
    is laid out in two processes at once (split.py); the result is the same record."""
    from wiring.render.html import record_context, render_record_context

    worker = split.worker_for(job)  # started first: it loads WeasyPrint meanwhile
    try:
        issued_at = issued_at or timezone.now()
        context = record_context(
            job, revision=revision, draft=draft, verify_url=verify_url, issued_at=issued_at
        )
        if worker is not None:
            try:
                return _render_split(job, context, worker)
            except split.WorkerFailed as error:
                split.log.warning("record of %s laid out in one process: %s", job.number, error)
        html = render_record_context(context)
        return html_to_pdf(html, attachments=record_attachments(job, context["data"]))
    finally:
        if worker is not None:
            worker.close()


def _render_split(job, context: dict, worker: split.Worker) -> bytes:
    from wiring.render.html import render_record_context

    front, back = split.part_contexts(context)
    numbers_off = (split.NO_PAGE_NUMBERS_CSS,)
    back_pdf = worker.lay_out(
        html=render_record_context(back),
        css_files=[_stylesheet_path()],
        css_strings=[_paper_css(), *numbers_off],
        variant=PDF_VARIANT,
    )
    front_pdf = html_to_pdf(
        render_record_context(front),
        attachments=record_attachments(job, context["data"]),
        extra_css=numbers_off,
    )
    pages = _page_count(front_pdf) + worker.pages()
    numbers = html_to_pdf(split.numbers_html(pages))
    return split.merge(front_pdf, back_pdf.result(), numbers)


def _page_count(pdf: bytes) -> int:
    from pypdf import PdfReader

    return len(PdfReader(io.BytesIO(pdf)).pages)
