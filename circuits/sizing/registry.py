"""The project's one pint unit registry. Every app reaches it through ``units`` (which
re-exports it); it lives alone here so that the strict parser (``quantity``) and the
parsers built on it (``units``) both take it from below instead of from each other.

pint's default definitions already give lbf, kgf (force_kilogram) and ozf (force_ounce)
with the exact factors NIST SP 811 uses (lb = 0.45359237 kg, g0 = 9.80665 m/s^2,
in = 0.0254 m), so torque needs no new definitions.
"""

from __future__ import annotations

import pint

ureg: pint.UnitRegistry = pint.UnitRegistry()
Q_ = ureg.Quantity
