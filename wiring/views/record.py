"""Wiring record pages: record (being built)."""

from __future__ import annotations

urlpatterns: list = []
