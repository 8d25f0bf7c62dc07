"""The wiring record's content and PDF.

Contract (used by the revisions and signing side, wiring/services.py):

- `record_data(job) -> dict`: the whole record as a JSON-able dict, schema
  "ampwright.wiring-record", "schema_version": 1 (documented in wiring/render/schema.md).
- `record_html(job, *, revision: int | None, draft: bool, verify_url: str, issued_at)
  -> str`: the record as one HTML document (the preview shows it; the PDF is made from it).
- `render_record_pdf(job, *, revision: int | None, draft: bool, verify_url: str,
  issued_at) -> bytes`: PDF/A-3b with the CSV schedule and the JSON record embedded as
  `schedule.csv` and `record.json`; a draft is watermarked "DRAFT — not a signed record".
- `SIGNATURE_BOX`: (x1, y1, x2, y2) in PDF points on the LAST page (origin bottom-left),
  the empty framed area titled "Digital signature" left for the visible signature.
- `stage_sheet_pdf(stage) -> bytes`: the first-install or retorque stage sheet (the
  shop's internal copy: what was done, by whom, what is open).
"""

from __future__ import annotations

from wiring.render.data import SCHEMA, SCHEMA_VERSION, record_data
from wiring.render.html import record_html
from wiring.render.pdf import SIGNATURE_BOX, render_record_pdf
from wiring.render.stage_sheet import stage_sheet_pdf

__all__ = [
    "SCHEMA",
    "SCHEMA_VERSION",
    "SIGNATURE_BOX",
    "record_data",
    "record_html",
    "render_record_pdf",
    "stage_sheet_pdf",
]
