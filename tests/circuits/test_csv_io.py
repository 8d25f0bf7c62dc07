"""The circuit schedule as CSV: an export imports back into the same circuits, and a file
with any bad row is refused whole, every error listed by row and column, nothing saved."""

from __future__ import annotations

import csv
import io
from decimal import Decimal

import pytest

from circuits.csv_io import (
    COLUMNS,
    CsvFileError,
    circuits_from_csv,
    circuits_to_csv,
    read_upload,
)
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job

pytestmark = pytest.mark.django_db

# Fields that describe a circuit (everything but its identity and its job).
COMPARED = [
    "tag", "name", "role", "nominal_voltage", "design_current_a", "continuous", "critical",
    "length_unit", "conductor_size", "conductors", "parallel", "construction", "tinned",
    "insulation_c", "engine_space", "bundled", "colour_a", "colour_b", "colour_earth", "splice",
    "colour_after_splice", "marking_a_method", "marking_a_colour", "marking_a_ends",
    "marking_b_method", "marking_b_colour", "marking_b_ends", "marking_earth_method",
    "marking_earth_colour", "marking_earth_ends", "protection_type",
    "protection_a",
    "protection_distance_m", "service_loop_confirmed", "notes",
]  # fmt: skip


def _devices(job) -> None:
    battery = make_device(job, name="House battery", kind="battery")
    make_terminal(battery, name="B+", polarity="pos")
    make_terminal(battery, name="B-", polarity="neg")
    make_device(job, name="Busbar", kind="busbar")
    make_device(job, name="Inverter/charger", kind="inverter_charger")
    make_device(job, name="Shore inlet", kind="shore_inlet")
    make_device(job, name="Fridge, galley", kind="load")


def _system():
    job = make_job()
    _devices(job)
    d = {dev.name: dev for dev in job.devices.all()}
    make_circuit(job, d["House battery"], d["Busbar"], tag="M-01", name="Main feed",
                 role="main_feed", conductor_size="4/0", parallel=2, design_current_a=250,
                 protection_a=300, protection_distance_m=0.15, length_m=1.2,
                 from_terminal=d["House battery"].terminals.get(name="B+"),
                 insulation_c=125, notes='Two runs, "twin" lugs')  # fmt: skip
    make_circuit(job, d["Busbar"], d["Fridge, galley"], tag="D-01", name="Fridge",
                 conductor_size="12", length_m=10 * 0.3048, length_unit="ft",
                 continuous=True, critical=True, tinned=False, engine_space=True, bundled=3,
                 splice=True, colour_after_splice="brown", colour_b="black",
                 marking_b_method="heat_shrink", marking_b_colour="yellow", marking_b_ends="to",
                 service_loop_confirmed=True, construction="standard",
                 protection_type="breaker", protection_a=Decimal("7.5"))  # fmt: skip
    make_circuit(job, d["Shore inlet"], d["Inverter/charger"], tag="S-01", name="=Shore cord",
                 role="shore", nominal_voltage=230, design_current_a=16, conductor_size="2.5 mm²",
                 protection_type="none")  # fmt: skip
    return job


def _snapshot(job) -> dict[str, dict]:
    out = {}
    for c in job.circuits.for_schedule():
        row = {name: getattr(c, name) for name in COMPARED}
        row["length_m"] = round(c.length_m, 9)
        row["from"] = (c.from_device.name, c.from_terminal.name if c.from_terminal else None)
        row["to"] = (c.to_device.name, c.to_terminal.name if c.to_terminal else None)
        row["ends"] = c.terminations.count()
        row["protection_device"] = c.protection_device.name if c.protection_device else None
        out[c.tag] = row
    return out


def _table(text: str) -> list[dict[str, str]]:
    return list(csv.DictReader(io.StringIO(text)))


def test_export_has_the_stable_header_and_one_row_per_circuit():
    text = circuits_to_csv(_system())
    header = next(csv.reader(io.StringIO(text)))
    assert header == COLUMNS
    rows = _table(text)
    assert [r["tag"] for r in rows] == ["D-01", "M-01", "S-01"]
    fridge = rows[0]
    assert fridge["length"] == "10 ft"
    assert fridge["role"] == "dc_branch" and fridge["protection_type"] == "breaker"
    assert fridge["continuous"] == "yes" and fridge["tinned"] == "no"
    assert fridge["protection_a"] == "7.5" and fridge["conductor_size"] == "12"
    main = rows[1]
    assert main["length"] == "1.2 m" and main["parallel"] == "2" and main["from_terminal"] == "B+"
    # A cell a spreadsheet would run as a formula is written inert.
    assert rows[2]["name"] == "'=Shore cord"


def test_round_trip_into_a_fresh_job_with_the_same_devices_gives_the_same_circuits():
    source = _system()
    fresh = make_job()
    _devices(fresh)
    result = circuits_from_csv(job=fresh, text=circuits_to_csv(source))
    assert result.ok, result.errors
    assert sorted(result.created) == ["D-01", "M-01", "S-01"] and result.updated == []
    assert _snapshot(fresh) == _snapshot(source)


def test_import_updates_circuits_by_tag():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0]["conductor_size"] = "10 AWG"
    rows[0]["length"] = "4 m"
    result = circuits_from_csv(job=job, text=_write(rows))
    assert result.ok, result.errors
    assert sorted(result.updated) == ["D-01", "M-01", "S-01"] and result.created == []
    fridge = job.circuits.get(tag="D-01")
    assert (fridge.conductor_size, fridge.length_m, fridge.length_unit) == ("10 AWG", 4.0, "m")


def test_an_imperial_length_shows_back_in_feet_as_in_the_editor():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0]["length"] = "120 in"
    result = circuits_from_csv(job=job, text=_write(rows))
    assert result.ok, result.errors
    fridge = job.circuits.get(tag="D-01")
    # 120 in = 10 ft = 3.048 m (NIST SP 811: 1 in = 0.0254 m exactly)
    assert fridge.length_m == pytest.approx(3.048)
    assert fridge.length_display == "10 ft"


def test_a_length_without_a_unit_is_refused_on_its_row():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0]["length"] = "12"
    result = circuits_from_csv(job=job, text=_write(rows))
    assert not result.ok
    assert any("no unit" in str(error) for error in result.errors)


def test_a_file_with_several_bad_rows_is_refused_whole_and_nothing_changes():
    job = _system()
    before = _snapshot(job)
    rows = _table(circuits_to_csv(job))
    rows[0]["conductor_size"] = "10 AWG"  # a good change, refused with the rest
    rows[1]["to_device"] = "Galley fridge"  # row 3: no such device
    rows[1]["length"] = "12"  # row 3: no unit
    rows[2]["parallel"] = "two"  # row 4: not a number
    rows[2]["continuous"] = "maybe"  # row 4: not yes/no
    new = dict(rows[0], tag="D-99", conductor_size="4 five")  # row 5: unreadable size
    result = circuits_from_csv(job=job, text=_write([*rows, new]))
    assert not result.ok
    where = {(e.row, e.column) for e in result.errors}
    assert where == {
        (3, "to_device"),
        (3, "length"),
        (4, "parallel"),
        (4, "continuous"),
        (5, "conductor_size"),
    }
    assert result.created == [] and result.updated == []
    assert _snapshot(job) == before
    assert not job.circuits.filter(tag="D-99").exists()


def test_errors_name_their_row_column_and_problem():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[1]["to_device"] = "Galley fridge"
    (error,) = circuits_from_csv(job=job, text=_write(rows)).errors
    assert str(error).startswith("Row 3, to_device: no device named 'Galley fridge'")


def test_a_model_rule_is_reported_on_its_row():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0]["to_device"] = rows[0]["from_device"]  # a circuit needs two different devices
    rows[2]["protection_type"] = "fuse"  # a fuse needs a rating
    where = {(e.row, e.column) for e in circuits_from_csv(job=job, text=_write(rows)).errors}
    assert where == {(2, "to_device"), (4, "protection_a")}


def test_the_same_tag_twice_in_one_file_is_an_error():
    job = _system()
    rows = _table(circuits_to_csv(job))
    result = circuits_from_csv(job=job, text=_write([*rows, rows[0]]))
    assert [(e.row, e.column) for e in result.errors] == [(5, "tag")]


def test_labels_and_units_are_read_as_well_as_values():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0].update(role="DC branch", construction="Fine-stranded", insulation_c="90 °C",
                   nominal_voltage="12 V", design_current_a="6 A", colour_a="Red")  # fmt: skip
    result = circuits_from_csv(job=job, text=_write(rows))
    assert result.ok, result.errors
    fridge = job.circuits.get(tag="D-01")
    assert (fridge.role, fridge.construction, fridge.insulation_c) == ("dc_branch", "fine", 90)
    assert (fridge.design_current_a, fridge.colour_a) == (Decimal("6"), "red")


def test_a_new_circuit_takes_the_defaults_for_columns_left_out():
    job = make_job()
    _devices(job)
    text = (
        "tag,name,role,from_device,to_device,nominal_voltage,design_current_a,length,"
        'conductor_size,protection_a\r\nD-05,Pump,dc_branch,Busbar,"Fridge, galley",12,5,'
        "10 ft,14 AWG,10\r\n"
    )
    result = circuits_from_csv(job=job, text=text)
    assert result.ok, result.errors
    pump = job.circuits.get(tag="D-05")
    assert (pump.length_unit, round(pump.length_m, 4)) == ("ft", 3.048)
    assert (pump.parallel, pump.tinned, pump.insulation_c, pump.conductors) == (
        1,
        True,
        105,
        "pair",
    )
    assert (pump.protection_type, pump.protection_a) == ("fuse", Decimal("10"))


def test_missing_or_unknown_columns_refuse_the_file():
    job = _system()
    result = circuits_from_csv(job=job, text="tag,name,lenght\r\nD-01,Fridge,3 m\r\n")
    messages = [str(e) for e in result.errors]
    assert any("unknown columns: lenght" in m for m in messages)
    assert any("missing columns:" in m and "length" in m for m in messages)
    assert all(e.row == 1 for e in result.errors)


def test_an_empty_file_or_a_header_alone_is_refused():
    job = _system()
    assert "no header row" in str(circuits_from_csv(job=job, text="").errors[0])
    header_only = ",".join(COLUMNS) + "\r\n"
    assert "no circuits" in str(circuits_from_csv(job=job, text=header_only).errors[0])


def test_a_file_not_in_utf8_is_refused_with_a_clear_message():
    data = "tag,name\r\nD-01,Kühlschrank\r\n".encode("cp1252")
    with pytest.raises(CsvFileError, match="not UTF-8"):
        read_upload(data)
    with pytest.raises(CsvFileError, match="not a CSV text file"):
        read_upload(b"PK\x03\x04\x00\x00binary")
    assert read_upload("\ufefftag\r\n".encode()) == "tag\r\n"  # a byte-order mark is fine


def _write(rows: list[dict[str, str]]) -> str:
    out = io.StringIO()
    writer = csv.DictWriter(out, fieldnames=COLUMNS, lineterminator="\r\n")
    writer.writeheader()
    writer.writerows(rows)
    return out.getvalue()


def test_without_change_permission_existing_tags_are_refused_not_overwritten():
    job = _system()
    before = _snapshot(job)
    result = circuits_from_csv(job=job, text=circuits_to_csv(job), allow_update=False)
    assert {(e.row, e.column) for e in result.errors} == {(2, "tag"), (3, "tag"), (4, "tag")}
    assert _snapshot(job) == before


# ---- numbers through the strict parser: the form's ranges, row and column errors ----


@pytest.mark.parametrize(
    ("column", "cell", "words"),
    [
        ("length", "10 m**(9**9**9)", "unit we do not read"),
        ("length", "10 (", "unit we do not read"),
        ("length", "10 m/0", "unit we do not read"),
        ("length", "10 'ft'", "unit we do not read"),
        ("length", "1e-300 m", "exponent beyond e±6"),
        ("length", "600 m", "between 1 cm and 500 m"),
        ("length", "1" * 16_000 + " m", "at most 40"),
        ("nominal_voltage", "1e308", "exponent beyond e±6"),
        ("nominal_voltage", "NaN", "not a finite number"),
        ("nominal_voltage", "5000 V", "between 1 V and 1000 V"),
        ("design_current_a", "inf", "not a finite number"),
        ("design_current_a", "-5 A", "greater than zero"),
        ("design_current_a", "2²", "not a digit we read"),
        ("protection_a", "1e6", "between 0.1 A and 10 kA"),
        ("parallel", "1e30", "exponent beyond e±6"),
        ("parallel", "9", "at most 8"),
        ("bundled", "0", "at least 1"),
        ("bundled", "2.5", "whole number"),
        ("insulation_c", "1e308", "exponent beyond e±6"),
        ("protection_distance_m", "-1", "cannot be negative"),
        ("protection_distance_m", "inf", "not a finite number"),
        ("protection_distance_m", "1 parsec", "unit we do not read"),
        ("conductor_size", "1" * 5000, "at most 20"),
        ("tag", "x" * 100_000, "at most 12"),
    ],
)
def test_bad_numeric_cells_are_refused_on_their_row_and_nothing_is_saved(column, cell, words):
    job = _system()
    before = _snapshot(job)
    rows = _table(circuits_to_csv(job))
    rows[1][column] = cell
    result = circuits_from_csv(job=job, text=_write(rows))
    assert not result.ok
    assert [(e.row, e.column) for e in result.errors] == [(3, column)], result.errors
    assert words in result.errors[0].message
    assert len(str(result.errors[0])) < 300  # a huge cell is not echoed back whole
    assert result.created == [] and result.updated == []
    assert _snapshot(job) == before


def test_an_ac_voltage_cell_is_held_to_the_ac_range():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[2]["nominal_voltage"] = "1200"  # S-01, the shore cord
    result = circuits_from_csv(job=job, text=_write(rows))
    assert [(e.row, e.column) for e in result.errors] == [(4, "nominal_voltage")]
    assert "must be between 1 V and 1000 V" in result.errors[0].message


def test_numeric_cells_read_units_unicode_digits_and_a_decimal_comma():
    job = _system()
    rows = _table(circuits_to_csv(job))
    rows[0].update(design_current_a="٦ A", protection_a="7,5", length="3,5 m",
                   protection_distance_m="20 cm", bundled="२")  # fmt: skip
    result = circuits_from_csv(job=job, text=_write(rows))
    assert result.ok, result.errors
    fridge = job.circuits.get(tag="D-01")
    assert (fridge.design_current_a, fridge.protection_a) == (Decimal("6"), Decimal("7.5"))
    assert fridge.length_m == pytest.approx(3.5)
    assert fridge.protection_distance_m == pytest.approx(0.2)
    assert fridge.bundled == 2


def test_long_length_cells_are_refused_on_their_rows():
    # The old number-then-unit expression took about 1 s for one 16,000-character cell
    # and four times as long for each doubling; the parser refuses at its length limit.
    # (Python's csv module refuses cells over 131,072 characters on its own.)
    job = _system()
    rows = _table(circuits_to_csv(job))
    for row in rows:
        row["length"] = "1" * 100_000
    result = circuits_from_csv(job=job, text=_write(rows))
    assert {(e.row, e.column) for e in result.errors} == {(2, "length"), (3, "length"),
                                                          (4, "length")}  # fmt: skip
