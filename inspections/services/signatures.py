"""The drawn signature: a PNG the signing pad sends as a data URL, checked before it is
stored as evidence. Whatever arrives is treated as hostile: it must be a real PNG
(Pillow decodes all of it), of a sane size in bytes and pixels, and not blank."""

from __future__ import annotations

import base64
import binascii
import io

from PIL import Image

from inspections.services.common import Errors, add_error

DATA_URL_PREFIX = "data:image/png;base64,"
PNG_MAGIC = b"\x89PNG\r\n\x1a\n"
# A finger signature on a tablet canvas is a few kilobytes to a few tens; a megabyte
# would be a photo or an attack, not a signature. Our limits, not a standard's.
MAX_BYTES = 512 * 1024
MIN_SIDE = 16
MAX_SIDE = 4000
MAX_PIXELS = 4_000_000

AGAIN = "clear the pad and sign again"


def _decode(value: object, errors: Errors, field: str) -> bytes | None:
    if isinstance(value, bytes | bytearray | memoryview):
        return bytes(value)
    if not isinstance(value, str):
        add_error(errors, field, "Sign in the box: no signature was drawn.")
        return None
    text = value.strip()
    if not text:
        add_error(errors, field, "Sign in the box: no signature was drawn.")
        return None
    if not text.startswith(DATA_URL_PREFIX):
        add_error(
            errors, field, f"The signature did not come from the signing pad as a PNG; {AGAIN}."
        )
        return None
    payload = text[len(DATA_URL_PREFIX) :]
    if len(payload) > MAX_BYTES * 4 // 3 + 4:
        add_error(errors, field, f"The signature image is larger than 512 KB; {AGAIN}.")
        return None
    try:
        return base64.b64decode(payload, validate=True)
    except (binascii.Error, ValueError):
        add_error(errors, field, f"The signature could not be read; {AGAIN}.")
        return None


def clean_signature(value: object, errors: Errors, *, field: str = "signature") -> bytes | None:
    """The PNG bytes of a drawn signature given as a data URL ("data:image/png;base64,…")
    or as bytes; None, with the reason in `errors`, for anything else."""
    raw = _decode(value, errors, field)
    if raw is None:
        return None
    if not raw:
        add_error(errors, field, "Sign in the box: no signature was drawn.")
        return None
    if len(raw) > MAX_BYTES:
        add_error(errors, field, f"The signature image is larger than 512 KB; {AGAIN}.")
        return None
    if not raw.startswith(PNG_MAGIC):
        add_error(errors, field, f"The signature is not a PNG image; {AGAIN}.")
        return None
    try:
        with Image.open(io.BytesIO(raw), formats=["PNG"]) as image:
            width, height = image.size
            # The size is read from the header, before any pixel is decoded, so an image
            # claiming to be enormous is refused without decompressing it.
            if not (MIN_SIDE <= width <= MAX_SIDE and MIN_SIDE <= height <= MAX_SIDE) or (
                width * height > MAX_PIXELS
            ):
                add_error(
                    errors,
                    field,
                    f"The signature image is {width} × {height} pixels, not the size of a"
                    f" signing pad; {AGAIN}.",
                )
                return None
            image.verify()
        with Image.open(io.BytesIO(raw), formats=["PNG"]) as image:
            image.load()  # decodes every row: a truncated or corrupt file fails here
            extrema = image.convert("RGBA").getextrema()
    except (OSError, SyntaxError, ValueError, Image.DecompressionBombError):
        add_error(errors, field, f"The signature image is damaged; {AGAIN}.")
        return None
    if all(low == high for low, high in extrema):
        add_error(errors, field, "The signature box is empty: sign in the box with a finger.")
        return None
    return raw
