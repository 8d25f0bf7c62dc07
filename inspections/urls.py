"""URL routes of the inspections pages; each views module declares its own."""

from __future__ import annotations

from inspections.views import (
    calibration,
    checklists,
    heat,
    office,
    return_visit,
    review,
    signing,
    torque,
)

urlpatterns = [
    *torque.urlpatterns,
    *heat.urlpatterns,
    *checklists.urlpatterns,
    *office.urlpatterns,
    *signing.urlpatterns,
    *review.urlpatterns,
    *calibration.urlpatterns,
    *return_visit.urlpatterns,
]
