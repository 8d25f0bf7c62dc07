"""Reading the record PDFs in tests with pypdf: text, embedded files, fonts, metadata."""

from __future__ import annotations

import io

import pypdf


def reader(pdf: bytes) -> pypdf.PdfReader:
    return pypdf.PdfReader(io.BytesIO(pdf))


def text_of(pdf: bytes) -> str:
    return "\n".join(page.extract_text() for page in reader(pdf).pages)


def embedded(pdf: bytes) -> dict[str, bytes]:
    attachments = reader(pdf).attachments
    return {name: attachments[name][0] for name in attachments}


def font_names(pdf: bytes) -> set[str]:
    """Base font names used on the pages, without the subset prefix (ABCDEF+)."""
    names = set()
    for page in reader(pdf).pages:
        fonts = page["/Resources"].get("/Font", {})
        for ref in fonts.values():
            base = str(ref.get_object()["/BaseFont"])
            names.add(base.split("+", 1)[-1])
    return names


def xmp(pdf: bytes) -> str:
    root = reader(pdf).trailer["/Root"]
    return root["/Metadata"].get_object().get_data().decode("utf-8")
