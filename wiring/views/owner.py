"""Wiring record pages: owner (being built)."""

from __future__ import annotations

urlpatterns: list = []
