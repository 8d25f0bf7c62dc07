"""manage.py import_record: a wiring record PDF's embedded data becomes a new job for
the vehicle, with the same devices, terminals, circuits and terminations; a file that is
not such a record is refused with exit 1 and one line on stderr, and nothing is saved."""

from __future__ import annotations

import json

import pytest
from django.core.management import call_command

from circuits.csv_io import circuits_to_csv
from circuits.models import Termination
from shop.models import Job, Vehicle
from tests.wiring.pdf_helpers import embedded
from tests.wiring.record_jobs import OTHER_VIN, known_job
from wiring.render import render_record_pdf, stage_sheet_pdf
from wiring.render.pdf import html_to_pdf, record_attachments

SPEC_FIELDS = ("kind", "stud_size", "torque_value", "torque_unit", "torque_tolerance_pct")


@pytest.fixture
def job(db, settings, tmp_path, technician, lead):
    settings.MEDIA_ROOT = tmp_path / "media"
    return known_job(technician=technician, lead=lead)


@pytest.fixture
def record_file(job, tmp_path):
    path = tmp_path / "record.pdf"
    path.write_bytes(render_record_pdf(job, revision=1, draft=False, verify_url=""))
    return path


def run(path, capsys) -> tuple[int, str, str]:
    try:
        call_command("import_record", str(path))
        code = 0
    except SystemExit as exc:
        code = exc.code
    out = capsys.readouterr()
    return code, out.out.strip(), out.err


def ends(job) -> list[tuple]:
    rows = Termination.objects.filter(circuit__job=job).order_by(
        "circuit__tag", "end", "polarity", "conductor_index"
    )
    return [
        (t.circuit.tag, t.end, t.polarity, t.conductor_index, *(getattr(t, f) for f in SPEC_FIELDS))
        for t in rows
    ]


def test_the_record_round_trips_into_a_new_job(job, record_file, capsys):
    code, out, err = run(record_file, capsys)
    assert (code, err) == (0, "")
    new = Job.objects.get(number=out)
    assert new.pk != job.pk and new.vehicle_id == job.vehicle_id  # same vehicle, new job
    assert circuits_to_csv(new) == circuits_to_csv(job)
    assert ends(new) == ends(job)
    old_devices = {
        (d.name, d.kind, tuple(t.name for t in d.terminals.all())) for d in job.devices.all()
    }
    new_devices = {
        (d.name, d.kind, tuple(t.name for t in d.terminals.all())) for d in new.devices.all()
    }
    assert new_devices == old_devices
    assert not new.signoffs.exists()  # the evidence of the old job is not copied


def test_an_unknown_vehicle_and_owner_are_created(job, record_file, capsys):
    vehicle = job.vehicle
    record = json.loads(embedded(record_file.read_bytes())["record.json"])
    # The same file read on another shop's server: no such vehicle there yet.
    record["vehicle"]["identification"] = OTHER_VIN
    pdf = _with_record(job, record)
    record_file.write_bytes(pdf)
    code, out, _ = run(record_file, capsys)
    assert code == 0
    new = Job.objects.get(number=out)
    assert new.vehicle_id != vehicle.pk
    assert new.vehicle.identification == OTHER_VIN
    assert new.vehicle.owner.name == "Ilse Marrow"


def _with_record(job, record: dict) -> bytes:
    from weasyprint import Attachment

    attachments = [a for a in record_attachments(job, record) if a is not None]
    attachments[1] = Attachment(string=json.dumps(record), name="record.json")
    return html_to_pdf("<p>Record</p>", attachments=attachments)


@pytest.mark.parametrize(
    ("change", "says"),
    [
        (lambda r: r.update(schema_version=2), "schema version 2"),
        (lambda r: r.update(schema="something.else"), "not a ampwright.wiring-record"),
        (lambda r: r.pop("circuits"), "lacks circuits"),
        (lambda r: r["devices"].append({"kind": "load"}), "has no name"),
    ],
)
def test_a_record_of_another_shape_is_refused(job, tmp_path, capsys, change, says):
    record = json.loads(
        embedded(render_record_pdf(job, revision=1, draft=False, verify_url=""))["record.json"]
    )
    change(record)
    path = tmp_path / "odd.pdf"
    path.write_bytes(_with_record(job, record))
    before = Job.objects.count()
    code, out, err = run(path, capsys)
    assert code == 1 and out == ""
    assert says in err and err.count("\n") == 1 and "Traceback" not in err
    assert Job.objects.count() == before


def test_a_file_that_is_not_a_pdf_is_refused(db, tmp_path, capsys):
    path = tmp_path / "notes.pdf"
    path.write_text("just some notes")
    code, _, err = run(path, capsys)
    assert code == 1 and err == "import_record: This file is not a PDF.\n"


def test_a_broken_pdf_is_refused(db, tmp_path, capsys):
    path = tmp_path / "broken.pdf"
    path.write_bytes(b"%PDF-1.7\n garbage without any objects")
    code, _, err = run(path, capsys)
    assert code == 1 and err.count("\n") == 1 and "Traceback" not in err


def test_a_pdf_without_record_data_is_refused(job, tmp_path, capsys):
    from inspections.models import Stage

    path = tmp_path / "sheet.pdf"
    path.write_bytes(stage_sheet_pdf(job.stages.get(kind=Stage.Kind.FIRST_INSTALL)))
    code, _, err = run(path, capsys)
    assert code == 1 and "carries no record.json" in err


def test_a_missing_file_is_refused(db, tmp_path, capsys):
    code, _, err = run(tmp_path / "absent.pdf", capsys)
    assert code == 1 and "Cannot read" in err


def test_a_bad_device_saves_nothing(job, tmp_path, capsys):
    record = json.loads(
        embedded(render_record_pdf(job, revision=1, draft=False, verify_url=""))["record.json"]
    )
    record["devices"][-1]["kind"] = "warp_core"
    path = tmp_path / "bad.pdf"
    path.write_bytes(_with_record(job, record))
    vehicles, jobs = Vehicle.objects.count(), Job.objects.count()
    code, _, err = run(path, capsys)
    assert code == 1 and "kind" in err
    assert (Vehicle.objects.count(), Job.objects.count()) == (vehicles, jobs)
