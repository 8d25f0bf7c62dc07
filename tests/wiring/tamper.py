"""Ways a signed record can be altered after it leaves the shop, for the verify tests:
each returns new bytes and leaves the original alone."""

from __future__ import annotations

import io

import pypdf

from wiring import signing


def signed_range(data: bytes) -> tuple[int, int, int, int]:
    from pyhanko.pdf_utils.reader import PdfFileReader

    signature = PdfFileReader(io.BytesIO(data)).embedded_signatures[0]
    return tuple(int(v) for v in signature.byte_range)


def change_one_byte(data: bytes) -> bytes:
    """One byte inside the signed content (before the signature value) changed."""
    _, first_length, _, _ = signed_range(data)
    at = first_length // 2
    return data[:at] + bytes([data[at] ^ 0x01]) + data[at + 1 :]


def append_page(data: bytes) -> bytes:
    """An incremental update after signing that adds a blank page (the signed revision
    stays intact inside the file)."""
    writer = pypdf.PdfWriter(io.BytesIO(data), incremental=True)
    writer.add_blank_page(width=595, height=842)
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def strip_signature(data: bytes) -> bytes:
    """The pages copied into a new PDF without the signature field."""
    reader = pypdf.PdfReader(io.BytesIO(data))
    writer = pypdf.PdfWriter()
    for page in reader.pages:
        if "/Annots" in page:
            del page["/Annots"]
        writer.add_page(page)
    out = io.BytesIO()
    writer.write(out)
    return out.getvalue()


def resign_with_other_key(data: bytes) -> bytes:
    """The signature stripped, then the copy signed with a key that is not the shop's."""
    other = signing.generate_credentials(shop_name="Lakeside Test Conversions")
    return signing.sign_pdf(
        strip_signature(data),
        reason="Wiring record JOB-2026-0001, revision 1, issued by Lakeside Test Conversions",
        location="elsewhere",
        stamp_lines=["Signed elsewhere"],
        credentials=other,
    )
