"""The schedule CSV carries re-marking, bare conductors and the protection device: an
export read back gives the same circuits, and a file from before those columns (with its
`tape_remarked` column) still imports."""

from __future__ import annotations

import csv
import io
from decimal import Decimal

import pytest

from circuits.csv_io import COLUMNS, circuits_from_csv, circuits_to_csv
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = pytest.mark.django_db

NEW = [f"marking_{r}_{p}" for r in ("a", "b", "earth") for p in ("method", "colour", "ends")]
COMPARED = ["colour_a", "colour_b", "colour_earth", *NEW, "protection_type", "protection_a",
            "protection_distance_m", "conductors", "conductor_size"]  # fmt: skip


def _devices(job) -> dict:
    make_device(job, name="House battery", kind="battery")
    make_device(job, name="Main fuse", kind="protection", protection_type="fuse",
                protection_a=Decimal("250"))  # fmt: skip
    make_device(job, name="Busbar", kind="busbar")
    make_device(job, name="Chassis point", kind="other")
    return {d.name: d for d in job.devices.all()}


def _system():
    job = make_job()
    d = _devices(job)
    make_circuit(job, d["House battery"], d["Main fuse"], tag="M-01", role="main_feed",
                 conductors="pos", conductor_size="2/0 AWG", design_current_a=150,
                 length_m=0.15, colour_a="black", marking_a_method="heat_shrink",
                 marking_a_colour="red", marking_a_ends="both",
                 protection_device=d["Main fuse"], protection_type="none")  # fmt: skip
    make_circuit(job, d["Busbar"], d["Chassis point"], tag="E-01", role="bonding",
                 conductors="earth", conductor_size="4 AWG", design_current_a=1,
                 protection_type="none", colour_earth="bare")  # fmt: skip
    return job


def _snapshot(job) -> dict:
    return {
        c.tag: {
            **{n: getattr(c, n) for n in COMPARED},
            "protection_device": c.protection_device.name if c.protection_device else None,
        }
        for c in job.circuits.select_related("protection_device")
    }


def test_the_new_columns_are_exported():
    rows = list(csv.DictReader(io.StringIO(circuits_to_csv(_system()))))
    assert set(NEW) | {"protection_device"} <= set(COLUMNS)
    assert "tape_remarked" not in COLUMNS
    main = next(r for r in rows if r["tag"] == "M-01")
    assert (main["colour_a"], main["marking_a_method"], main["marking_a_colour"]) == (
        "black", "heat_shrink", "red")  # fmt: skip
    assert main["protection_device"] == "Main fuse" and main["protection_type"] == "none"
    assert main["protection_a"] == ""  # the rating lives on the device
    earth = next(r for r in rows if r["tag"] == "E-01")
    assert earth["colour_earth"] == "bare"


def test_export_then_import_gives_the_same_circuits():
    source = _system()
    fresh = make_job()
    _devices(fresh)
    result = circuits_from_csv(job=fresh, text=circuits_to_csv(source))
    assert result.ok, result.errors
    assert _snapshot(fresh) == _snapshot(source)


OLD_FILE = (
    "tag,name,role,from_device,to_device,nominal_voltage,design_current_a,length,"
    "conductor_size,conductors,colour_a,colour_b,tape_remarked,protection_type,protection_a\r\n"
    "D-01,Fridge,dc_branch,Busbar,Chassis point,12,10,2 m,12 AWG,pair,red,black,yes,fuse,15\r\n"
    "D-02,Lights,dc_branch,Busbar,Chassis point,12,5,3 m,14 AWG,neg,,black,no,fuse,10\r\n"
)


def test_an_old_file_with_tape_remarked_still_imports():
    # Read as migration 0006 reads the old tick: tape at both ends of the positive, in
    # the colour recorded for it.
    job = make_job()
    _devices(job)
    result = circuits_from_csv(job=job, text=OLD_FILE)
    assert result.ok, result.errors
    fridge = job.circuits.get(tag="D-01")
    assert (fridge.marking_a_method, fridge.marking_a_colour, fridge.marking_a_ends) == (
        "tape", "red", "both")  # fmt: skip
    assert (
        fridge.colour_summary == "positive red, marked red with tape at both ends; negative black"
    )
    lights = job.circuits.get(tag="D-02")
    assert not lights.marking_b_method and lights.protection_device is None


def test_a_protection_device_not_at_either_end_is_refused_beside_the_row():
    job = make_job()
    _devices(job)
    text = (
        "tag,name,role,from_device,to_device,nominal_voltage,design_current_a,length,"
        "conductor_size,protection_device\r\n"
        "D-01,Fridge,dc_branch,Busbar,Chassis point,12,10,2 m,12 AWG,Main fuse\r\n"
    )
    result = circuits_from_csv(job=job, text=text)
    assert not result.ok and not job.circuits.exists()
    [error] = result.errors
    assert error.row == 2 and error.column == "protection_device"
    assert "not at either end" in error.message
