"""``python manage.py size``: size one circuit from the shell.

Bad input exits with status 2 and one line on stderr (CommandError with
returncode=2); the engine itself lives in ``circuits.sizing`` and knows no Django.
"""

from __future__ import annotations

import json
import math
from typing import Any

from django.core.management.base import BaseCommand, CommandError, CommandParser

from circuits.sizing import (
    CAUTION,
    CircuitInput,
    Report,
    SizingError,
    parse_length,
    parse_size,
    size_circuit,
)
from circuits.sizing.units import parse_positive

_EXAMPLE = 'python manage.py size --volts 12 --amps 20 --length "10 ft" --size 10'


def _number(text: str, name: str, unit: str, dimension: str) -> float:
    """A positive number, bare (``20``) or with a unit (``20 A``)."""
    try:
        value = float(text)
    except ValueError:
        return parse_positive(text, unit, dimension, name)
    if not math.isfinite(value) or value <= 0.0:
        raise SizingError(f"the {name} must be greater than zero (got {text})")
    return value


def _whole(text: str, name: str) -> int:
    try:
        return int(text)
    except ValueError as exc:
        raise SizingError(f"{name} must be a whole number (got {text!r})") from exc


def _float(text: str, name: str) -> float:
    try:
        value = float(text)
    except ValueError as exc:
        raise SizingError(f"{name} must be a number (got {text!r})") from exc
    if not math.isfinite(value):
        raise SizingError(f"{name} must be a finite number (got {text!r})")
    return value


class Command(BaseCommand):
    # The engine needs no database and no app registry checks; skipping them keeps
    # the command quick and independent of the rest of the project's state.
    requires_system_checks: list[str] = []
    help = (
        "Size one circuit: ampacity after every factor, round-trip voltage drop and "
        f"protection; recommends a size when --size is not given. Example: {_EXAMPLE}"
    )

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
            raise CommandError(str(exc), returncode=2) from exc
        if options["json"]:
            self.stdout.write(json.dumps(report.to_dict(), ensure_ascii=False, indent=2))
        else:
            self.stdout.write(_summary(report))

    @staticmethod
    def _input(options: dict[str, Any]) -> CircuitInput:
        size_text = options["size"]
        return CircuitInput(
            system_voltage_v=_number(options["volts"], "voltage", "volt", "[electric_potential]"),
            current_a=_number(options["amps"], "current", "ampere", "[current]"),
            length_m=parse_length(options["length"]),
            size=parse_size(size_text) if size_text is not None else None,
            size_text=size_text,
            insulation_c=_whole(options["insulation"], "the insulation rating"),
            engine_space=options["engine_space"],
            bundled=_whole(options["bundled"], "--bundled"),
            parallel=_whole(options["parallel"], "--parallel"),
            critical=options["critical"],
            drop_limit_pct=_float(options["drop"], "--drop") if options["drop"] else None,
            continuous=options["continuous"],
            protection_a=(
                _number(options["protection"], "protection rating", "ampere", "[current]")
                if options["protection"] is not None
                else None
            ),
            conductor_temp_c=_float(options["temp"], "--temp") if options["temp"] else None,
            tinned=options["tinned"],
            ac=options["ac"],
            ambient_c=_float(options["ambient"], "--ambient") if options["ambient"] else None,
            sheathed=options["sheathed"],
            metric=options["metric"],
        )


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
