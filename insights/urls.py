"""The shop insight pages: each views module declares its own urlpatterns."""

from __future__ import annotations

from insights.views import loosening, rules, technicians, wrenches

urlpatterns = [
    *loosening.urlpatterns,
    *wrenches.urlpatterns,
    *technicians.urlpatterns,
    *rules.urlpatterns,
]
