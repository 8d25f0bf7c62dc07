"""Forms of the electrical-system pages, one module a feature: `circuit` (the circuit
form), `device` (devices with their terminals inline), `specs` (terminations, the shop's
default torque specs, waivers), `common` (what they share). Every form is importable
from here (`from circuits.forms import CircuitForm`)."""

from __future__ import annotations

from circuits.forms.circuit import CircuitForm
from circuits.forms.common import AC_VOLTS
from circuits.forms.device import DeviceForm, TerminalFormSet, device_save_values
from circuits.forms.specs import TerminationForm, TorqueDefaultForm, WaiverForm
from circuits.models import format_length

__all__ = [
    "AC_VOLTS",
    "CircuitForm",
    "DeviceForm",
    "TerminalFormSet",
    "TerminationForm",
    "TorqueDefaultForm",
    "WaiverForm",
    "device_save_values",
    "format_length",
]
