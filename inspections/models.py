"""Stages, checklists, torque records, sign-offs and the wiring record (later issues)."""

from __future__ import annotations
