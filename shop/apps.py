from __future__ import annotations

from django.apps import AppConfig


class ShopConfig(AppConfig):
    name = "shop"
    verbose_name = "Shop, owners and jobs"

    def ready(self) -> None:
        # The sign-in receivers for the security log.
        from shop import signals  # noqa: F401
