"""URL routes of the wiring record pages; each views module declares its own."""

from __future__ import annotations

from wiring.views import owner, record, revisions, verify

urlpatterns = [
    *record.urlpatterns,
    *revisions.urlpatterns,
    *owner.urlpatterns,
    *verify.urlpatterns,
]
