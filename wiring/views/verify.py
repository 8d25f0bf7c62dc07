"""Wiring record pages: verify (being built)."""

from __future__ import annotations

urlpatterns: list = []
