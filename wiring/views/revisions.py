"""Wiring record pages: revisions (being built)."""

from __future__ import annotations

urlpatterns: list = []
