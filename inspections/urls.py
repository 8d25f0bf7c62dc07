"""URL routes of the inspections pages; each views module declares its own."""

from __future__ import annotations

from inspections.views import checklists, heat, office, review, signing, torque

urlpatterns = [
    *torque.urlpatterns,
    *heat.urlpatterns,
    *checklists.urlpatterns,
    *office.urlpatterns,
    *signing.urlpatterns,
    *review.urlpatterns,
]
