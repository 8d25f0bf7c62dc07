from __future__ import annotations

from django.apps import AppConfig


class RemindersConfig(AppConfig):
    default_auto_field = "django.db.models.BigAutoField"
    name = "reminders"
    verbose_name = "Re-check reminders"
