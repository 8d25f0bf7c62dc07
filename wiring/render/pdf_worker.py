"""A second process that lays out one part of a long record (wiring/render/split.py).

Run as `python -P wiring/render/pdf_worker.py` (`-P`: this folder is NOT put on the import
path, where `html.py` would hide the standard library's `html`). It imports WeasyPrint
first, while the app is still gathering the record's data, then reads ONE request from
standard input, a JSON object:

    {"html": "...", "css_files": ["/abs/record.css"], "css_strings": ["@page {...}"],
     "variant": "pdf/a-3b" or null}

and writes to standard output its page count on a line of its own, as soon as the part
is paginated, then the PDF bytes; exit 0. On any failure: one line on standard error and
exit 1 (the app then lays the whole record out itself).

No Django here: the request carries everything, and the worker reads nothing but the
stylesheet files it is named and data: URLs, as the app's own renderer (pdf.py).
"""

from __future__ import annotations

import gc
import json
import sys


def main() -> int:
    try:
        from weasyprint import CSS, HTML
        from weasyprint.urls import URLFetcher

        request = json.loads(sys.stdin.buffer.read().decode("utf-8"))
        fetcher = URLFetcher(allowed_protocols={"data"})
        sheets = [CSS(filename=f, url_fetcher=fetcher) for f in request["css_files"]]
        sheets += [CSS(string=s, url_fetcher=fetcher) for s in request["css_strings"]]
        # As pdf.py's _no_cyclic_gc, and for the same reason: the layout's boxes are freed
        # by reference counting; the collector's walks over them cost ~15 % of the time.
        gc.disable()
        options = {"stylesheets": sheets, "pdf_variant": request["variant"]}
        html = HTML(string=request["html"], base_url="data:,", url_fetcher=fetcher)
        document = html.render(**options)
        # The page count first, on its own line: the app needs it for the page numbers
        # and renders them while this process still draws its pages.
        sys.stdout.buffer.write(f"{len(document.pages)}\n".encode("ascii"))
        sys.stdout.buffer.flush()
        pdf = document.write_pdf(**options)
    except Exception as error:  # one line for the app's log, whatever it was
        print(f"pdf worker: {type(error).__name__}: {error}".splitlines()[0], file=sys.stderr)
        return 1
    sys.stdout.buffer.write(pdf)
    sys.stdout.buffer.flush()
    return 0


if __name__ == "__main__":
    sys.exit(main())
