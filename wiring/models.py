"""The wiring record's revisions and the owner's private links (being built)."""

from __future__ import annotations
