"""The circuit schedule as CSV: export a job's circuits, import them back.

One column set both ways (`COLUMNS`, documented in `COLUMN_HELP` and on the import page):

- Choices are written as their values (`interconnect`, `fine`, `green_yellow`); an import
  also accepts the labels shown in the app (`Battery interconnect`, `Fine-stranded`).
- Yes/no columns are `yes` or `no` (`true`/`false`, `y`/`n`, `1`/`0` also read).
- `length` is the one-way length with its unit, `3.5 m` or `12 ft`; the unit is kept as
  the circuit's display unit. `protection_distance_m` is in metres (a unit may be given).
- Numbers are read by the same strict parser as the circuit form (circuits.sizing.
  quantity), with the same ranges: `12 V`, `20 A`, `90 °C` and a decimal comma are read;
  NaN, infinities, exponents beyond e±6 and values outside the field's range are errors.
- Devices and terminals are named as recorded on the job; they must exist already.
  `protection_device` names the fuse or breaker holder (or external supply) at one end of
  the run whose fuse or breaker is the circuit's protection; its rating and type are read
  from that device, and `protection_type` is then `none` (an empty cell means that too).
- Each conductor's colour is its insulation (`bare` for a bare earth); a re-marking has
  its own three columns per conductor (`marking_a_method`: tape, heat_shrink or
  printed_band; `marking_a_colour`; `marking_a_ends`: from, to or both).
- Files from before re-marking had its own columns carry `tape_remarked`; it is still read:
  `yes` becomes a tape re-marking at both ends of the conductor the 0006 migration picks
  (the earth of an earth-only or bonding circuit, the negative of a negative-only one,
  else the positive / line), in that conductor's colour, unless the row gives that
  conductor's marking columns.
- Row numbers count the header as row 1, as a spreadsheet shows them.
- An import creates circuits with new tags and updates those whose tag exists; a column
  left out keeps each updated circuit's value (a new circuit takes the default), and an
  empty cell means the default. Nothing is deleted.
- If any row is wrong the whole file is refused, every error is listed and nothing is
  saved; otherwise all rows are written in one transaction through circuits.services.
- A text cell starting with = + - @ is written with a leading ' so a spreadsheet does not
  run it as a formula; that ' is dropped again on import.
"""

from __future__ import annotations

import csv
import io
from dataclasses import dataclass, field
from decimal import Decimal

from django.core.exceptions import ValidationError
from django.db import transaction

from circuits.csv_columns import (
    _BOOLEANS,
    _CHOICES,
    _FIELD_COLUMN,
    _FORMULA_START,
    _LIMITED,
    COLUMN_HELP,
    COLUMNS,
    LEGACY_COLUMNS,
    REQUIRED,
)
from circuits.entry import parse_length_entry
from circuits.models import FOOT_M, Circuit, Device, MarkingEnds, MarkingMethod
from circuits.services import circuit_create, circuit_update
from circuits.sizing import UnitError, parse_quantity
from circuits.sizing.quantity import check_limit
from circuits.tags import natural_by_tag

# The column tables live in circuits.csv_columns; the import page takes them from here.
__all__ = [
    "COLUMNS",
    "COLUMN_HELP",
    "LEGACY_COLUMNS",
    "MAX_ROWS",
    "REQUIRED",
    "CsvFileError",
    "ImportResult",
    "RowError",
    "circuits_from_csv",
    "circuits_to_csv",
    "read_upload",
]

MAX_ROWS = 2000


class CsvFileError(ValueError):
    """The upload is not a readable CSV text file."""


@dataclass(frozen=True)
class RowError:
    row: int | None  # spreadsheet row (header = 1); None for the file as a whole
    column: str | None
    message: str

    def __str__(self) -> str:
        where = [f"row {self.row}" if self.row else "file"] + ([self.column] if self.column else [])
        return f"{', '.join(where).capitalize()}: {self.message}"


@dataclass
class ImportResult:
    created: list[str] = field(default_factory=list)
    updated: list[str] = field(default_factory=list)
    errors: list[RowError] = field(default_factory=list)

    @property
    def ok(self) -> bool:
        return not self.errors

    @property
    def saved(self) -> int:
        return len(self.created) + len(self.updated)


# ---- export ------------------------------------------------------------------------


def _number(value: float | Decimal | None) -> str:
    if value is None:
        return ""
    if isinstance(value, Decimal):
        return f"{value.normalize():f}"
    return f"{value:.6f}".rstrip("0").rstrip(".")


def _safe(text: str) -> str:
    return "'" + text if text.startswith(_FORMULA_START) else text


def _length(circuit: Circuit) -> str:
    if circuit.length_unit == Circuit.LengthUnit.FT:
        return f"{_number(circuit.length_m / FOOT_M)} ft"
    return f"{_number(circuit.length_m)} m"


def _row(circuit: Circuit) -> list[str]:
    values = {
        "protection_device": circuit.protection_device.name if circuit.protection_device else "",
        "from_device": circuit.from_device.name,
        "from_terminal": circuit.from_terminal.name if circuit.from_terminal else "",
        "to_device": circuit.to_device.name,
        "to_terminal": circuit.to_terminal.name if circuit.to_terminal else "",
        "length": _length(circuit),
    }
    for name in COLUMNS:
        if name in values:
            continue
        value = getattr(circuit, name)
        if isinstance(value, bool):
            values[name] = "yes" if value else "no"
        elif isinstance(value, (Decimal, float)) or value is None:
            values[name] = _number(value)
        else:
            values[name] = str(value)
    return [_safe(values[name]) for name in COLUMNS]


def circuits_to_csv(job) -> str:
    """The job's circuit schedule as CSV text, header first, circuits by tag."""
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(COLUMNS)
    for circuit in natural_by_tag(job.circuits.for_schedule()):
        writer.writerow(_row(circuit))
    return out.getvalue()


# ---- import ------------------------------------------------------------------------


def read_upload(data: bytes) -> str:
    """Text of an uploaded CSV file (UTF-8, with or without a byte-order mark)."""
    if b"\x00" in data:
        raise CsvFileError("This is not a CSV text file. Export the sheet as CSV and try again.")
    try:
        return data.decode("utf-8-sig")
    except UnicodeDecodeError as exc:
        raise CsvFileError(
            f"The file is not UTF-8 text (unreadable byte at position {exc.start}). "
            "Save it as 'CSV UTF-8' and try again."
        ) from exc


def _shown(text: str) -> str:
    """A cell as quoted in a message: a long cell is cut, so errors stay readable."""
    return repr(text) if len(text) <= 40 else repr(text[:40]) + "…"


def _choice(column: str, text: str) -> str:
    choices = _CHOICES[column]
    for value, label in choices.choices:
        if text.lower() in (value.lower(), label.lower()):
            return value
    raise ValueError(f"{_shown(text)} is not one of: {', '.join(choices.values)}")


def _boolean(text: str) -> bool:
    key = text.lower()
    if key in ("yes", "y", "true", "1"):
        return True
    if key in ("no", "n", "false", "0"):
        return False
    raise ValueError(f"{_shown(text)} is not yes or no")


# Numeric column -> (kind, LIMITS field, how a message names it).
_NUMBERS = {
    "nominal_voltage": ("voltage", "voltage", "nominal voltage"),
    "design_current_a": ("current", "current", "design current"),
    "protection_a": ("current", "protection", "protection rating"),
    "parallel": ("number", "parallel", None),
    "bundled": ("number", "bundled", None),
    "insulation_c": ("temperature", "insulation", None),
}


def _numeric_cell(column: str, text: str) -> Decimal | int:
    """A numeric cell read by the strict parser: a Decimal in the SI unit, or an int for
    a whole-number field."""
    kind, limit, what = _NUMBERS[column]
    try:
        parsed = parse_quantity(text, kind=kind, field=limit, what=what)
    except UnitError as exc:
        raise ValueError(str(exc)) from None
    return int(parsed.value) if kind in ("number", "temperature") else parsed.decimal


def _length_cell(text: str) -> dict[str, object]:
    # The same reading as the circuit editor, so "120 in" shows back in feet both ways;
    # a unit must be written (a bare number is refused).
    try:
        metres, unit = parse_length_entry(text, None, what="length")
    except ValidationError as exc:
        raise ValueError(" ".join(exc.messages)) from None
    return {"length_m": metres, "length_unit": unit}


def _distance(text: str) -> float:
    try:
        metres, _ = parse_length_entry(text, "m", allow_zero=True, what="protection distance")
    except ValidationError as exc:
        raise ValueError(" ".join(exc.messages)) from None
    return metres


def _voltage_for_role(fields: dict) -> str | None:
    """The role's own voltage range (LIMITS["dc_voltage"] or ["ac_voltage"])."""
    volts = fields.get("nominal_voltage")
    if not isinstance(volts, Decimal):
        return None
    ac = fields.get("role") in (Circuit.Role.SHORE_SUPPLY, Circuit.Role.AC_BRANCH)
    try:
        check_limit(float(volts), field="ac_voltage" if ac else "dc_voltage", shown=f"{volts} V")
    except UnitError as exc:
        return str(exc)
    return None


def _too_long(column: str, text: str) -> str | None:
    """A text cell longer than its model field holds (checked before any other work, so
    a huge cell is never parsed)."""
    if column not in _LIMITED:
        return None
    most = _LIMITED[column]
    return f"{len(text)} characters; at most {most}" if len(text) > most else None


class _Devices:
    """The job's devices by name (exact, else the one whose name differs only in case)."""

    def __init__(self, job) -> None:
        self.all = list(job.devices.prefetch_related("terminals"))
        self.exact = {d.name: d for d in self.all}

    def get(self, name: str) -> Device:
        device = self.exact.get(name)
        matches = [d for d in self.all if d.name.lower() == name.lower()]
        if device is None and len(matches) == 1:
            device = matches[0]
        if device is None:
            raise ValueError(f"no device named {_shown(name)} on this job; add it first")
        return device

    def terminal(self, device: Device, name: str):
        for terminal in device.terminals.all():
            if terminal.name == name:
                return terminal
        raise ValueError(f"{device.name} has no terminal named {_shown(name)}")


def _convert(cells: dict[str, str], devices: _Devices) -> tuple[dict, list[tuple[str, str]]]:
    """Model field values from one row's cells; (column, message) for each bad cell."""
    fields: dict[str, object] = {}
    errors: list[tuple[str, str]] = []
    taped = False
    for column, text in cells.items():
        try:
            if too_long := _too_long(column, text):
                raise ValueError(too_long)
            if column == "tape_remarked":
                taped = _boolean(text) if text else False
            elif not text:
                if column in REQUIRED:
                    raise ValueError("required")
                model_field = Circuit._meta.get_field(column)
                fields[column] = None if model_field.null else model_field.get_default()
            elif column in ("from_device", "to_device", "protection_device"):
                fields[column] = devices.get(text)
            elif column in ("from_terminal", "to_terminal"):
                device = fields.get(column.replace("terminal", "device"))
                if isinstance(device, Device):
                    fields[column] = devices.terminal(device, text)
            elif column in _BOOLEANS:
                fields[column] = _boolean(text)
            elif column in _CHOICES:
                fields[column] = _choice(column, text)
            elif column == "length":
                fields.update(_length_cell(text))
            elif column in _NUMBERS:
                fields[column] = _numeric_cell(column, text)
            elif column == "protection_distance_m":
                fields[column] = _distance(text)
            else:
                fields[column] = text
        except ValueError as exc:
            errors.append((column, str(exc)))
    if "nominal_voltage" not in dict(errors) and (message := _voltage_for_role(fields)):
        errors.append(("nominal_voltage", message))
    if isinstance(fields.get("protection_device"), Device) and not cells.get("protection_type"):
        # The protection is the device's; the circuit's own in-line fields stay empty.
        fields["protection_type"] = Circuit.ProtectionType.NONE
    if taped:
        _legacy_tape(fields, cells)
    return fields, errors


def _legacy_tape(fields: dict, cells: dict[str, str]) -> None:
    """An old file's tape_remarked = yes, read as the 0006 migration reads the old tick."""
    conductors, role_name = fields.get("conductors", ""), fields.get("role", "")
    if conductors == Circuit.Conductors.EARTH or role_name == Circuit.Role.BONDING:
        role = "earth"
    else:
        role = "b" if conductors == Circuit.Conductors.NEGATIVE else "a"
    if any(cells.get(f"marking_{role}_{part}") for part in ("method", "colour", "ends")):
        return  # the row says how this conductor is marked
    colour = fields.get("colour_earth" if role == "earth" else f"colour_{role}") or ""
    if role == "earth" and not colour:
        colour = fields.get("colour_a") or ""
    fields[f"marking_{role}_method"] = MarkingMethod.TAPE
    fields[f"marking_{role}_colour"] = colour
    fields[f"marking_{role}_ends"] = MarkingEnds.BOTH


def _header(row: list[str]) -> tuple[list[str], list[RowError]]:
    names = [cell.strip().lower() for cell in row]
    errors = []
    unknown = [n for n in names if n not in COLUMNS and n not in LEGACY_COLUMNS]
    if unknown:
        errors.append(RowError(1, None, f"unknown columns: {', '.join(unknown)}"))
    missing = [n for n in REQUIRED if n not in names]
    if missing:
        errors.append(RowError(1, None, f"missing columns: {', '.join(missing)}"))
    twice = sorted({n for n in names if names.count(n) > 1})
    if twice:
        errors.append(RowError(1, None, f"columns given twice: {', '.join(twice)}"))
    return names, errors


def _records(text: str) -> list[list[str]]:
    try:
        return list(csv.reader(io.StringIO(text, newline="")))
    except csv.Error as exc:
        raise CsvFileError(f"The file cannot be read as CSV: {exc}.") from None


def _validate(job, fields: dict, existing: Circuit | None) -> list[tuple[str | None, str]]:
    """Check the circuit the row describes without saving anything."""
    circuit = existing if existing is not None else Circuit(job=job)
    for name, value in fields.items():
        setattr(circuit, name, value)
    try:
        circuit.full_clean()
    except ValidationError as exc:
        return [
            (_FIELD_COLUMN.get(name, name), message)
            for name, messages in exc.message_dict.items()
            for message in messages
        ]
    return []


def circuits_from_csv(*, job, text: str, allow_update: bool = True) -> ImportResult:
    """Create or update the job's circuits from CSV text, all or nothing."""
    result = ImportResult()
    try:
        records = _records(text)
    except CsvFileError as exc:
        result.errors.append(RowError(None, None, str(exc)))
        return result
    if not records or not any(cell.strip() for cell in records[0]):
        message = f"no header row; the first row names the columns: {', '.join(COLUMNS)}"
        result.errors.append(RowError(1, None, message))
        return result
    names, result.errors = _header(records[0])
    if result.errors:
        return result
    rows = [(i, r) for i, r in enumerate(records[1:], start=2) if any(c.strip() for c in r)]
    if not rows:
        result.errors.append(RowError(None, None, "the file has a header but no circuits"))
    if len(rows) > MAX_ROWS:
        result.errors.append(RowError(None, None, f"more than {MAX_ROWS} circuits in one file"))
        return result
    devices = _Devices(job)
    current = {c.tag: c for c in job.circuits.select_related("from_device", "to_device")}
    seen: dict[str, int] = {}
    plan: list[tuple[int, dict, Circuit | None]] = []
    for number, record in rows:
        if len(record) != len(names):
            message = f"{len(record)} cells where the header has {len(names)}"
            result.errors.append(RowError(number, None, message))
            continue
        cells = {n: _unsafe(cell.strip()) for n, cell in zip(names, record, strict=True)}
        fields, errors = _convert(cells, devices)
        tag = cells.get("tag", "")
        if tag in seen:
            errors.append(("tag", f"{tag} is already on row {seen[tag]}"))
        seen.setdefault(tag, number)
        existing = current.get(tag)
        if existing is not None and not allow_update:
            errors.append(("tag", f"{tag} exists and you may not change circuits"))
        if not errors:
            errors = _validate(job, fields, existing)
        result.errors += [RowError(number, column, message) for column, message in errors]
        plan.append((number, fields, existing))
    if result.errors:
        return result
    return _write(job, plan, result)


def _unsafe(text: str) -> str:
    return text[1:] if text.startswith("'") and text[1:].startswith(_FORMULA_START) else text


class _Rollback(Exception):
    pass


def _write(job, plan: list[tuple[int, dict, Circuit | None]], result: ImportResult):
    try:
        with transaction.atomic():
            for number, fields, existing in plan:
                try:
                    if existing is None:
                        result.created.append(circuit_create(job=job, **fields).tag)
                    else:
                        circuit = Circuit.objects.get(pk=existing.pk)
                        result.updated.append(circuit_update(circuit=circuit, **fields).tag)
                except ValidationError as exc:
                    result.errors += [
                        RowError(number, _FIELD_COLUMN.get(name, name), message)
                        for name, messages in exc.message_dict.items()
                        for message in messages
                    ]
                    raise _Rollback from exc
    except _Rollback:
        result.created, result.updated = [], []
    return result
