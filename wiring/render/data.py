"""The wiring record as data: `record_data(job)` gathers everything the record shows into
one JSON-able dict (schema "ampwright.wiring-record", version 1, documented in schema.md
beside this module). The HTML record is rendered from this same dict, so the printed
record and the embedded record.json never disagree.

Stored decimals (amps, volts, torque) are written as decimal strings exactly as stored;
what the sizing engine computes is written as numbers. Times are ISO 8601 with their
offset. Nothing here writes.
"""

from __future__ import annotations

import datetime
from decimal import Decimal

from django.utils import timezone

from circuits.models import Circuit, Device
from circuits.sizing.findings import SOURCES
from circuits.sizing.report import CAUTION
from circuits.system import CircuitSizing, SystemReport, job_system_report
from circuits.tags import tag_key
from shop.models import ShopProfile
from wiring.render.changes import changes_data
from wiring.render.evidence import evidence_data

SCHEMA = "ampwright.wiring-record"
SCHEMA_VERSION = 1

# What every record says of itself, in plain words (issue 10, item 8). The re-check
# intervals are a trade rule of thumb, not a standard's figure: common practice.
CAUTIONS = [
    "This record describes the electrical system as this shop installed, measured and "
    "checked it on the dates shown. It is not a certificate of compliance, and it says "
    "nothing about work done by anyone else, before or after.",
    "Connections can loosen with vibration and heat. A careful owner has the connections "
    "re-checked after the first few months of driving, and then once a year "
    "(common practice), and sooner after any smell of hot insulation, flickering, "
    "discoloured terminals or a fuse that blows.",
    "Before changing anything, switch off and isolate every source (batteries, shore "
    "supply, solar, alternator). Replace a fuse or breaker only with the rating shown here.",
    "The applicable standards, local codes and a qualified person govern. "
    + CAUTION.removeprefix("Caution: ").capitalize(),
]


def text(value) -> str | None:
    """A stored decimal as written ("10.50"), other values as str; None stays None."""
    if value is None:
        return None
    if isinstance(value, Decimal):
        return format(value, "f")
    return str(value)


def when(moment) -> str | None:
    if moment is None:
        return None
    return moment.isoformat()


def name_of(user) -> str | None:
    if user is None:
        return None
    return user.get_full_name() or user.get_username()


def _shop() -> dict:
    shop = ShopProfile.load()
    return {
        "name": shop.name,
        "address": shop.address,
        "phone": shop.phone,
        "email": shop.email,
        "paper_size": getattr(shop, "paper_size", "A4"),
    }


def _job(job) -> dict:
    return {
        "number": job.number,
        "title": job.title,
        "description": job.description,
        "status": job.status,
        "status_label": job.get_status_display(),
        "booked_in_on": when(job.booked_in_on),
        "target_handover_on": when(job.target_handover_on),
        "handed_over_on": when(job.handed_over_on),
        "lead": name_of(job.lead),
        "technicians": sorted(name_of(t) for t in job.technicians.all()),
    }


def _owner_vehicle(job) -> tuple[dict, dict]:
    vehicle = job.vehicle
    owner = vehicle.owner
    return (
        {"name": owner.name, "email": owner.email, "phone": owner.phone, "address": owner.address},
        {
            "kind": vehicle.kind,
            "kind_label": vehicle.get_kind_display(),
            "make": vehicle.make,
            "model": vehicle.model,
            "year": vehicle.year,
            "identification": vehicle.identification,
            "identification_label": vehicle.identification_label,
            "dc_voltage": vehicle.dc_voltage,
            "ac_system": vehicle.ac_system,
            "ac_system_label": vehicle.get_ac_system_display(),
            "near_salt_water": vehicle.near_salt_water,
            "notes": vehicle.notes,
        },
    )


def _device(device: Device) -> dict:
    return {
        "name": device.name,
        "kind": device.kind,
        "kind_label": device.get_kind_display(),
        "is_source": device.is_source,
        "mounting": device.mounting,
        "enclosure": device.enclosure,
        "location": device.location,
        "input_current_a": text(device.input_current_a),
        "protection_type": device.protection_type,
        "protection_a": text(device.protection_a),
        "supply_voltage": text(device.supply_voltage),
        "notes": device.notes,
        "terminals": [
            {
                "name": t.name,
                "polarity": t.polarity,
                "stud_size": t.stud_size,
                "manual_torque_value": text(t.manual_torque_value),
                "manual_torque_unit": t.manual_torque_unit,
            }
            for t in device.terminals.all()
        ],
    }


def _summary(report: SystemReport, vehicle: dict) -> dict:
    """Nominal voltages, the battery bank, charging sources and the AC system in words."""
    devices = report.devices
    circuits = [s.circuit for s in report.circuits]
    charging_kinds = {
        Device.Kind.ALTERNATOR,
        Device.Kind.CHARGE_CONTROLLER,
        Device.Kind.DC_DC_CHARGER,
        Device.Kind.INVERTER_CHARGER,
        Device.Kind.SHORE_INLET,
    }
    return {
        "dc_voltage": vehicle["dc_voltage"],
        "nominal_voltages": sorted({text(c.nominal_voltage) for c in circuits}, key=Decimal),
        "ac_system": vehicle["ac_system_label"],
        "batteries": [d.name for d in devices if d.kind == Device.Kind.BATTERY],
        "charging_sources": [d.name for d in devices if d.kind in charging_kinds],
        "ac_devices": [
            d.name
            for d in devices
            if d.kind in (Device.Kind.SHORE_INLET, Device.Kind.AC_PANEL)
            or (d.kind == Device.Kind.INVERTER_CHARGER)
        ],
        "device_count": len(devices),
        "circuit_count": len(circuits),
    }


def _sizing(row: CircuitSizing) -> dict | None:
    if row.report is None or row.report.result is None:
        return None
    r = row.report.result
    protection_source = (
        SOURCES["nec_continuous"] if row.circuit.continuous else SOURCES["protection"]
    )
    return {
        "ampacity_a": round(r.ampacity_a, 2),
        "table_ampacity_a": None if r.table_ampacity_a is None else round(r.table_ampacity_a, 2),
        "required_ampacity_a": round(r.required_ampacity_a, 2),
        "table_source": r.table_source,
        "factors": [
            {"name": f.name, "value": round(f.value, 4), "source": f.source} for f in r.factors
        ],
        "voltage_drop_v": round(r.voltage_drop_v, 3),
        "voltage_drop_pct": round(r.voltage_drop_pct, 2),
        "drop_limit_pct": r.drop_limit_pct,
        "drop_source": SOURCES["drop"],
        "resistance_source": SOURCES["resistance"],
        "max_protection_a": round(r.max_protection_a, 1),
        "protection_source": protection_source,
    }


COLOUR_FIELDS = ("colour_a", "colour_b", "colour_earth", "colour_after_splice")
MARKING_ROLES, MARKING_PARTS = ("a", "b", "earth"), ("method", "colour", "ends")


def _circuit(row: CircuitSizing) -> dict:
    c: Circuit = row.circuit
    colours = {name: getattr(c, name) for name in COLOUR_FIELDS}
    labels = {
        name: c._meta.get_field(name).choices and dict(c._meta.get_field(name).choices).get(v, v)
        for name, v in colours.items()
    }
    return {
        "tag": c.tag,
        "name": c.name,
        "role": c.role,
        "role_label": c.get_role_display(),
        "from_device": c.from_device.name,
        "from_terminal": c.from_terminal.name if c.from_terminal else "",
        "to_device": c.to_device.name,
        "to_terminal": c.to_terminal.name if c.to_terminal else "",
        "nominal_voltage": text(c.nominal_voltage),
        "design_current_a": text(c.design_current_a),
        "continuous": c.continuous,
        "critical": c.critical,
        "length_m": c.length_m,
        "length_unit": c.length_unit,
        "length_display": c.length_display,
        "conductor_size": c.conductor_size,
        "size_label": c.size_label,
        "conductors": c.conductors,
        "conductors_label": c.get_conductors_display(),
        "parallel": c.parallel,
        "construction": c.construction,
        "construction_label": c.get_construction_display(),
        "tinned": c.tinned,
        "insulation_c": c.insulation_c,
        "engine_space": c.engine_space,
        "bundled": c.bundled,
        **colours,
        "colour_labels": {k: v for k, v in labels.items() if v},
        "splice": c.splice,
        "tape_remarked": c.tape_remarked,  # any conductor re-marked with tape
        **{
            f"marking_{r}_{p}": getattr(c, f"marking_{r}_{p}")
            for r in MARKING_ROLES
            for p in MARKING_PARTS
        },
        "colour_texts": [{"conductor": who, "text": t} for who, t in c.colour_texts()],
        # The protection from its one home: the protection device's, or the circuit's own.
        "protection_device": c.protection_device.name if c.protection_device_id else "",
        "protection_type": c.protection.kind,
        "protection_type_label": Circuit.ProtectionType(c.protection.kind).label,
        "protection_a": text(c.protection.rating_a),
        "protection_distance_m": c.protection_distance_m,
        "service_loop_confirmed": c.service_loop_confirmed,
        "notes": c.notes,
        "sizing": _sizing(row),
        "sizing_error": row.error,
    }


def _findings(report: SystemReport) -> list[dict]:
    out = []
    for f in report.all_findings:
        waiver = f.waiver if f.waived else None
        out.append(
            {
                "code": f.code,
                "severity": f.severity,
                "message": f.message,
                "source": f.source,
                "subject": f.subject,
                "waived": f.waived,
                "waiver": None
                if waiver is None
                else {
                    "reason": waiver.reason,
                    "lead": name_of(waiver.lead),
                    "granted_at": when(waiver.created_at),
                },
                "lapse_note": f.lapse_note,
            }
        )
    return out


def record_data(job, *, generated_at: datetime.datetime | None = None) -> dict:
    """The whole record of `job` as a JSON-able dict (schema.md). `generated_at` defaults
    to now; the caller passes the issue time so the JSON and the printed record agree."""
    return record_data_from(job, job_system_report(job), generated_at=generated_at)


def record_data_from(
    job, report: SystemReport, *, generated_at: datetime.datetime | None = None
) -> dict:
    """record_data for a system report already made (the HTML also draws its diagram)."""
    owner, vehicle = _owner_vehicle(job)
    devices = list(job.devices.prefetch_related("terminals").order_by("name"))
    return {
        "schema": SCHEMA,
        "schema_version": SCHEMA_VERSION,
        "generated_at": when(generated_at or timezone.now()),
        "shop": _shop(),
        "job": _job(job),
        "owner": owner,
        "vehicle": vehicle,
        "system": _summary(report, vehicle),
        "devices": [_device(d) for d in devices],
        "circuits": [
            _circuit(row) for row in sorted(report.circuits, key=lambda r: tag_key(r.circuit.tag))
        ],
        "findings": _findings(report),
        **evidence_data(job),
        "changes": changes_data(job),  # a return visit's change since the last record
        "cautions": list(CAUTIONS),
    }
