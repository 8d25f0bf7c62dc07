from __future__ import annotations

from django.apps import AppConfig


class InsightsConfig(AppConfig):
    default_auto_field = "django.db.models.BigAutoField"
    name = "insights"
    verbose_name = "Shop insights"

    def ready(self) -> None:
        from django.db.backends.signals import connection_created

        from insights import checklist, queries
        from inspections.services.checklists import checklist_item_source

        # SQLite has no percentile aggregate: give every new SQLite connection one (see
        # insights.queries.Percentile).
        connection_created.connect(queries.register_sqlite_percentile, dispatch_uid="insights")
        # The shop rules add checklist items; inspections calls the registered source and
        # so never imports this app.
        checklist_item_source(checklist.rule_items)
