"""wrench_save: the office adds and changes torque wrenches; every bad value is refused
with a message keyed by its field and nothing is saved; a wrench with readings keeps its
shop id and unit (the records name it and were judged in its range), though its range
and due date may change after a recalibration."""

from __future__ import annotations

import datetime
from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.utils import timezone

from inspections.models import Stage, TorqueWrench
from inspections.services.wrenches import wrench_save
from tests.inspections.factories import make_wrench, read

pytestmark = pytest.mark.django_db


def values(**changes) -> dict[str, object]:
    data = {
        "code": "TW-07",
        "description": "3/8 in click wrench",
        "range_min": "5",
        "range_max": "60",
        "unit": "N*m",
        "calibration_due": timezone.localdate() + datetime.timedelta(days=200),
    }
    data.update(changes)
    return data


def refused(by, field: str, **changes) -> list[str]:
    before = list(TorqueWrench.objects.values_list("pk", "code", "range_min", "range_max", "unit"))
    with pytest.raises(ValidationError) as caught:
        wrench_save(by=by, **values(**changes))
    after = list(TorqueWrench.objects.values_list("pk", "code", "range_min", "range_max", "unit"))
    assert after == before  # nothing saved changes
    assert field in caught.value.message_dict, caught.value.message_dict
    return caught.value.message_dict[field]


def test_the_office_adds_a_wrench(office):
    wrench = wrench_save(by=office, **values())
    assert (wrench.code, wrench.range_min, wrench.range_max) == ("TW-07", Decimal(5), Decimal(60))
    assert wrench.range_display == "5–60 N·m"
    assert wrench.in_service


def test_the_unit_may_be_given_as_its_label(office):
    assert wrench_save(by=office, **values(unit="lbf·ft")).unit == "lbf*ft"


@pytest.mark.parametrize("role", ["technician", "lead"])
def test_technicians_and_leads_do_not_keep_the_wrenches(request, role):
    with pytest.raises(PermissionDenied):
        wrench_save(by=request.getfixturevalue(role), **values())
    assert not TorqueWrench.objects.exists()


@pytest.mark.parametrize(
    "field, changes, message",
    [
        ("code", {"code": ""}, "Give the shop id"),
        ("code", {"code": "TW 07 <b>"}, "letters and digits"),
        ("code", {"code": "X" * 30}, "under 20 characters"),
        ("range_min", {"range_min": "NaN"}, "must be a number"),
        ("range_min", {"range_min": "inf"}, "must be a number"),
        ("range_min", {"range_min": "1e309"}, "far too large"),
        ("range_min", {"range_min": "-2"}, "above zero"),
        ("range_min", {"range_min": "five"}, "must be a number"),
        ("range_min", {"range_min": "2.125"}, "at most 2 decimal places"),
        ("range_max", {"range_max": "100000"}, "far too large"),
        ("range_max", {"range_max": "5"}, "must end above where it starts"),
        ("range_max", {"range_max": "3"}, "must end above where it starts"),
        ("unit", {"unit": "kg"}, "not a torque unit"),
        ("unit", {"unit": "parsec"}, "not a torque unit"),
        ("unit", {"unit": ""}, "Choose the unit"),
        ("calibration_due", {"calibration_due": None}, "Give the calibration due date"),
        ("calibration_due", {"calibration_due": "31/03/2026"}, "Give the calibration due date"),
        ("calibration_due", {"calibration_due": datetime.date(1900, 1, 1)}, "check the year"),
        ("calibration_due", {"calibration_due": datetime.date(2999, 1, 1)}, "check the year"),
    ],
)
def test_a_bad_value_is_refused_for_its_field(office, field, changes, message):
    messages = refused(office, field, **changes)
    assert any(message in m for m in messages), messages


def test_every_bad_field_is_listed_at_once(office):
    with pytest.raises(ValidationError) as caught:
        wrench_save(by=office, **values(code="", range_min="x", unit="kg", calibration_due=None))
    assert {"code", "range_min", "unit", "calibration_due"} <= set(caught.value.message_dict)


def test_a_shop_id_is_used_once_whatever_its_case(office):
    make_wrench(code="TW-07")
    assert "already has the shop id TW-07" in refused(office, "code", code="tw-07")[0]


def test_a_wrench_without_readings_may_change_anything(office):
    wrench = make_wrench(code="TW-08", unit="N*m")
    saved = wrench_save(by=office, wrench=wrench, **values(code="TW-09", unit="lbf*in"))
    assert saved.pk == wrench.pk
    assert (saved.code, saved.unit) == ("TW-09", "lbf*in")


@pytest.fixture
def used_wrench(install, termination, technician):
    wrench = make_wrench(code="TW-10")
    read(termination, install, 10, technician=technician, wrench=wrench)
    assert install.kind == Stage.Kind.FIRST_INSTALL
    return wrench


def test_a_wrench_with_readings_keeps_its_shop_id(office, used_wrench):
    with pytest.raises(ValidationError) as caught:
        wrench_save(by=office, wrench=used_wrench, **values(code="TW-11"))
    assert "keeps its shop id" in caught.value.message_dict["code"][0]
    used_wrench.refresh_from_db()
    assert used_wrench.code == "TW-10"


def test_a_wrench_with_readings_keeps_its_unit(office, used_wrench):
    with pytest.raises(ValidationError) as caught:
        wrench_save(by=office, wrench=used_wrench, **values(code="TW-10", unit="lbf*ft"))
    assert "keeps that unit" in caught.value.message_dict["unit"][0]
    used_wrench.refresh_from_db()
    assert used_wrench.unit == "N*m"


def test_a_recalibrated_wrench_with_readings_takes_a_new_range_and_due_date(office, used_wrench):
    due = timezone.localdate() + datetime.timedelta(days=365)
    saved = wrench_save(
        by=office,
        wrench=used_wrench,
        **values(code="TW-10", range_min="4", range_max="40", calibration_due=due),
    )
    assert saved.pk == used_wrench.pk
    assert (saved.range_min, saved.range_max, saved.calibration_due) == (
        Decimal(4),
        Decimal(40),
        due,
    )


def test_a_wrench_is_taken_out_of_service_not_deleted(office, used_wrench):
    saved = wrench_save(by=office, wrench=used_wrench, in_service=False, **values(code="TW-10"))
    assert not saved.in_service
    assert TorqueWrench.objects.filter(pk=used_wrench.pk).exists()
