from __future__ import annotations

from django.apps import AppConfig


class WiringConfig(AppConfig):
    default_auto_field = "django.db.models.BigAutoField"
    name = "wiring"
    verbose_name = "Wiring records"
