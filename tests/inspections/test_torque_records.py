"""Torque readings: each refusal says what is wrong (all of it at once) and saves nothing;
the reading is judged against the spec copied at the time; a resend stores once
(corrections: test_corrections.py)."""

from __future__ import annotations

import datetime
import io
from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.core.files.uploadedfile import SimpleUploadedFile
from django.utils import timezone
from PIL import Image

from inspections.models import AuditEvent, Stage, TorqueRecord
from inspections.services.torque import _insert_once
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    log_soaked_run,
    make_spec_circuit,
    make_wrench,
    new_key,
    read,
)

pytestmark = pytest.mark.django_db


def _errors(exc_info) -> dict[str, list[str]]:
    return exc_info.value.message_dict


def _nothing_saved():
    assert TorqueRecord.objects.count() == 0
    assert AuditEvent.objects.count() == 0


# --- judged against the spec -------------------------------------------------------------


def test_reading_within_tolerance_is_stored_with_the_spec_copied(
    install, termination, wrench, technician
):
    record = read(termination, install, "10.5", technician=technician, wrench=wrench)
    record.refresh_from_db()
    assert record.result == TorqueRecord.Result.WITHIN
    assert record.value == Decimal("10.5") and record.unit == "N*m"
    assert record.value_nm == pytest.approx(10.5)
    assert (record.spec_value, record.spec_unit, record.spec_tolerance_pct) == (
        Decimal("10"),
        "N*m",
        Decimal("10"),
    )
    assert record.spec_source == "manual" and record.spec_nm == pytest.approx(10.0)
    assert (record.wrench, record.technician, record.found_loose) == (wrench, technician, False)


@pytest.mark.parametrize(
    "value, result",
    [
        ("8.99", TorqueRecord.Result.LOW),
        ("9", TorqueRecord.Result.WITHIN),  # the lower limit counts as within
        ("11", TorqueRecord.Result.WITHIN),  # and so does the upper one
        ("11.01", TorqueRecord.Result.HIGH),
    ],
)
def test_out_of_tolerance_reading_is_saved_as_low_or_high(
    install, termination, wrench, technician, value, result
):
    assert read(termination, install, value, technician=technician, wrench=wrench).result == result


def test_reading_in_another_unit_is_judged_in_newton_metres(
    install, termination, wrench, technician
):
    # 88.5 lbf·in × 0.112 984 8 N·m per lbf·in (NIST SP 811 B.9) = 9.999 N·m, within 10 ±10 %.
    record = read(termination, install, "88.5", unit="lbf*in", technician=technician, wrench=wrench)
    assert record.value_nm == pytest.approx(9.99916, rel=1e-6)
    assert record.result == TorqueRecord.Result.WITHIN
    assert record.value_display == "88.5 lbf·in"


def test_a_later_spec_change_does_not_rewrite_the_record(install, termination, wrench, technician):
    record = read(termination, install, "10", technician=technician, wrench=wrench)
    termination.torque_value = Decimal("25")
    termination.save()
    record.refresh_from_db()
    assert record.spec_value == Decimal("10") and record.result == TorqueRecord.Result.WITHIN


# --- bad values ---------------------------------------------------------------------------


@pytest.mark.parametrize(
    "value",
    [
        "abc",
        "",
        "  ",
        None,
        "-5",
        "0",
        "nan",
        "NaN",
        "inf",
        "-Infinity",
        float("nan"),
        float("inf"),
        True,
        "12,5",
        "12.3456",
        "1e400",
        [12],
    ],
)
def test_a_value_that_is_not_a_finite_positive_number_is_refused(
    install, termination, wrench, technician, value
):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, value, technician=technician, wrench=wrench)
    assert list(_errors(exc_info)) == ["value"]
    _nothing_saved()
    assert read(termination, install, "12", technician=technician, wrench=wrench).pk


@pytest.mark.parametrize(
    "unit, words",
    [
        ("m", "not a torque unit"),
        ("furlongs per fortnight", "not a torque unit"),
        ("", "Choose the unit"),
        ("ozf*in", "is a torque unit, but readings are recorded in"),
    ],
)
def test_an_unknown_or_non_torque_unit_is_refused(
    install, termination, wrench, technician, unit, words
):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", unit=unit, technician=technician, wrench=wrench)
    assert words in " ".join(_errors(exc_info)["unit"])
    _nothing_saved()


def test_a_unit_is_accepted_as_its_code_or_as_its_label(install, termination, wrench, technician):
    by_label = read(
        termination, install, "7.4", unit="lbf·ft", technician=technician, wrench=wrench
    )
    assert by_label.unit == "lbf*ft"


# --- the wrench ---------------------------------------------------------------------------


def test_a_wrench_past_its_calibration_date_is_refused_saying_by_how_many_days(
    install, termination, technician
):
    overdue = make_wrench(
        code="TW-OLD", calibration_due=timezone.localdate() - datetime.timedelta(days=3)
    )
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", technician=technician, wrench=overdue)
    message = " ".join(_errors(exc_info)["wrench"])
    assert "TW-OLD" in message and "3 days" in message
    _nothing_saved()
    due_today = make_wrench(calibration_due=timezone.localdate())
    assert read(termination, install, "10", technician=technician, wrench=due_today).pk


def test_an_out_of_service_wrench_is_refused(install, termination, technician):
    retired = make_wrench(in_service=False)
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", technician=technician, wrench=retired)
    assert "out of service" in " ".join(_errors(exc_info)["wrench"])


def test_a_reading_without_a_wrench_is_refused(install, termination, technician):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", technician=technician, wrench=None)
    assert "wrench" in _errors(exc_info)


def test_a_reading_below_the_wrench_range_says_by_how_much_in_the_entered_unit(
    install, termination, technician
):
    wrench = make_wrench(code="TW-5", range_min=Decimal("5"), range_max=Decimal("50"))
    # 5 N·m = 44.254 lbf·in (÷ 0.112 984 8, NIST SP 811 B.9): 30 lbf·in is 14.254 below.
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "30", unit="lbf*in", technician=technician, wrench=wrench)
    message = " ".join(_errors(exc_info)["value"])
    assert "below the range of wrench TW-5 (5–50 N·m) by 14.254 lbf·in" in message
    _nothing_saved()


def test_a_reading_above_the_wrench_range_says_by_how_much(install, termination, technician):
    wrench = make_wrench(code="TW-S", range_min=Decimal("1"), range_max=Decimal("12"))
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "120", technician=technician, wrench=wrench)
    assert "above the range of wrench TW-S (1–12 N·m) by 108 N·m" in " ".join(
        _errors(exc_info)["value"]
    )
    # The range limit itself is in range, through a unit conversion as well.
    assert read(termination, install, "12", technician=technician, wrench=wrench).pk


# --- the stage and the termination --------------------------------------------------------


def test_found_loose_is_refused_at_first_install_and_recorded_at_retorque(
    install, stages, termination, wrench, technician
):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", found_loose=True, technician=technician, wrench=wrench)
    assert "retorque only" in " ".join(_errors(exc_info)["found_loose"])
    _nothing_saved()
    log_soaked_run(install.job, technician)
    retorque = stages[Stage.Kind.RETORQUE]
    record = read(
        termination, retorque, "10", found_loose=True, technician=technician, wrench=wrench
    )
    assert record.found_loose


def test_a_reading_is_refused_while_the_retorque_stage_has_not_started(
    stages, termination, wrench, technician
):
    retorque = stages[Stage.Kind.RETORQUE]
    with pytest.raises(ValidationError) as exc_info:
        read(termination, retorque, "10", technician=technician, wrench=wrench)
    assert "not started" in " ".join(_errors(exc_info)["stage"])
    _nothing_saved()
    log_soaked_run(retorque.job, technician)
    assert read(termination, retorque, "10", technician=technician, wrench=wrench).pk


def test_a_reading_is_refused_on_a_signed_stage_even_with_a_stale_stage_object(
    install, termination, wrench, technician
):
    stale = Stage.objects.get(pk=install.pk)
    install.state = Stage.State.SIGNED
    install.save()
    with pytest.raises(ValidationError) as exc_info:
        read(termination, stale, "10", technician=technician, wrench=wrench)
    assert "signed" in " ".join(_errors(exc_info)["stage"])
    _nothing_saved()


@pytest.mark.parametrize("state", [Stage.State.SENT_BACK, Stage.State.REOPENED])
def test_a_stage_sent_back_or_reopened_takes_readings(
    install, termination, wrench, technician, state
):
    install.state = state
    install.save()
    assert read(termination, install, "10", technician=technician, wrench=wrench).pk


def test_no_torque_reading_belongs_to_the_heat_cycle_stage(
    heat_stage, termination, wrench, technician
):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, heat_stage, "10", technician=technician, wrench=wrench)
    assert "first install and at retorque" in " ".join(_errors(exc_info)["stage"])


def test_a_termination_without_a_torque_spec_is_refused(install, termination, wrench, technician):
    termination.torque_value = None
    termination.save()
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", technician=technician, wrench=wrench)
    assert "no torque spec" in " ".join(_errors(exc_info)["termination"])
    _nothing_saved()
    termination.torque_value = Decimal("10")
    termination.save()
    assert read(termination, install, "10", technician=technician, wrench=wrench).pk


def test_a_termination_of_another_job_is_refused(install, wrench, technician):
    other_job = make_job()
    elsewhere = make_spec_circuit(other_job).terminations.first()
    with pytest.raises(ValidationError) as exc_info:
        read(elsewhere, install, "10", technician=technician, wrench=wrench)
    assert f"belongs to job {other_job.number}" in " ".join(_errors(exc_info)["termination"])
    _nothing_saved()


def test_a_reading_dated_in_the_future_is_refused(install, termination, wrench, technician):
    later = timezone.now() + datetime.timedelta(hours=2)
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", at=later, technician=technician, wrench=wrench)
    assert "in the future" in " ".join(_errors(exc_info)["at"])


def test_an_offline_reading_is_judged_on_the_day_it_was_taken(install, termination, technician):
    # The wrench's calibration lapsed yesterday; the reading was taken two days ago and
    # arrives only now.
    wrench = make_wrench(calibration_due=timezone.localdate() - datetime.timedelta(days=1))
    taken = timezone.now() - datetime.timedelta(days=2)
    record = read(termination, install, "10", at=taken, technician=technician, wrench=wrench)
    assert record.recorded_at == taken


def test_every_unmet_condition_is_listed_at_once(install, termination, technician):
    overdue = make_wrench(calibration_due=timezone.localdate() - datetime.timedelta(days=40))
    termination.torque_value = None
    termination.save()
    with pytest.raises(ValidationError) as exc_info:
        read(
            termination,
            install,
            "-3",
            unit="m",
            found_loose=True,
            technician=technician,
            wrench=overdue,
        )
    assert set(_errors(exc_info)) == {"value", "unit", "wrench", "found_loose", "termination"}
    assert "40 days" in " ".join(_errors(exc_info)["wrench"])
    _nothing_saved()


def test_a_photo_is_kept_with_the_reading_and_a_file_that_is_no_image_is_refused(
    install, termination, wrench, technician, settings, tmp_path
):
    settings.STORAGES = {
        **settings.STORAGES,
        "default": {
            "BACKEND": "django.core.files.storage.FileSystemStorage",
            "OPTIONS": {"location": str(tmp_path)},
        },
    }
    fake = SimpleUploadedFile("lug.jpg", b"not an image", content_type="image/jpeg")
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", photo=fake, technician=technician, wrench=wrench)
    assert "photo" in _errors(exc_info)
    _nothing_saved()
    buffer = io.BytesIO()
    Image.new("RGB", (4, 4), "red").save(buffer, "JPEG")
    photo = SimpleUploadedFile("lug.jpg", buffer.getvalue(), content_type="image/jpeg")
    record = read(termination, install, "10", photo=photo, technician=technician, wrench=wrench)
    assert record.photo.name.startswith("inspections/torque/")


# --- who may ------------------------------------------------------------------------------


def test_office_cannot_record_a_torque_reading(install, termination, wrench, office):
    with pytest.raises(PermissionDenied):
        read(termination, install, "10", technician=office, wrench=wrench)
    _nothing_saved()


def test_a_deactivated_technician_cannot_record_a_reading(install, termination, wrench):
    former = make_user(roles.TECHNICIAN, is_active=False)
    with pytest.raises(PermissionDenied):
        read(termination, install, "10", technician=former, wrench=wrench)


def test_a_lead_records_a_reading(install, termination, wrench, lead):
    assert read(termination, install, "10", technician=lead, wrench=wrench).technician == lead


# --- a resend stores once -----------------------------------------------------------------


def test_the_same_reading_sent_twice_is_stored_once(install, termination, wrench, technician):
    key = new_key()
    first = read(termination, install, "10.5", client_key=key, technician=technician, wrench=wrench)
    again = read(
        termination, install, "10.50", client_key=key, technician=technician, wrench=wrench
    )
    assert again.pk == first.pk
    assert TorqueRecord.objects.filter(client_key=key).count() == 1
    assert AuditEvent.objects.filter(kind=AuditEvent.Kind.READING).count() == 1


def test_a_resend_after_the_stage_was_signed_returns_the_stored_reading(
    install, termination, wrench, technician
):
    key = new_key()
    first = read(termination, install, "10", client_key=key, technician=technician, wrench=wrench)
    install.state = Stage.State.SIGNED
    install.save()
    again = read(termination, install, "10", client_key=key, technician=technician, wrench=wrench)
    assert again.pk == first.pk


def test_the_same_key_with_a_different_value_is_refused(install, termination, wrench, technician):
    key = new_key()
    read(termination, install, "10", client_key=key, technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "12", client_key=key, technician=technician, wrench=wrench)
    assert "already used for another reading" in " ".join(_errors(exc_info)["client_key"])
    assert TorqueRecord.objects.get(client_key=key).value == Decimal("10")


def test_a_racing_duplicate_is_caught_by_the_unique_key_not_by_a_check(
    install, termination, wrench, technician
):
    stored = read(termination, install, "10", technician=technician, wrench=wrench)
    twin = TorqueRecord(
        **{
            f.attname: getattr(stored, f.attname)
            for f in TorqueRecord._meta.concrete_fields
            if not f.primary_key
        }
    )
    again, created = _insert_once(twin)
    assert (again.pk, created) == (stored.pk, False)
    assert TorqueRecord.objects.count() == 1


@pytest.mark.parametrize("key", ["", None, "has spaces", "x" * 65, "<script>"])
def test_a_missing_or_malformed_key_is_refused(install, termination, wrench, technician, key):
    with pytest.raises(ValidationError) as exc_info:
        read(termination, install, "10", client_key=key, technician=technician, wrench=wrench)
    assert "client_key" in _errors(exc_info)
