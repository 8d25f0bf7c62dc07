"""Exceptions raised by the sizing engine.

All of them subclass ``ValueError`` so that callers which only know "the input was
bad" can catch one type, while the command line and the web form can still tell a
unit mistake from a size-notation mistake.
"""

from __future__ import annotations

__all__ = ["SizeNotationError", "SizingError", "UnitError"]


class SizingError(ValueError):
    """An input to the sizing engine is out of range or inconsistent."""


class UnitError(SizingError):
    """A quantity cannot be read, has no unit or one not on its kind's allow-list, or is
    outside its field's range (``quantity.LIMITS``). The message is fit to show beside
    the field."""


class SizeNotationError(SizingError):
    """A conductor size was written in a form the engine does not accept."""
