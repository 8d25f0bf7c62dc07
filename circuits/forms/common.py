"""What the electrical-system forms share: torque entry checks, terminal choices, and
showing saved decimals as typed."""

from __future__ import annotations

from decimal import Decimal

from django import forms
from django.core.exceptions import ValidationError

from circuits.entry import number_entry
from circuits.models import Circuit, Terminal
from shop.fields import IdChoiceField

# Nominal AC voltage of each vehicle AC system, for AC circuits left blank.
AC_VOLTS = {"120_60": Decimal("120"), "230_50": Decimal("230")}
AC_ROLES = (Circuit.Role.SHORE_SUPPLY, Circuit.Role.AC_BRANCH)


def check_torque(form: forms.ModelForm, value_name: str, unit_name: str) -> None:
    """A torque typed as a bare number in the unit chosen beside it, within
    LIMITS["torque"] once converted to N·m."""
    value, unit = form.cleaned_data.get(value_name), form.cleaned_data.get(unit_name)
    if value is None or not unit:
        return
    try:
        number_entry(value, unit, kind="torque", field="torque")
    except ValidationError as exc:
        form.add_error(value_name, exc)


class TerminalChoiceField(IdChoiceField):
    """Terminal choices: 'B+ (DC positive)', prefixed with the device when the list
    spans several devices."""

    def __init__(self, *args, with_device: bool = True, **kwargs):
        self.with_device = with_device
        super().__init__(*args, **kwargs)

    def label_from_instance(self, obj: Terminal) -> str:
        label = f"{obj.name} ({obj.get_polarity_display()})"
        return f"{obj.device.name}: {label}" if self.with_device else label


def as_typed(form: forms.ModelForm, names: tuple[str, ...]) -> None:
    """Show a saved record's decimals as a person types them ("9", not "9.00")."""
    if form.instance.pk and not form.is_bound:
        for name in names:
            value = getattr(form.instance, name)
            if value is not None:
                form.initial[name] = format(Decimal(value).normalize(), "f")
