"""Argument errors of the shop's commands in one line on stderr (exit status 2), as
`size` and `send_reminders` do: argparse would print the whole usage first, and a cron
log or a script reads the one line that says what is wrong. A CommandError's message
is made one line too."""

from __future__ import annotations

import sys
from typing import Any, NoReturn

from django.core.management.base import CommandError, CommandParser

EXIT_BAD_ARGUMENTS = 2


class OneLineArgumentErrors:
    """Mix into a BaseCommand before it: `class Command(OneLineArgumentErrors, BaseCommand)`."""

    def create_parser(self, prog_name: str, subcommand: str, **kwargs: Any) -> CommandParser:
        parser = super().create_parser(prog_name, subcommand, **kwargs)  # type: ignore[misc]

        def error(message: str) -> NoReturn:
            line = " ".join(str(message).split())
            if parser.called_from_command_line:
                self.stderr.write(
                    f"{subcommand}: {line} (see python manage.py {subcommand} --help)"
                )  # type: ignore[attr-defined]
                sys.exit(EXIT_BAD_ARGUMENTS)
            raise CommandError(f"Error: {line}", returncode=EXIT_BAD_ARGUMENTS)

        parser.error = error  # type: ignore[method-assign]
        return parser

    def execute(self, *args: Any, **options: Any) -> Any:
        # A refusal that repeats a name from the shell (a file, a job number) stays one
        # line even when the name holds a line break.
        try:
            return super().execute(*args, **options)  # type: ignore[misc]
        except CommandError as error:
            line = " ".join(str(error).split())
            raise CommandError(line, returncode=error.returncode) from None
