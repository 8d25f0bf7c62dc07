"""Load the invented demo shop. Safe to run twice; refuses to mix with real records."""

from __future__ import annotations

from django.core.management.base import BaseCommand, CommandError

from shop import demo


class Command(BaseCommand):
    help = "Load the demo shop, staff, owners, vehicles and jobs (idempotent)."

    def add_arguments(self, parser) -> None:
        parser.add_argument(
            "--force",
            action="store_true",
            help="Load even though the database holds records that are not demo data.",
        )

    def handle(self, *args, force: bool = False, **options) -> None:
        foreign = demo.foreign_records()
        if foreign and not force:
            found = ", ".join(f"{n} {kind}" for kind, n in foreign.items())
            raise CommandError(
                f"This database holds records that are not demo data ({found}); "
                "rerun with --force to add the demo beside them."
            )
        staff = demo.load()
        self.stdout.write(self.style.SUCCESS("Demo shop loaded. Sign in with:"))
        for username, role, password in staff:
            self.stdout.write(f"  {role:<11} {username:<8} password: {password}")
