"""URL routes of the electrical-system pages; each views module declares its own."""

from __future__ import annotations

from importlib import import_module

_MODULES = [
    "schedule",
    "editor",
    "devices",
    "terminations",
    "waivers",
    "torque_defaults",
    "diagram",
    "labels",
    "csv_io",
]

urlpatterns = []
for _name in _MODULES:
    try:
        _module = import_module(f"circuits.views.{_name}")
    except ModuleNotFoundError as exc:  # a feature module not written yet
        if exc.name != f"circuits.views.{_name}":
            raise
        continue
    urlpatterns += _module.urlpatterns
