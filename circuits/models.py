"""Devices, circuits and terminations (later issues); the sizing engine lives in circuits.sizing."""

from __future__ import annotations
