"""Migrate, load the demo into an empty database, and serve the app on 127.0.0.1:8000."""

from __future__ import annotations

from django.core.management import call_command
from django.core.management.base import BaseCommand

from shop.models import Job, Owner, Vehicle


class Command(BaseCommand):
    help = "Set up the database (with demo data when empty) and run the development server."

    def add_arguments(self, parser) -> None:
        parser.add_argument("--addrport", default="127.0.0.1:8000")
        parser.add_argument("--no-serve", action="store_true", help="Prepare only; do not serve.")

    def handle(self, *args, addrport: str, no_serve: bool, **options) -> None:
        call_command("migrate", interactive=False, verbosity=0)
        empty = not (Owner.objects.exists() or Vehicle.objects.exists() or Job.objects.exists())
        if empty:
            call_command("demo", stdout=self.stdout)
        else:
            self.stdout.write("Database already holds records; demo not loaded.")
        if not no_serve:
            call_command("runserver", addrport, use_reloader=False)
