"""URL routes of the electrical-system pages; each views module declares its own."""

from __future__ import annotations

from circuits.views import (
    csv_io,
    devices,
    diagram,
    editor,
    labels,
    schedule,
    terminations,
    torque_defaults,
    waivers,
)

urlpatterns = [
    *schedule.urlpatterns,
    *editor.urlpatterns,
    *devices.urlpatterns,
    *terminations.urlpatterns,
    *waivers.urlpatterns,
    *torque_defaults.urlpatterns,
    *diagram.urlpatterns,
    *labels.urlpatterns,
    *csv_io.urlpatterns,
]
