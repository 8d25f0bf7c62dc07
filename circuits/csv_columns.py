"""The schedule CSV's columns: what each holds (COLUMN_HELP, shown on the import page),
the required ones, the legacy columns still read, and how cells map to model fields.
Kept apart from circuits.csv_io, which reads and writes them."""

from __future__ import annotations

from django.core.exceptions import NON_FIELD_ERRORS

from circuits.models import Circuit, Colour, MarkingEnds, MarkingMethod

_BOOLEANS = [
    "continuous", "critical", "tinned", "engine_space", "splice", "service_loop_confirmed",
]  # fmt: skip
_ROLES = ("a", "b", "earth")
_CHOICES = {
    "role": Circuit.Role,
    "conductors": Circuit.Conductors,
    "construction": Circuit.Construction,
    "protection_type": Circuit.ProtectionType,
    "colour_a": Colour,
    "colour_b": Colour,
    "colour_earth": Colour,
    "colour_after_splice": Colour,
    **{f"marking_{r}_method": MarkingMethod for r in _ROLES},
    **{f"marking_{r}_colour": Colour for r in _ROLES},
    **{f"marking_{r}_ends": MarkingEnds for r in _ROLES},
}


def _marking_help(role: str, words: str) -> list[tuple[str, str]]:
    return [
        (f"marking_{role}_method", f"Re-marking of the {words}: tape, heat_shrink, "
         "printed_band, or empty."),
        (f"marking_{role}_colour", "Colour of that marking (not bare)."),
        (f"marking_{role}_ends", "Where it is marked: from, to or both."),
    ]  # fmt: skip


# (column, what it holds): the order of the export and of the import page's table.
COLUMN_HELP: list[tuple[str, str]] = [
    ("tag", "Unique within the job, e.g. D-07. Required."),
    ("name", "What the circuit feeds. Required."),
    ("role", "interconnect, main_feed, dc_branch, charging, shore, ac_branch, bonding."),
    ("from_device", "Device name as recorded on the job. Required."),
    ("from_terminal", "Terminal name on the from-device, or empty."),
    ("to_device", "Device name as recorded on the job. Required."),
    ("to_terminal", "Terminal name on the to-device, or empty."),
    ("nominal_voltage", "Volts, e.g. 12. Required."),
    ("design_current_a", "Amps, e.g. 20. Required."),
    ("continuous", "yes / no: runs 3 hours or more."),
    ("critical", "yes / no: critical load (3 % drop limit)."),
    ("length", "One-way length with its unit: 3.5 m or 12 ft. Required."),
    ("conductor_size", "Trade notation: 10 AWG, 4/0, 35 mm². Required."),
    ("conductors", "pair, pos, neg, ac or earth (default pair)."),
    ("parallel", "Conductors in parallel, 1 to 8 (default 1)."),
    ("construction", "fine, standard, solid or cord (default fine)."),
    ("tinned", "yes / no (default yes)."),
    ("insulation_c", "Insulation rating in °C: 60, 75, 80, 90, 105, 125 or 200 (default 105)."),
    ("engine_space", "yes / no."),
    ("bundled", "Current-carrying conductors bundled, including its own (default 1)."),
    ("colour_a", "Positive / line insulation: red, black, yellow, white, blue, brown, …, bare."),
    *_marking_help("a", "positive / line"),
    ("colour_b", "Negative / neutral insulation colour."),
    *_marking_help("b", "negative / neutral"),
    ("colour_earth", "Earth insulation colour, e.g. green_yellow, or bare."),
    *_marking_help("earth", "earth"),
    ("splice", "yes / no: the run has a splice."),
    ("colour_after_splice", "Positive / line colour beyond the splice."),
    (
        "protection_device",
        "Protection device at one end whose fuse or breaker protects the "
        "run (its rating is read from it), or empty.",
    ),
    (
        "protection_type",
        "In-line protection: none, fuse or breaker (default fuse; none with a protection device).",
    ),
    ("protection_a", "In-line rating in amps; empty when protection_type is none."),
    ("protection_distance_m", "Distance of the in-line protection from the source, metres."),
    ("service_loop_confirmed", "yes / no."),
    ("notes", "Free text."),
]
COLUMNS = [name for name, _ in COLUMN_HELP]
# Read on import for files written before they were replaced, never written.
LEGACY_COLUMNS = ["tape_remarked"]
REQUIRED = [
    "tag", "name", "role", "from_device", "to_device", "nominal_voltage",
    "design_current_a", "length", "conductor_size",
]  # fmt: skip
_TEXT = ["tag", "name", "from_device", "from_terminal", "to_device", "to_terminal"]
_FORMULA_START = ("=", "+", "-", "@")
# Free-text columns and the most characters their model field holds (choice columns are
# matched against their values and labels instead).
_LIMITED = {
    f.name: f.max_length
    for f in Circuit._meta.get_fields()
    if getattr(f, "max_length", None) and f.name in COLUMNS and not f.choices
}
# Model field -> the CSV column its errors belong to.
_FIELD_COLUMN = {"length_m": "length", "length_unit": "length", NON_FIELD_ERRORS: None}
