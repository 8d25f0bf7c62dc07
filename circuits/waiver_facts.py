"""The facts a finding rests on, in canonical form: what a waiver is granted on.

A lead waives a finding as it stands. `finding_facts` gathers the values the sizing
engine or the rule used to raise it; a waiver stores them with their hash, and a later
evaluation covers the finding with that waiver only while the hash is the same. When it
differs the waiver has lapsed, and `describe_changes` says in plain words what changed
("length 0.3 m → 0.9 m; design current 150 A → 200 A"). Plain Python: no database access,
so it runs on unsaved circuits (the live preview) as well as stored ones.

The facts, chosen deliberately:

* Every circuit the finding names (SystemFinding.circuits; a circuit's own finding names
  it): its material fields, CIRCUIT_FACTS: everything the sizing engine or any rule reads.
  Left out as cosmetic: tag, name and notes; the unit the length was entered in (the
  length is compared in metres); the terminals chosen at each end (nothing checks them).
  Circuits are keyed by database id, so a renamed tag changes nothing (circuit_update
  moves the waiver's subject along) and a new circuit given a deleted circuit's tag does
  not inherit its waiver. An unsaved circuit is keyed "new".
* Devices and the vehicle only where the rule reads them (RULE_NEEDS): the end devices'
  kind for the bottleneck path; kind and "source" for protection and its distance;
  mounting for slack; enclosure for the shared-panel colour rule; the vehicle's AC system
  and kind for the colour rules, its kind and salt water for construction; for the shore
  rule the input current setting of every inverter/charger of the job (the rule may find
  the charger several devices away from the circuit, so every one counts), and for the
  external-supply checks the supply's kind, breaker rating and voltage.
* A circuit's protection is its one home's (Circuit.protection): with a protection
  device, that device's type and rating are the circuit's protection facts.
* The sizing engine's findings rest on the circuit alone.
* A code not listed here (a rule added later) takes every device and vehicle fact:
  lapsing too often costs a lead a renewal; lapsing too rarely is the defect this guards.

The finding's message is not a fact. It is stored on the waiver to show what was
accepted, but the message is built from these facts plus names (tags, device names), so a
different message on equal facts is a renamed thing or a reworded sentence, not a changed
circuit: it does not lapse the waiver.

Canonical values: numbers as plain decimal strings ("150", "0.3"; floats rounded to 6
decimals first, so 0.9144000000000001 m is "0.9144"); a conductor size as its parsed
label ("4/0" and "4/0 AWG" are both "4/0 AWG"); choices as their stored value; a device as
its id; booleans as booleans; unset as null. The hash is the SHA-256 of the JSON with
sorted keys and no spaces (`facts_hash`). FACTS_VERSION changes when the set changes, so
every waiver granted on the old set lapses (and says so) instead of matching by accident.
"""

from __future__ import annotations

import hashlib
import json
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation

from circuits.models import Circuit, Device
from circuits.sizing import CODES as ENGINE_CODES
from circuits.sizing import SizeNotationError, parse_size
from shop.models import Vehicle

FACTS_VERSION = 2  # 2: re-marking per conductor, protection device, external supplies
NEW = "new"  # key of a circuit not saved yet

# (field, words, kind): kind says how a value is made canonical and how it is shown.
CIRCUIT_FACTS: tuple[tuple[str, str, str], ...] = (
    ("role", "role", "choice"),
    ("conductors", "conductors", "choice"),
    ("from_device", "from", "device"),
    ("to_device", "to", "device"),
    ("length_m", "length", "metres"),
    ("conductor_size", "size", "size"),
    ("parallel", "conductors in parallel", "count"),
    ("nominal_voltage", "nominal voltage", "volts"),
    ("design_current_a", "design current", "amps"),
    ("continuous", "continuous", "bool"),
    ("critical", "critical load", "bool"),
    ("construction", "construction", "choice"),
    ("tinned", "tinned", "bool"),
    ("insulation_c", "insulation rating", "celsius"),
    ("engine_space", "in an engine space", "bool"),
    ("bundled", "conductors bundled", "count"),
    ("protection_device", "protection device", "device"),
    ("protection_type", "protection", "choice"),
    ("protection_a", "protection rating", "amps"),
    ("protection_distance_m", "protection distance", "metres"),
    ("colour_a", "colour of positive / line", "choice"),
    ("marking_a_method", "re-marking of positive / line", "choice"),
    ("marking_a_colour", "marking colour of positive / line", "choice"),
    ("marking_a_ends", "ends marked of positive / line", "choice"),
    ("colour_b", "colour of negative / neutral", "choice"),
    ("marking_b_method", "re-marking of negative / neutral", "choice"),
    ("marking_b_colour", "marking colour of negative / neutral", "choice"),
    ("marking_b_ends", "ends marked of negative / neutral", "choice"),
    ("colour_earth", "colour of earth", "choice"),
    ("marking_earth_method", "re-marking of earth", "choice"),
    ("marking_earth_colour", "marking colour of earth", "choice"),
    ("marking_earth_ends", "ends marked of earth", "choice"),
    ("splice", "splice", "bool"),
    ("colour_after_splice", "colour after the splice", "choice"),
    ("service_loop_confirmed", "service loop confirmed", "bool"),
)
DEVICE_FACTS: dict[str, tuple[str, str]] = {
    "kind": ("kind", "choice"),
    "is_source": ("source", "bool"),
    "mounting": ("mounting", "choice"),
    "enclosure": ("enclosure", "text"),
    "input_current_a": ("AC input current setting", "amps"),
    "protection_a": ("protection rating", "amps"),
    "supply_voltage": ("supply voltage", "volts"),
}
VEHICLE_FACTS: dict[str, tuple[str, str]] = {
    "kind": ("kind", "choice"),
    "ac_system": ("AC system", "choice"),
    "near_salt_water": ("kept near salt water", "bool"),
}


@dataclass(frozen=True)
class Needs:
    """What a finding rests on besides the circuits it names."""

    end_devices: tuple[str, ...] = ()  # fields of each named circuit's two end devices
    vehicle: tuple[str, ...] = ()
    chargers: bool = False  # every inverter/charger's kind and input current setting


_COLOUR = Needs(vehicle=("kind", "ac_system"))
_CONSTRUCTION = Needs(vehicle=("kind", "near_salt_water"))
_PROTECTION = Needs(end_devices=("kind", "is_source"))
_SLACK = Needs(end_devices=("mounting",))
_SHORE = Needs(chargers=True)
_SUPPLY = Needs(end_devices=("kind", "protection_a"), chargers=True)
RULE_NEEDS: dict[str, Needs] = {
    "BOTTLENECK_INTERCONNECT": Needs(end_devices=("kind",)),
    "BOTTLENECK_PATH": Needs(end_devices=("kind",)),
    "UNPROTECTED_FROM_SOURCE": _PROTECTION,
    "PROTECTION_TOO_FAR": _PROTECTION,
    "PROTECTION_DISTANCE_UNKNOWN": _PROTECTION,
    "CONSTRUCTION_SOLID": _CONSTRUCTION,
    "CONSTRUCTION_CORD_PERMANENT": _CONSTRUCTION,
    "CONSTRUCTION_STANDARD_STRANDED": _CONSTRUCTION,
    "CONSTRUCTION_UNTINNED_MARINE": _CONSTRUCTION,
    "COLOUR_DC_POSITIVE": _COLOUR,
    "COLOUR_DC_NEGATIVE": _COLOUR,
    "COLOUR_BONDING": _COLOUR,
    "COLOUR_AC_LINE": _COLOUR,
    "COLOUR_AC_NEUTRAL": _COLOUR,
    "COLOUR_AC_EARTH": _COLOUR,
    "COLOUR_AC_EARTH_GREEN": _COLOUR,
    "COLOUR_EARTH_ON_LIVE": _COLOUR,
    "COLOUR_SPLICE_CHANGE": _COLOUR,
    "COLOUR_TAPE_REMARKED": _COLOUR,
    "COLOUR_REMARKED": _COLOUR,
    "COLOUR_BARE_LIVE": _COLOUR,
    "COLOUR_AC_SYSTEM_UNKNOWN": _COLOUR,
    "COLOUR_BLACK_DC_AND_AC": Needs(end_devices=("enclosure",)),
    "SLACK_SERVICE_LOOP": _SLACK,
    "SLACK_BODY_CHASSIS": _SLACK,
    "SHORE_BELOW_INPUT_SETTING": _SHORE,
    "SHORE_INPUT_SETTING_UNKNOWN": _SHORE,
    "SHORE_CORD_BELOW_SUPPLY": _SUPPLY,
    "SHORE_INPUT_ABOVE_SUPPLY": _SUPPLY,
    "SHORE_SUPPLY_VOLTAGE": Needs(end_devices=("kind", "supply_voltage"), vehicle=("ac_system",)),
    "SIZE_NOTATION_MISMATCH": Needs(),
}
_EVERYTHING = Needs(end_devices=tuple(DEVICE_FACTS), vehicle=tuple(VEHICLE_FACTS), chargers=True)


def needs_of(code: str) -> Needs:
    if code in ENGINE_CODES:
        return Needs()
    return RULE_NEEDS.get(code, _EVERYTHING)


# ---- canonical values ----


def _number(value) -> str | None:
    if value is None or value == "":
        return None
    try:
        if isinstance(value, float):
            value = repr(round(value, 6))
        number = Decimal(value)
    except (InvalidOperation, TypeError, ValueError):
        return str(value)
    if not number.is_finite():
        return str(number)
    text = format(number.normalize(), "f")
    return "0" if text in ("-0", "0") else text


def _size(text) -> str | None:
    text = " ".join(str(text or "").split())
    if not text:
        return None
    try:
        return parse_size(text).label
    except SizeNotationError:
        return text


def _canonical(kind: str, value):
    if kind == "bool":
        return bool(value)
    if kind in ("volts", "amps", "metres", "celsius", "count"):
        return _number(value)
    if kind == "size":
        return _size(value)
    if kind == "device":
        return None if value is None else str(value)
    if kind == "text":
        text = " ".join(str(value or "").split()).casefold()
        return text or None
    return str(value) if value else None  # a choice: its stored value (not the enum)


def circuit_key(circuit: Circuit) -> str:
    return NEW if circuit.pk is None else str(circuit.pk)


def _circuit_facts(circuit: Circuit) -> dict:
    out = {}
    for name, _words, kind in CIRCUIT_FACTS:
        attr = f"{name}_id" if kind == "device" else name
        out[name] = _canonical(kind, getattr(circuit, attr, None))
    # The protection as its one home gives it: a protection device's own type and rating,
    # so a changed fuse in the holder changes the circuit's facts too.
    protection = circuit.protection
    out["protection_type"] = _canonical("choice", protection.kind)
    out["protection_a"] = _canonical("amps", protection.rating_a)
    return out


def _device_facts(device: Device, fields: Iterable[str]) -> dict:
    return {name: _canonical(DEVICE_FACTS[name][1], getattr(device, name)) for name in fields}


def finding_facts(
    finding, circuits_by_tag: Mapping[str, Circuit], devices: Iterable[Device], vehicle=None
) -> dict:
    """The facts `finding` rests on: the material values of the circuits it names (looked
    up by tag in `circuits_by_tag`), of the devices and of the vehicle where its rule reads
    them. Pure: reads attributes, never the database."""
    needs = needs_of(finding.code)
    named = [circuits_by_tag[tag] for tag in finding.circuits if tag in circuits_by_tag]
    circuits = {circuit_key(c): _circuit_facts(c) for c in named}
    by_pk = {str(d.pk): d for d in devices if d.pk is not None}
    device_fields: dict[str, set[str]] = {}
    if needs.end_devices:
        for c in named:
            for pk in (c.from_device_id, c.to_device_id):
                if pk is not None:
                    device_fields.setdefault(str(pk), set()).update(needs.end_devices)
    if needs.chargers:
        for pk, d in by_pk.items():
            if d.kind == Device.Kind.INVERTER_CHARGER:
                device_fields.setdefault(pk, set()).update(("kind", "input_current_a"))
    facts_devices = {
        pk: _device_facts(by_pk[pk], sorted(fields)) if pk in by_pk else None
        for pk, fields in device_fields.items()
    }
    facts_vehicle = {
        name: _canonical(VEHICLE_FACTS[name][1], getattr(vehicle, name, None))
        for name in needs.vehicle
    }
    subject = circuits_by_tag.get(finding.subject)
    return {
        "version": FACTS_VERSION,
        # The circuit the finding is about, by id (null for a device, panel or the system).
        "subject": circuit_key(subject) if subject is not None else None,
        "circuits": circuits,
        "devices": facts_devices,
        "vehicle": facts_vehicle,
    }


def facts_hash(facts: Mapping) -> str:
    """SHA-256 (hex) of the facts as JSON with sorted keys and no spaces."""
    text = json.dumps(facts, sort_keys=True, separators=(",", ":"), ensure_ascii=True)
    return hashlib.sha256(text.encode("ascii")).hexdigest()


def fact_names(circuits: Iterable[Circuit], devices: Iterable[Device]) -> dict[str, str]:
    """What to call each circuit and device in a change text: "circuit:<id>" -> its tag,
    "device:<id>" -> its name. Reads only what is loaded (no queries)."""
    names: dict[str, str] = {}
    for c in circuits:
        names[f"circuit:{circuit_key(c)}"] = c.tag
        for end in ("from_device", "to_device"):
            if getattr(Circuit, end).is_cached(c):  # a loaded device, never a query
                device = getattr(c, end)
                names.setdefault(f"device:{device.pk}", device.name)
    for d in devices:
        if d.pk is not None:
            names[f"device:{d.pk}"] = d.name
    return names


# ---- what changed, in words ----


def _choice_words(model, name: str, value) -> str:
    if not value:
        return "none"
    label = str(dict(model._meta.get_field(name).flatchoices).get(value, value))
    return label if label[:2].isupper() else label[:1].lower() + label[1:]


def _show(model, name: str, kind: str, value, names: Mapping[str, str]) -> str:
    if kind == "bool":
        return "yes" if value else "no"
    if value is None:
        return "not recorded" if kind not in ("choice", "text") else "none"
    if kind == "choice":
        return _choice_words(model, name, value)
    if kind == "device":
        return names.get(f"device:{value}", "a device since deleted")
    unit = {"volts": " V", "amps": " A", "metres": " m", "celsius": " °C"}.get(kind, "")
    return f"{value}{unit}"


def _field_changes(model, spec, old: Mapping, new: Mapping, names) -> list[str]:
    out = []
    for name, words, kind in spec:
        if old.get(name) != new.get(name):
            before = _show(model, name, kind, old.get(name), names)
            after = _show(model, name, kind, new.get(name), names)
            out.append(f"{words} {before} → {after}")
    return out


def _circuit_name(key: str, names: Mapping[str, str]) -> str:
    if key == NEW:
        return names.get("circuit:new", "a new circuit")
    return names.get(f"circuit:{key}", "a circuit since deleted")


def describe_changes(old: Mapping, new: Mapping, *, names: Mapping[str, str]) -> list[str]:
    """The differences between the facts a waiver was granted on (`old`) and the facts
    now (`new`), each in plain words; the subject circuit's own changes come first and
    without its tag, the others prefixed with what they are about."""
    if old.get("version") != new.get("version"):
        return ["the facts waivers record have changed since it was granted"]
    out: list[str] = []
    old_c, new_c = old.get("circuits") or {}, new.get("circuits") or {}
    subject_key, old_subject = new.get("subject"), old.get("subject")
    skip: set[str] = set()
    if subject_key != old_subject and subject_key is not None and old_subject is not None:
        # The tag now belongs to another circuit (the waived one was deleted or renamed
        # away, and a new one took its tag).
        out.append("granted on another circuit that had this tag")
        skip = {subject_key, old_subject}
    keys = sorted(
        set(old_c) | set(new_c), key=lambda k: (k != subject_key, _circuit_name(k, names))
    )
    for key in keys:
        label = _circuit_name(key, names)
        if key in skip and (key not in old_c or key not in new_c):
            continue
        if key not in old_c:
            out.append(f"now also about {label}")
        elif key not in new_c:
            out.append(f"no longer about {label}")
        else:
            changes = _field_changes(Circuit, CIRCUIT_FACTS, old_c[key], new_c[key], names)
            prefix = "" if key == subject_key else f"{label}: "
            out += [prefix + change for change in changes]
    old_d, new_d = old.get("devices") or {}, new.get("devices") or {}
    # A device only on one side came or went with a circuit's end (said above as "from"
    # or "to") or is an inverter/charger added or removed: named only when nothing else is.
    one_sided: list[str] = []
    for key in sorted(set(old_d) | set(new_d), key=lambda k: names.get(f"device:{k}", "")):
        label = names.get(f"device:{key}", "a device since deleted")
        if key not in old_d or key not in new_d:
            one_sided.append(f"{'now also' if key in new_d else 'no longer'} about {label}")
            continue
        before, after = old_d[key] or {}, new_d[key] or {}
        spec = [(n, *DEVICE_FACTS[n]) for n in DEVICE_FACTS if n in before or n in after]
        out += [f"{label}: {c}" for c in _field_changes(Device, spec, before, after, names)]
    spec = [(n, *VEHICLE_FACTS[n]) for n in VEHICLE_FACTS]
    old_v, new_v = old.get("vehicle") or {}, new.get("vehicle") or {}
    out += [f"vehicle {c}" for c in _field_changes(Vehicle, spec, old_v, new_v, names)]
    return out or one_sided
