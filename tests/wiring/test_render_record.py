"""The wiring record PDF: the key values of a known job can be read back from its text,
it is PDF/A-3b with its own data attached, a draft says so on every page, it renders for
a job with no circuits and for names in any script, and the last page leaves the framed
signature area where SIGNATURE_BOX says."""

from __future__ import annotations

import csv
import io
import json

import pytest
from django.utils import timezone

from circuits.csv_io import circuits_to_csv
from shop.models import ShopProfile
from tests.wiring.pdf_helpers import embedded, font_names, reader, text_of, xmp
from tests.wiring.record_jobs import HOT_C, LOOSE_VALUE, WAIVER_REASON, empty_job, known_job
from wiring.render import SIGNATURE_BOX, render_record_pdf
from wiring.render.pdf import MM

VERIFY = "https://records.shop.example/verify/"
MM_PT = (
    72 / 25.4
)  # PDF points per millimetre: 1 in = 25.4 mm (NIST SP 811, B.8) = 72 pt (ISO 32000-1, 8.3.2.3)


@pytest.fixture
def media(db, settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path
    return tmp_path


@pytest.fixture
def job(media, technician, lead):
    return known_job(technician=technician, lead=lead)


@pytest.fixture
def pdf(job):
    return render_record_pdf(
        job, revision=2, draft=False, verify_url=VERIFY, issued_at=timezone.now()
    )


def test_the_text_carries_the_key_values_of_the_job(pdf, job):
    text = text_of(pdf)
    assert "4 AWG" in text  # the circuit's size (record_jobs.KNOWN_CIRCUIT)
    assert f"{LOOSE_VALUE} N·m" in text  # the retorque reading of the loose end
    assert "FOUND LOOSE" in text  # a mark and a word, not colour alone
    assert f"{HOT_C} °C" in text and "Probable deficiency" in text  # the thermal result
    assert WAIVER_REASON[:30] in " ".join(text.split())
    assert "Test Lead" in text and "Test Technician" in text  # the signers
    assert "reviewed and approved" in text
    assert "TW-07" in text  # the wrench
    assert job.number in text and "Revision 2" in text
    assert "Ilse Marrow" in text


def test_every_page_has_the_header_and_page_x_of_y(pdf, job):
    pages = reader(pdf).pages
    for number, page in enumerate(pages, start=1):
        words = page.extract_text()
        assert f"page {number} of {len(pages)}" in words
        assert job.number in words and "Our shop" in words


def test_the_cautions_are_in_plain_words(pdf):
    text = " ".join(text_of(pdf).split())
    assert "not a certificate of compliance" in text
    assert "once a year (common practice)" in text
    assert "qualified person" in text


def test_it_is_pdf_a_3b(pdf):
    metadata = xmp(pdf)
    # ISO 19005-3 identification schema: part 3, conformance B.
    assert "pdfaid" in metadata
    assert "<pdfaid:part>3</pdfaid:part>" in metadata or 'pdfaid:part="3"' in metadata
    assert "<pdfaid:conformance>B</pdfaid:conformance>" in metadata or (
        'pdfaid:conformance="B"' in metadata
    )


def test_the_schedule_csv_is_the_apps_export_exactly(pdf, job):
    files = embedded(pdf)
    assert files["schedule.csv"].decode("utf-8") == circuits_to_csv(job)
    rows = list(csv.DictReader(io.StringIO(files["schedule.csv"].decode("utf-8"))))
    assert [(r["tag"], r["conductor_size"]) for r in rows] == [("D-01", "4 AWG")]


def test_the_record_json_is_versioned_and_complete(pdf, job):
    record = json.loads(embedded(pdf)["record.json"])
    assert record["schema"] == "ampwright.wiring-record" and record["schema_version"] == 1
    assert record["job"]["number"] == job.number
    loose = [row for row in record["torque_log"] if row["retorque"]["found_loose"]]
    assert len(loose) == 1 and loose[0]["retorque"]["value"] == "9.700"
    assert record["thermal"][0]["temperature_c"] == HOT_C
    assert [s["kind"] for s in record["signoffs"]] == ["first_install", "retorque", "approval"]


def test_a_signed_record_has_no_draft_watermark(pdf):
    assert "DRAFT" not in text_of(pdf)


def test_a_draft_says_so_on_every_page(job):
    draft = render_record_pdf(job, revision=None, draft=True, verify_url="")
    for page in reader(draft).pages:
        assert "DRAFT — not a signed record" in page.extract_text()


def test_a_job_with_no_circuits_renders(media):
    pdf = render_record_pdf(empty_job(), revision=None, draft=True, verify_url=VERIFY)
    text = text_of(pdf)
    assert "No circuits are recorded for this job yet." in text
    assert "No conductor ends are recorded" in text
    assert set(embedded(pdf)) == {"schedule.csv", "record.json"}


def test_names_in_any_script_are_printed_with_fonts_that_have_them(media, technician, lead):
    names = "Даша Ковалёва · 山田花子 · 김서연 · Åse Øvrebø"
    job = known_job(technician=technician, lead=lead, owner_name=names)
    pdf = render_record_pdf(job, revision=1, draft=False, verify_url=VERIFY)
    assert names in text_of(pdf)
    fonts = font_names(pdf)
    assert any(f.startswith("DejaVu-Sans") for f in fonts)  # Latin and Cyrillic
    assert any(f.startswith("Noto-Sans-CJK") for f in fonts)  # the CJK names


def test_letter_paper_by_shop_setting(job):
    shop = ShopProfile.load()
    shop.paper_size = ShopProfile.PaperSize.LETTER
    shop.save()
    pdf = render_record_pdf(job, revision=1, draft=False, verify_url=VERIFY)
    box = reader(pdf).pages[0].mediabox
    # US Letter is 8.5 in × 11 in = 612 pt × 792 pt (ISO 32000-1, 8.3.2.3: 72 pt per inch).
    assert (round(float(box.width)), round(float(box.height))) == (612, 792)


def test_a4_is_the_default(pdf):
    box = reader(pdf).pages[0].mediabox
    # A4 is 210 mm × 297 mm (ISO 216) = 595.28 pt × 841.89 pt.
    assert (round(float(box.width), 1), round(float(box.height), 1)) == (595.3, 841.9)


def _frame_on_last_page(job, paper: str) -> tuple[float, float, float, float]:
    """Where the layout put the "Digital signature" frame on the last page, in PDF points
    from the bottom-left corner."""
    from weasyprint import CSS, HTML
    from weasyprint.urls import URLFetcher

    from wiring.render.html import record_context, render_record_context
    from wiring.render.pdf import _stylesheet_path

    context = record_context(
        job, revision=1, draft=False, verify_url=VERIFY, issued_at=timezone.now()
    )
    fetcher = URLFetcher(allowed_protocols={"data"})
    document = HTML(
        string=render_record_context(context), base_url="data:,", url_fetcher=fetcher
    ).render(
        stylesheets=[CSS(filename=_stylesheet_path()), CSS(string=f"@page {{ size: {paper}; }}")]
    )
    page = document.pages[-1]

    def walk(box):
        yield box
        for child in getattr(box, "children", []):
            yield from walk(child)

    px = 0.75  # CSS px to PDF points: 96 px = 72 pt = 1 in (CSS Values 4, 6.2)
    for box in walk(page._page_box):
        element = getattr(box, "element", None)
        if element is not None and element.get("id") == "signature-frame":
            x, top = box.border_box_x() * px, box.border_box_y() * px
            w, h = box.border_width() * px, box.border_height() * px
            height = page.height * px
            return (x, height - top - h, x + w, height - top)
    raise AssertionError("no signature frame on the last page")


@pytest.mark.parametrize("paper", ["A4", "letter"])
def test_the_signature_box_lies_inside_the_frame_on_the_last_page(job, paper):
    x1, y1, x2, y2 = _frame_on_last_page(job, paper)
    # record.css: 16 mm left margin, 20 mm bottom margin, a 100 mm × 50 mm frame.
    assert (round(x1, 1), round(y1, 1)) == (round(16 * MM_PT, 1), round(20 * MM_PT, 1))
    assert (round(x2, 1), round(y2, 1)) == (round(116 * MM_PT, 1), round(70 * MM_PT, 1))
    bx1, by1, bx2, by2 = SIGNATURE_BOX
    assert x1 < bx1 < bx2 < x2 and y1 < by1 < by2 < y2
    assert y2 - by2 >= 7 * MM - 2  # the title strip stays above the box
    assert (
        "Digital signature"
        in reader(render_record_pdf(job, revision=1, draft=False, verify_url=""))
        .pages[-1]
        .extract_text()
    )


def test_each_schedule_value_names_its_source_by_a_key_printed_under_the_table(pdf, job):
    from wiring.render import record_data

    text = " ".join(text_of(pdf).split())
    sizing = record_data(job)["circuits"][0]["sizing"]
    for source in (sizing["table_source"], sizing["drop_source"], sizing["protection_source"]):
        assert source in text  # the legend names it once
    assert "[1]" in text and "by its key in brackets" in text


def test_the_torque_log_row_carries_wrench_calibration_technician_and_time(pdf):
    text = " ".join(text_of(pdf).split())
    assert "W1 wrench TW-07, cal. due" in text  # the wrench and its calibration due date
    assert "10 N·m · W1" in text  # each reading names its wrench by that key
    assert "Test Technician ·" in text  # who read it, then when


def test_each_wrench_and_calibration_date_gets_its_own_key():
    from wiring.render.cells import WrenchKeys

    key = WrenchKeys()
    assert [key("TW-07", "03 Mar 2027"), key("TW-09", "01 Jan 2027")] == ["W1", "W2"]
    assert key("TW-07", "03 Mar 2027") == "W1"  # the same wrench and date: the same key
    assert key("TW-07", "03 Mar 2028") == "W3"  # recalibrated between passes: a new key
    assert [w["key"] for w in key.legend()] == ["W1", "W2", "W3"]


def test_the_chart_labels_a_few_loose_ends_and_counts_them_all():
    from wiring.render.chart import LABELLED_LOOSE, movement_chart_svg

    reading = {"found_loose": True}
    rows = [
        {"termination": f"D-{n:03d} from", "moved_pct": 2.0, "retorque": reading} for n in range(40)
    ]
    svg = movement_chart_svg(rows)
    assert svg.count(" loose</text>") == LABELLED_LOOSE
    assert "40 found loose" in svg and "all marked ✖ in the table" in svg
