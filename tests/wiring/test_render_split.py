"""A long record laid out in two processes at once (wiring/render/split.py) is the same
record as one laid out in one: the same pages with the same lines, the running header and
"page x of y" on every page, PDF/A-3b with the same attached data, the signature area on
the last page, a signature that verifies. When the worker cannot do its part, the record
is laid out in one process and still issued."""

from __future__ import annotations

import logging
import re
import subprocess
import sys

import pytest

from shop.models import ShopProfile
from tests.factories import make_job
from tests.inspections.factories import approved, make_spec_circuit, make_wrench
from tests.wiring.pdf_helpers import embedded, reader, text_of, xmp
from tests.wiring.signing_fixtures import *  # noqa: F403
from wiring.render import render_record_pdf, split
from wiring.services import record_issue
from wiring.verify import verify_pdf

CIRCUITS = 25  # × 2 conductors × 2 ends = 100 ends: the torque log runs over pages
PAGE_NUMBER = re.compile(r"page (\d+) of (\d+)")


@pytest.fixture
def long_job(db, media, technician, lead, settings):
    """100 conductor ends, read at both passes, approved; split from 1 end on."""
    settings.RECORD_SPLIT_MIN_ENDS = 1
    job = make_job(lead=lead, title="Long record build")
    for n in range(CIRCUITS):
        make_spec_circuit(
            job, tag=f"L-{n:02d}", name=f"Feed {n}", conductor_size="10 AWG",
            design_current_a=20, protection_a=30, length_m=2.5,
        )  # fmt: skip
    approved(job, technician=technician, lead=lead, wrench=make_wrench(code="TW-11"))
    job.refresh_from_db()
    return job


def render(job, settings, *, processes: int) -> bytes:
    settings.RECORD_RENDER_PROCESSES = processes
    return render_record_pdf(job, revision=1, draft=False, verify_url="https://v.example/")


def page_texts(pdf: bytes) -> list[str]:
    return [page.extract_text() for page in reader(pdf).pages]


def test_the_parts_meet_where_the_torque_log_starts_its_page(long_job, settings):
    pages = page_texts(render(long_job, settings, processes=2))
    starts = [i for i, text in enumerate(pages) if "Conductor end, spec" in text]
    assert starts and "Torque log" in pages[starts[0]]
    assert "Findings" in " ".join(pages[: starts[0]])  # the front part's last section
    assert "Findings" not in pages[starts[0]]  # the back part starts a page


def test_a_split_record_is_the_same_record_as_one_laid_out_whole(long_job, settings):
    split_pdf = render(long_job, settings, processes=2)
    single_pdf = render(long_job, settings, processes=1)
    split_pages, single_pages = page_texts(split_pdf), page_texts(single_pdf)
    # The same pages with the same lines (the page number's place in the extracted text
    # differs: it is stamped on last), each with its running header and ONE right
    # "page x of y".
    assert len(split_pages) == len(single_pages) > 3
    shop = ShopProfile.load().name
    for number, (split_text, single_text) in enumerate(
        zip(split_pages, single_pages, strict=True), 1
    ):
        assert sorted(split_text.splitlines()) == sorted(single_text.splitlines())
        assert PAGE_NUMBER.findall(split_text) == [(str(number), str(len(split_pages)))]
        assert long_job.number in split_text and shop in split_text
        assert "Revision 1" in split_text
    assert "Digital signature" in split_pages[-1]
    assert all(f"L-{n:02d}" in text_of(split_pdf) for n in range(CIRCUITS))
    # PDF/A-3b (ISO 19005-3, 6.6.2.3.1: the document information agrees with the XMP
    # metadata) with the same attached data.
    metadata = xmp(split_pdf)
    assert "<pdfaid:part>3</pdfaid:part>" in metadata or 'pdfaid:part="3"' in metadata
    info = reader(split_pdf).metadata
    assert info.producer and info.producer in metadata
    assert info.title and info.title in metadata
    assert embedded(split_pdf).keys() == {"schedule.csv", "record.json"}
    assert embedded(split_pdf)["schedule.csv"] == embedded(single_pdf)["schedule.csv"]
    # Nothing copied page after page (as pypdf does with the colour profile when left to
    # itself): the split record carries a second set of font subsets, no more.
    assert len(split_pdf) < 1.5 * len(single_pdf)


def test_every_page_of_a_split_draft_says_it_is_a_draft(long_job, settings):
    settings.RECORD_RENDER_PROCESSES = 2
    draft = render_record_pdf(long_job, revision=None, draft=True, verify_url="")
    pages = page_texts(draft)
    assert len(pages) > 3
    assert all("DRAFT — not a signed record" in text for text in pages)


def test_a_split_record_is_issued_signed_and_verifies(long_job, signing_key):
    revision = record_issue(job=long_job)
    with revision.file.open("rb") as handle:
        data = handle.read()
    verdict = verify_pdf(data)
    assert verdict.ok and verdict.code == "unchanged" and verdict.job_number == long_job.number


def test_when_the_worker_fails_the_record_is_laid_out_in_one_process(
    long_job, settings, monkeypatch, caplog
):
    monkeypatch.setattr(split, "WORKER", split.WORKER.with_name("no_such_worker.py"))
    with caplog.at_level(logging.WARNING, logger="wiring.render.split"):
        pdf = render(long_job, settings, processes=2)
    assert "laid out in one process" in caplog.text
    assert page_texts(pdf) == page_texts(render(long_job, settings, processes=1))


def test_only_a_record_with_enough_ends_is_split(db, settings):
    job = make_job()
    make_spec_circuit(job)  # 4 ends
    settings.RECORD_RENDER_PROCESSES = 2
    settings.RECORD_SPLIT_MIN_ENDS = 5
    assert split.worker_for(job) is None
    settings.RECORD_SPLIT_MIN_ENDS = 4
    worker = split.worker_for(job)
    assert worker is not None
    worker.close()
    assert worker.process.poll() is not None  # closed unused: no process left behind
    settings.RECORD_RENDER_PROCESSES = 1
    assert split.worker_for(job) is None


def test_the_worker_answers_bad_input_with_one_line_and_exit_1():
    done = subprocess.run(
        [sys.executable, "-P", str(split.WORKER)], input=b"{not json", capture_output=True
    )
    assert done.returncode == 1 and done.stdout == b""
    assert len(done.stderr.decode().strip().splitlines()) == 1
    assert done.stderr.decode().startswith("pdf worker: JSONDecodeError")
