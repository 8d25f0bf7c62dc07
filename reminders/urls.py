"""URL routes of the re-check pages."""

from __future__ import annotations

from reminders.views import urlpatterns

__all__ = ["urlpatterns"]
