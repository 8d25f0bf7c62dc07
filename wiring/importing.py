"""Reading a wiring record PDF back into a job (`manage.py import_record FILE.pdf`), for
a vehicle that comes back for rework, perhaps from another shop running this app.

The PDF carries `record.json` (wiring/render/schema.md) and `schedule.csv` (the app's
CSV export) as embedded files. `read_record` takes both out with pypdf and checks the
JSON's schema and version and the keys the import needs; `import_record` creates, in
one transaction, the owner and vehicle (the vehicle matched by its identification, the
owner by name and e-mail, else created), a new job for it, and its devices, terminals,
circuits and terminations through the circuits services (devices through their form and
device_save, circuits through circuits_from_csv, terminations' specs through
termination_update). Nothing of the record's evidence (readings, sign-offs) is copied:
those describe work done then, and the new job's work is new; with `return_visit` the
record's final torque readings are kept as the last readings (not as evidence of the new
job) to be shown beside each end and compared with the re-check's.

Every refusal is a RecordImportError with one plain line saying why; nothing is saved.
"""

from __future__ import annotations

import io
import json
from decimal import Decimal, InvalidOperation

from django.core.exceptions import ValidationError
from django.db import transaction

from circuits.csv_io import circuits_from_csv
from circuits.forms import DeviceForm, TerminalFormSet, device_save_values
from circuits.models import Termination
from circuits.services import device_save, termination_update
from inspections.services.return_visit import prior_record_import
from shop.models import Job, Owner, Vehicle
from shop.services import job_create
from wiring.render.data import SCHEMA, SCHEMA_VERSION

MAX_PDF_BYTES = 200 * 1024 * 1024
REQUIRED = {
    "job": dict,
    "owner": dict,
    "vehicle": dict,
    "devices": list,
    "circuits": list,
    "terminations": list,
}
TERMINATION_FIELDS = (
    "kind",
    "stud_size",
    "torque_value",
    "torque_unit",
    "torque_tolerance_pct",
    "torque_source",
    "torque_source_note",
)


class RecordImportError(Exception):
    """The file cannot be imported; the message says why in one line."""


def _one_line(message: object) -> str:
    return " ".join(str(message).split())


def _validation_text(exc: ValidationError) -> str:
    if hasattr(exc, "message_dict"):
        return "; ".join(f"{k}: {' '.join(v)}" for k, v in exc.message_dict.items())
    return " ".join(exc.messages)


def read_record(data: bytes) -> tuple[dict, str]:
    """The record JSON and the schedule CSV embedded in a record PDF's bytes."""
    from pypdf import PdfReader
    from pypdf.errors import PyPdfError

    if not data.startswith(b"%PDF-"):
        raise RecordImportError("This file is not a PDF.")
    try:
        attachments = PdfReader(io.BytesIO(data)).attachments
        files = {name: attachments[name] for name in attachments}
    except (PyPdfError, ValueError, KeyError, TypeError, OSError) as exc:
        raise RecordImportError(f"This PDF cannot be read: {_one_line(exc)}") from exc
    if "record.json" not in files:
        raise RecordImportError("This PDF carries no record.json: it is not a wiring record.")
    if "schedule.csv" not in files:
        raise RecordImportError("This PDF carries no schedule.csv: it is not a wiring record.")
    try:
        record = json.loads(files["record.json"][0].decode("utf-8"))
        schedule = files["schedule.csv"][0].decode("utf-8")
    except (UnicodeDecodeError, json.JSONDecodeError, IndexError, RecursionError) as exc:
        raise RecordImportError(f"The embedded record is not readable: {_one_line(exc)}") from exc
    if "\x00" in schedule or _holds_nul(record):
        # PostgreSQL refuses NUL in text; a record of ours never holds one.
        raise RecordImportError(
            "The embedded record holds a NUL character, which cannot be stored."
        )
    check_record(record)
    return record, schedule


def _holds_nul(value: object) -> bool:
    """Whether any string in the decoded JSON holds a NUL (walked without recursion, as
    the JSON may be nested as deep as the decoder allows)."""
    stack = [value]
    while stack:
        item = stack.pop()
        if isinstance(item, str):
            if "\x00" in item:
                return True
        elif isinstance(item, dict):
            stack.extend(item.keys())
            stack.extend(item.values())
        elif isinstance(item, list):
            stack.extend(item)
    return False


def check_record(record: object) -> None:
    """Refuse a record of another schema, another version, or without what the import
    reads."""
    if not isinstance(record, dict) or record.get("schema") != SCHEMA:
        raise RecordImportError(f"The embedded record.json is not a {SCHEMA} record.")
    version = record.get("schema_version")
    if version != SCHEMA_VERSION:
        raise RecordImportError(
            f"The record is schema version {version!r}; this app reads version {SCHEMA_VERSION}."
        )
    missing = [key for key, kind in REQUIRED.items() if not isinstance(record.get(key), kind)]
    if missing:
        raise RecordImportError(f"The record lacks {', '.join(missing)}.")
    for device in record["devices"]:
        if not isinstance(device, dict) or not device.get("name"):
            raise RecordImportError("A device in the record has no name.")
    if not str(record["owner"].get("name") or "").strip():
        raise RecordImportError("The record names no owner.")


def _owner_vehicle(record: dict) -> Vehicle:
    given = record["vehicle"]
    identification = str(given.get("identification") or "").strip()
    if identification:
        found = Vehicle.objects.filter(identification=identification.upper()).first()
        if found is not None:
            return found
    person = record["owner"]
    name, email = str(person.get("name")).strip(), str(person.get("email") or "").strip()
    owner = Owner.objects.filter(name=name, email=email).first()
    if owner is None:
        owner = Owner(
            name=name,
            email=email,
            phone=str(person.get("phone") or ""),
            address=str(person.get("address") or ""),
        )
        owner.full_clean()
        owner.save()
    vehicle = Vehicle(
        owner=owner,
        kind=given.get("kind") or Vehicle.Kind.VAN,
        make=str(given.get("make") or ""),
        model=str(given.get("model") or ""),
        year=given.get("year"),
        identification=identification,
        dc_voltage=given.get("dc_voltage") or Vehicle.DCVoltage.V12,
        ac_system=given.get("ac_system") or Vehicle.ACSystem.NONE,
        near_salt_water=bool(given.get("near_salt_water")),
        notes=str(given.get("notes") or ""),
    )
    vehicle.full_clean()
    vehicle.save()
    return vehicle


def _device(job, given: dict) -> None:
    terminals = [t for t in given.get("terminals") or [] if isinstance(t, dict)]
    data = {
        "name": given.get("name"),
        "kind": given.get("kind"),
        "is_source": "on" if given.get("is_source") else "",
        "mounting": given.get("mounting") or "body",
        "enclosure": given.get("enclosure") or "",
        "location": given.get("location") or "",
        "input_current_a": given.get("input_current_a") or "",
        "protection_type": given.get("protection_type") or "",
        "protection_a": given.get("protection_a") or "",
        "supply_voltage": given.get("supply_voltage") or "",
        "notes": given.get("notes") or "",
        "terminals-TOTAL_FORMS": str(len(terminals)),
        "terminals-INITIAL_FORMS": "0",
        "terminals-MIN_NUM_FORMS": "0",
        "terminals-MAX_NUM_FORMS": "1000",
    }
    for i, terminal in enumerate(terminals):
        for key in ("name", "polarity", "stud_size", "manual_torque_value", "manual_torque_unit"):
            data[f"terminals-{i}-{key}"] = terminal.get(key) or ""
    form = DeviceForm(data, job=job)
    formset = TerminalFormSet(data, instance=form.instance, prefix="terminals")
    if not form.is_valid() or not formset.is_valid():
        errors = [f"{k}: {' '.join(v)}" for k, v in form.errors.items()]
        errors += [f"terminal {k}: {' '.join(v)}" for e in formset.errors for k, v in e.items()]
        raise RecordImportError(f"Device {given.get('name')!r}: {'; '.join(errors)}")
    device_save(**device_save_values(form, formset))


def _terminations(job, given: list) -> None:
    ends = {
        (t.circuit.tag, t.end, t.polarity, t.conductor_index): t
        for t in Termination.objects.filter(circuit__job=job).select_related("circuit")
    }
    for row in given:
        if not isinstance(row, dict):
            continue
        key = (row.get("circuit"), row.get("end"), row.get("polarity"), row.get("conductor_index"))
        termination = ends.get(key)
        if termination is None:
            continue  # an end the schedule no longer gives (the circuits decide)
        for name in TERMINATION_FIELDS:
            if name in row and row[name] is not None:
                value = row[name]
                if name in ("torque_value", "torque_tolerance_pct"):
                    try:
                        value = Decimal(str(value))
                    except InvalidOperation as exc:
                        raise RecordImportError(f"{termination}: {name} {value!r}") from exc
                setattr(termination, name, value)
        termination_update(termination=termination)


def import_record(record: dict, schedule: str, *, return_visit: bool = False) -> object:
    """Create a new job from a checked record and its schedule CSV; returns the job.

    With `return_visit` the job is a return visit (its re-check open first) and the
    record's final torque readings are kept beside each end (PriorRecord/PriorReading,
    inspections.services.return_visit.prior_record_import), as for a return visit
    booked from this shop's own approved job; `follows` stays empty."""
    source = record["job"]
    kind = Job.Kind.RETURN_VISIT if return_visit else Job.Kind.BUILD
    what = "Return visit" if return_visit else "Rework"
    try:
        with transaction.atomic():
            vehicle = _owner_vehicle(record)
            job = job_create(
                vehicle=vehicle,
                kind=kind,
                title=_one_line(f"{what}: {source.get('title') or 'imported system'}")[:160],
                description=(
                    f"Imported from wiring record of job {source.get('number', '?')}"
                    f" ({record.get('shop', {}).get('name', 'another shop')})."
                ),
            )
            for device in record["devices"]:
                _device(job, device)
            result = circuits_from_csv(job=job, text=schedule, allow_update=False)
            if not result.ok:
                raise RecordImportError(f"Circuit schedule: {result.errors[0]}")
            _terminations(job, record["terminations"])
            if return_visit:
                prior_record_import(job=job, record=record)
    except ValidationError as exc:
        raise RecordImportError(_one_line(_validation_text(exc))) from exc
    return job


def import_record_file(data: bytes, *, return_visit: bool = False):
    """read_record then import_record: the new job, or RecordImportError."""
    if len(data) > MAX_PDF_BYTES:
        raise RecordImportError("This file is too large to be a wiring record.")
    record, schedule = read_record(data)
    try:
        return import_record(record, schedule, return_visit=return_visit)
    except (TypeError, AttributeError, KeyError, ValueError, ArithmeticError) as exc:
        # A value of the wrong JSON type deep inside (a number for a list, a list for a
        # name) fails where it is used; the record, not the app, is what is wrong.
        raise RecordImportError(f"The embedded record is malformed: {_one_line(exc)}") from exc
