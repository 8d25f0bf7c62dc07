"""A long record laid out on two processor cores at once.

Why: WeasyPrint lays a document out on one core, and a large job's record (hundreds of
conductor ends, each with two readings) takes it several seconds even as a bare table.
The shop's server has more than one core, and the approving lead waits on that render.

How, when the job has at least `settings.RECORD_SPLIT_MIN_ENDS` conductor ends and
`settings.RECORD_RENDER_PROCESSES` is 2 or more:

1. `worker_for(job)` starts the worker (pdf_worker.py) BEFORE the record's data is
   gathered, so that its import of WeasyPrint runs beside the app's queries.
2. `part_contexts(context)`: the record in two parts, cut at a page break it always has
   (the torque log starts a page, record.css): the front (cover, system, schedule,
   findings) and the back (torque log to the last page). Cutting inside the torque log
   would balance finer but leave a part-filled page in the middle of the log.
3. The worker lays out the back while this process loads WeasyPrint (when it has not
   yet) and lays out the front, as PDF/A-3b with the attached CSV and JSON: on the large
   bench job the two sides take about the same time. The worker says its page count as
   soon as its part is paginated, so the page numbers are rendered here while it still
   draws.
4. `merge`: pypdf appends the back's pages to the front document, whose catalog (PDF/A
   metadata, output intent, attached files) stays as WeasyPrint wrote it, then stamps
   "page x of y" on every page from a third, tiny document of as many empty pages that
   carries only that footer: neither part knows y while it is laid out, so both leave
   it out.

The result reads exactly as the record laid out in one process (tests/wiring/
test_render_split.py compares them line by line). If the worker fails in any way (cannot
start, exits non-zero, times out, returns something that is not a PDF), the whole
record is laid out here as one document and the failure is logged: the record is issued
a few seconds later, never not at all.
"""

from __future__ import annotations

import contextlib
import io
import json
import logging
import signal
import subprocess
import sys
import tempfile
import threading
from concurrent.futures import Future, ThreadPoolExecutor
from pathlib import Path

from django.conf import settings

log = logging.getLogger(__name__)

WORKER = Path(__file__).with_name("pdf_worker.py")
WORKER_TIMEOUT_S = 600
# Which of the record's runs of sections (html.RECORD_PARTS) are laid out where, in page
# order: here (with the attached data), then in the worker.
HERE, IN_WORKER = ("front",), ("torque", "end")
# Each part leaves the page numbers out; the numbers document (record.css, named page
# "numbers") carries nothing else.
NO_PAGE_NUMBERS_CSS = "@page { @bottom-right { content: none; } }"


class WorkerFailed(Exception):
    """The worker did not return its part's PDF (the message says why)."""


class Worker:
    """The second process (pdf_worker.py), started early and given one part to lay out.

    It answers on standard output with its page count on a line of its own as soon as
    its part is paginated (`pages()`: this process renders the page numbers meanwhile,
    while the worker still draws), then the PDF. Its standard error goes to a file, not
    a pipe: a worker that writes much there can never stall on a full pipe."""

    def __init__(self) -> None:
        # Closed in close(), which render_record_pdf always calls.
        self._stderr = tempfile.TemporaryFile()  # noqa: SIM115
        self.process = subprocess.Popen(
            [sys.executable, "-P", str(WORKER)],
            stdin=subprocess.PIPE,
            stdout=subprocess.PIPE,
            stderr=self._stderr,
        )
        self._pages: Future = Future()
        self._pool = ThreadPoolExecutor(max_workers=1)

    def lay_out(self, *, html: str, css_files: list[str], css_strings: list[str],
                variant: str | None) -> Future:  # fmt: skip
        """Send the part; the Future gives its PDF bytes (or raises WorkerFailed). The
        pipes are written and read in a thread, so this process lays out its own part
        meanwhile."""
        request = json.dumps(
            {"html": html, "css_files": css_files, "css_strings": css_strings,
             "variant": variant}
        ).encode("utf-8")  # fmt: skip
        return self._pool.submit(self._exchange, request)

    def pages(self) -> int:
        """Its part's page count, once it is paginated (WorkerFailed if never)."""
        return self._pages.result()

    def _exchange(self, request: bytes) -> bytes:
        timer = threading.Timer(WORKER_TIMEOUT_S, self.process.kill)
        timer.start()
        try:
            try:
                self.process.stdin.write(request)
                self.process.stdin.close()
            except OSError:
                pass  # it ended before reading it all: its exit status says why
            first = self.process.stdout.readline()
            if first.strip().isdigit():
                self._pages.set_result(int(first))
            out = self.process.stdout.read()
            self.process.wait()
        finally:
            timer.cancel()
            if not self._pages.done():
                self._pages.set_exception(WorkerFailed("it gave no page count"))
        if self.process.returncode != 0:
            self._stderr.seek(0)
            reason = self._stderr.read().decode("utf-8", "replace").strip() or "no message"
            if self.process.returncode == -signal.SIGKILL:
                reason = f"no answer within {WORKER_TIMEOUT_S} s"
            raise WorkerFailed(f"exit {self.process.returncode}: {reason.splitlines()[-1]}")
        if not first.strip().isdigit() or not out.startswith(b"%PDF-"):
            raise WorkerFailed("its answer is not a page count and a PDF")
        return out

    def close(self) -> None:
        """Stop the process if it still runs (nothing was sent, or this side failed)."""
        if self.process.poll() is None:
            self.process.kill()
            with contextlib.suppress(subprocess.TimeoutExpired):
                self.process.wait(timeout=10)
        self._pool.shutdown(wait=False)
        for pipe in (self.process.stdin, self.process.stdout):
            if pipe is not None and not pipe.closed:
                with contextlib.suppress(OSError):
                    pipe.close()
        self._stderr.close()


def worth_splitting(job) -> bool:
    if settings.RECORD_RENDER_PROCESSES < 2:
        return False
    from circuits.models import Termination

    ends = Termination.objects.filter(circuit__job=job).count()
    return ends >= settings.RECORD_SPLIT_MIN_ENDS


def worker_for(job) -> Worker | None:
    """A started worker when this job's record is long enough to split, else None."""
    if not worth_splitting(job):
        return None
    try:
        return Worker()
    except OSError as error:
        log.warning("record of %s laid out in one process: worker did not start: %s",
                    job.number, error)  # fmt: skip
        return None


def part_contexts(context: dict) -> tuple[dict, dict]:
    """The contexts of the front, laid out here, and the back, laid out in the worker
    (record.html reads `parts`)."""
    return {**context, "parts": HERE}, {**context, "parts": IN_WORKER}


def numbers_html(pages: int) -> str:
    """`pages` empty pages whose only content is the footer "page x of y" (record.css)."""
    return (
        '<!doctype html><html lang="en"><head><meta charset="utf-8"></head><body>'
        + '<div class="page-numbers"></div>' * pages
        + "</body></html>"
    )


def merge(front: bytes, back: bytes, numbers: bytes) -> bytes:
    """The front document with the back's pages after its own and every page stamped
    with its number from `numbers` (one page each)."""
    from pypdf import PdfReader, PdfWriter
    from pypdf.errors import PyPdfError

    with _quiet("pypdf._writer"):
        writer = PdfWriter(clone_from=PdfReader(io.BytesIO(front)))
    info = dict(writer.metadata or {})
    try:
        writer.append(PdfReader(io.BytesIO(back)))
    except PyPdfError as error:
        raise WorkerFailed(f"its PDF could not be read: {error}") from error
    stamps = PdfReader(io.BytesIO(numbers)).pages
    if len(stamps) != len(writer.pages):
        raise ValueError(f"{len(stamps)} page numbers for {len(writer.pages)} pages")
    for page, stamp in zip(writer.pages, stamps, strict=True):
        page.merge_page(stamp)
        # merge_page leaves the joined content uncompressed: several times the file size.
        page.compress_content_streams()
    # Each stamped page brought its own copy of the colour profile (and the replaced
    # content streams stay behind unreferenced): one copy of each, nothing left over.
    writer.compress_identical_objects(remove_duplicates=True, remove_unreferenced=True)
    # The document information must stay as WeasyPrint wrote it: PDF/A requires it to
    # agree with the XMP metadata, which pypdf does not rewrite.
    writer.metadata = info
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


@contextlib.contextmanager
def _quiet(logger_name: str):
    """Hold back one library logger's warnings for a moment. pypdf warns on every clone
    of a WeasyPrint file ("Object count ... exceeds defined trailer size": it counts the
    objects of the compressed object streams twice) and writes a right /Size anyway."""
    logger = logging.getLogger(logger_name)
    level = logger.level
    logger.setLevel(logging.ERROR)
    try:
        yield
    finally:
        logger.setLevel(level)
