"""The record as HTML: `record_html(job, ...)` renders templates/wiring/record/record.html
from `record_data` (the same dict that is embedded as record.json) plus what only the
printed record carries: the one-line diagram, the torque-movement chart, the QR code to
the verify page, the drawn signatures and the photos (as data URLs, so the HTML is one
self-contained document for WeasyPrint and for the preview alike), and the long tables
as plain-text cells (cells.py says why).

The diagram and the chart are SVG images (`<img src="data:image/svg+xml;base64,...">`), not
inline `<svg>`: inline, every one of the diagram's thousands of SVG elements went through
the HTML style cascade; as an image WeasyPrint reads it with its SVG reader alone, and it
stays vector (sharp at any zoom)."""

from __future__ import annotations

import base64
import datetime
import io

from django.core.files.storage import default_storage
from django.template.loader import render_to_string
from django.utils import timezone
from django.utils.dateparse import parse_date, parse_datetime

from circuits.diagram import job_diagram_svg
from circuits.system import job_system_report
from circuits.views.labels import qr_svg
from wiring.render import cells
from wiring.render.chart import movement_chart_svg
from wiring.render.data import record_data_from

PHOTO_MAX_PX = 480  # photos are printed small at the end; no need for camera resolution
TEMPLATE = "wiring/record/record.html"
# The record's runs of sections, in page order, each starting a page (record.html).
RECORD_PARTS = ("front", "torque", "end")


def _local_text(value: str) -> str:
    """An ISO time or date of the record as people read it: '12 Mar 2026 14:05'."""
    moment = parse_datetime(value) if "T" in value else None
    if moment is not None:
        return f"{timezone.localtime(moment):%d %b %Y %H:%M}"
    day = parse_date(value[:10])
    return f"{day:%d %b %Y}" if day else value


TIME_KEYS = ("_at", "_on", "_due")


def readable(value):
    """A copy of record data where every time or date field `x_at` gains `x_at_text`."""
    if isinstance(value, list):
        return [readable(v) for v in value]
    if not isinstance(value, dict):
        return value
    out = {}
    for key, item in value.items():
        out[key] = readable(item)
        if isinstance(item, str) and key.endswith(TIME_KEYS) and item:
            out[f"{key}_text"] = _local_text(item)
    return out


def svg_url(svg: str) -> str:
    """An SVG document as a data URL for an <img>."""
    return "data:image/svg+xml;base64," + base64.b64encode(svg.encode("utf-8")).decode("ascii")


def _photo_url(name: str) -> str | None:
    """A small JPEG of a stored photo as a data URL; None if it cannot be read."""
    from PIL import Image, UnidentifiedImageError

    try:
        with default_storage.open(name) as handle, Image.open(handle) as image:
            # A JPEG is decoded straight at about the printed size (DCT scaling): a
            # camera's 12 megapixels are never held in memory for a 54 mm print.
            image.draft("RGB", (PHOTO_MAX_PX, PHOTO_MAX_PX))
            image = image.convert("RGB")
            # Bilinear is plenty for a 54 mm print, at a third of bicubic's time.
            image.thumbnail((PHOTO_MAX_PX, PHOTO_MAX_PX), resample=Image.Resampling.BILINEAR)
            buffer = io.BytesIO()
            image.save(buffer, format="JPEG", quality=80)
    except (OSError, UnidentifiedImageError, ValueError):
        return None
    return "data:image/jpeg;base64," + base64.b64encode(buffer.getvalue()).decode("ascii")


def record_context(
    job, *, revision: int | None, draft: bool, verify_url: str, issued_at: datetime.datetime
) -> dict:
    report = job_system_report(job)
    data = record_data_from(job, report, generated_at=issued_at)
    r = readable(data)
    for signoff in r["signoffs"]:
        signoff["signature_url"] = "data:image/png;base64," + signoff["signature_png_base64"]
    for photo in r["photos"]:
        photo["url"] = _photo_url(photo["file"])
    diagram = job_diagram_svg(report, title=f"{job.number} · one-line diagram")
    schedule, sources = cells.schedule_rows(r["circuits"])
    for checklist in r["checklists"]:
        checklist["exceptions"] = cells.checklist_exceptions(checklist["items"])
    for finding in r["findings"]:
        finding["text"] = cells.finding_text(finding)
    torque_rows, wrenches = cells.torque_rows(r["torque_log"])
    return {
        # The whole record as one document; split.part_contexts makes its parts.
        "parts": RECORD_PARTS,
        "r": r,
        "data": data,
        "revision": revision,
        "draft": draft,
        "verify_url": verify_url,
        "issued_at": issued_at,
        "issued_text": f"{timezone.localtime(issued_at):%d %b %Y %H:%M}",
        "schedule_rows": schedule,
        "sources": sources,
        "torque_rows": torque_rows,
        "wrenches": wrenches,
        "thermal_rows": cells.thermal_rows(r["thermal"]),
        "diagram_url": svg_url(diagram),
        "chart_url": svg_url(movement_chart_svg(data["torque_log"])),
        "qr_svg": qr_svg(verify_url) if verify_url else "",  # small: inline is cheap
    }


def record_html(
    job,
    *,
    revision: int | None,
    draft: bool,
    verify_url: str,
    issued_at: datetime.datetime | None = None,
    stylesheet_url: str | None = None,
    back_url: str | None = None,
) -> str:
    """The whole record as one HTML document. `revision` None with `draft` for a draft
    (watermarked "DRAFT — not a signed record"); `verify_url` goes in the QR code on the
    cover; `stylesheet_url` is where the page links record.css (the static URL in the
    browser preview; the PDF renderer passes the file itself); `back_url` adds the
    preview's link back to the job."""
    context = record_context(
        job,
        revision=revision,
        draft=draft,
        verify_url=verify_url,
        issued_at=issued_at or timezone.now(),
    )
    return render_record_context(context, stylesheet_url=stylesheet_url, back_url=back_url)


def render_record_context(
    context: dict, *, stylesheet_url: str | None = None, back_url: str | None = None
) -> str:
    return render_to_string(
        TEMPLATE, {**context, "stylesheet_url": stylesheet_url, "back_url": back_url}
    )
