"""``python manage.py size``: size one circuit from the shell.

Every value is read by the same strict parser as the circuit form and the CSV import
(circuits.sizing.quantity), with the same ranges (LIMITS). Bad input, and an unknown or
missing argument, exits with status 2 and one line on stderr, never a traceback; the
engine itself lives in ``circuits.sizing`` and knows no Django.

Exit status, for scripts that size a schedule: 0 when no finding is blocking, 1 when at
least one is (the report is printed all the same), 2 for bad input.
"""

from __future__ import annotations

import json
import sys
from typing import Any, NoReturn

from django.core.management.base import BaseCommand, CommandError, CommandParser

from circuits.sizing import (
    CAUTION,
    CircuitInput,
    Report,
    SizingError,
    parse_quantity,
    parse_size,
    size_circuit,
)
from circuits.sizing.quantity import MAX_CHARS

_EXAMPLE = 'python manage.py size --volts 12 --amps 20 --length "10 ft" --size 10'
EXIT_CLEAN, EXIT_BLOCKING, EXIT_BAD_INPUT = 0, 1, 2
_EPILOG = (
    "Exit status: 0 when no finding is blocking, 1 when at least one finding is blocking "
    "(the report is printed all the same), 2 for bad input (one line on stderr)."
)


def _one_line(message: str) -> str:
    """The message with line breaks and other unprintable characters escaped, so an
    argument holding a newline cannot spread the error over several lines."""
    return "".join(ch if ch.isprintable() or ch == " " else ascii(ch)[1:-1] for ch in message)


def _read(text: str, *, kind: str, field: str, what: str) -> float:
    """A value with or without its unit ("20", "20 A"), within LIMITS[field]."""
    return parse_quantity(text, kind=kind, field=field, what=what).value


def _optional(text: str | None, *, kind: str, field: str, what: str) -> float | None:
    return None if text is None else _read(text, kind=kind, field=field, what=what)


def _size(text: str | None):
    if text is None:
        return None
    if len(text) > MAX_CHARS:  # before any other work, as for every other value
        raise SizingError(
            f"the conductor size is {len(text)} characters long; write at most {MAX_CHARS}"
        )
    return parse_size(text)


class Command(BaseCommand):
    # The engine needs no database and no app registry checks; skipping them keeps
    # the command quick and independent of the rest of the project's state.
    requires_system_checks: list[str] = []
    help = (
        "Size one circuit: ampacity after every factor, round-trip voltage drop and "
        f"protection; recommends a size when --size is not given. Example: {_EXAMPLE}"
    )

    def create_parser(self, prog_name: str, subcommand: str, **kwargs: Any) -> CommandParser:
        parser = super().create_parser(prog_name, subcommand, **kwargs)

        def error(message: str) -> NoReturn:
            # argparse would print the nine-line usage first; one line says what is wrong.
            if parser.called_from_command_line:
                self.stderr.write(f"size: {_one_line(message)} (see python manage.py size --help)")
                sys.exit(EXIT_BAD_INPUT)
            raise CommandError(f"Error: {_one_line(message)}", returncode=EXIT_BAD_INPUT)

        parser.error = error  # type: ignore[method-assign]
        parser.epilog = _EPILOG
        return parser

    def run_from_argv(self, argv: list[str]) -> None:
        # From the shell the verdict is the exit status; call_command() callers read
        # `verdict` (and the printed report) instead of catching an exit.
        self.verdict = EXIT_CLEAN
        super().run_from_argv(argv)
        if self.verdict != EXIT_CLEAN:
            sys.exit(self.verdict)

    def add_arguments(self, parser: CommandParser) -> None:
        parser.add_argument("--volts", required=True, help="nominal system voltage, e.g. 12")
        parser.add_argument("--amps", required=True, help="design current, e.g. 20")
        parser.add_argument(
            "--length", required=True, help='one-way run with its unit: "10 ft", "3 m", "120 in"'
        )
        parser.add_argument("--size", help="conductor to evaluate: 10, 4/0, 0000, 35 mm², ...")
        parser.add_argument(
            "--insulation", default="105", help="insulation rating °C (60/75/80/90/105/125/200)"
        )
        parser.add_argument(
            "--engine-space", action="store_true", help="run inside an engine space"
        )
        parser.add_argument("--bundled", default="1", help="current-carrying conductors bundled")
        parser.add_argument("--parallel", default="1", help="identical conductors in parallel")
        limit = parser.add_mutually_exclusive_group()
        limit.add_argument("--drop", metavar="PCT", help="voltage-drop limit in percent")
        limit.add_argument("--critical", action="store_true", help="critical load: 3 %% limit")
        parser.add_argument("--continuous", action="store_true", help="load runs 3 h or more")
        parser.add_argument("--protection", metavar="AMPS", help="fuse or breaker rating")
        parser.add_argument("--temp", metavar="DEG_C", help="conductor temperature for the drop")
        parser.add_argument("--ambient", metavar="DEG_C", help="ambient temperature")
        parser.add_argument("--tinned", action="store_true", help="tinned copper")
        parser.add_argument("--ac", action="store_true", help="AC branch circuit or shore supply")
        parser.add_argument("--sheathed", action="store_true", help="conductor inside a sheath")
        parser.add_argument("--metric", action="store_true", help="recommend a metric size")
        parser.add_argument("--json", action="store_true", help="print one JSON object")

    def handle(self, *args: Any, **options: Any) -> None:
        try:
            inp = self._input(options)
            report = size_circuit(inp)
        except ValueError as exc:  # SizingError, UnitError, SizeNotationError
            raise CommandError(_one_line(str(exc)), returncode=EXIT_BAD_INPUT) from exc
        blocking = any(f.severity == "blocking" for f in report.findings)
        self.verdict = EXIT_BLOCKING if blocking else EXIT_CLEAN
        if options["json"]:
            self.stdout.write(json.dumps(report.to_dict(), ensure_ascii=False, indent=2))
        else:
            self.stdout.write(_summary(report))

    @staticmethod
    def _input(options: dict[str, Any]) -> CircuitInput:
        size_text = options["size"]
        ac = options["ac"]
        volts_field = "ac_voltage" if ac else "dc_voltage"
        return CircuitInput(
            system_voltage_v=_read(options["volts"], kind="voltage", field=volts_field,
                                   what="voltage"),
            current_a=_read(options["amps"], kind="current", field="current", what="current"),
            length_m=_read(options["length"], kind="length", field="length", what="length"),
            size=_size(size_text),
            size_text=size_text,
            insulation_c=int(_read(options["insulation"], kind="temperature",
                                   field="insulation", what="insulation rating")),
            engine_space=options["engine_space"],
            bundled=int(_read(options["bundled"], kind="number", field="bundled",
                              what="--bundled count")),
            parallel=int(_read(options["parallel"], kind="number", field="parallel",
                               what="--parallel count")),
            critical=options["critical"],
            drop_limit_pct=_optional(options["drop"], kind="percent", field="drop",
                                     what="voltage-drop limit"),
            continuous=options["continuous"],
            protection_a=_optional(options["protection"], kind="current", field="protection",
                                   what="protection rating"),
            conductor_temp_c=_optional(options["temp"], kind="temperature",
                                       field="temperature", what="conductor temperature"),
            tinned=options["tinned"],
            ac=ac,
            ambient_c=_optional(options["ambient"], kind="temperature", field="temperature",
                                what="ambient temperature"),
            sheathed=options["sheathed"],
            metric=options["metric"],
        )  # fmt: skip


def _summary(report: Report) -> str:
    inp = report.input
    kind = "AC" if inp.ac else "DC"
    lines = [
        f"Circuit: {inp.system_voltage_v:g} V {kind}, {inp.current_a:g} A"
        f"{' continuous' if inp.continuous else ''}, {inp.length_m:.3g} m one way, "
        f"{inp.insulation_c} °C insulation{', engine space' if inp.engine_space else ''}",
        "Recommended: "
        + (report.recommended_size.label if report.recommended_size else "no size fits"),
    ]
    r = report.result
    if r is not None:
        times = f" ×{r.parallel}" if r.parallel > 1 else ""
        table = f"{r.table_ampacity_a:g} A" if r.table_ampacity_a is not None else "no value"
        ratings = ", ".join(f"{x:g}" for x in r.standard_ratings) or "none"
        lines += [
            f"Size evaluated: {r.size.label}{times}",
            f"Ampacity: {r.ampacity_a:.4g} A after every factor (table {table}; {r.table_source})",
            f"Voltage drop: {r.voltage_drop_v:.3g} V ({r.voltage_drop_pct:.3g} %) over the round "
            f"trip at {r.conductor_temp_c:g} °C; limit {r.drop_limit_pct:g} %",
            f"Protection: at least {r.min_protection_a:.4g} A, at most {r.max_protection_a:.4g} A;"
            f" standard ratings: {ratings}",
        ]
    lines.append("Findings:" if report.findings else "Findings: none")
    lines += [f"  [{f.severity}] {f.code}: {f.message} ({f.source})" for f in report.findings]
    lines.append(CAUTION)
    return "\n".join(lines)
