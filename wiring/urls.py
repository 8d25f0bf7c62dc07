"""URL routes of the wiring record pages; each views module declares its own."""

from __future__ import annotations

from wiring.views import owner, record, verify

urlpatterns = [*record.urlpatterns, *owner.urlpatterns, *verify.urlpatterns]
