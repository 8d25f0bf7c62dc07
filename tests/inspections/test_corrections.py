"""Corrections: a wrongly entered reading is put right by a new record that supersedes it,
carries a reason, keeps the original's time and spec, and is checked like a reading. The
original stays as it was."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError

from inspections.models import Stage, TorqueRecord
from inspections.services import torque_record_correct
from tests.inspections.factories import make_wrench, new_key, read

pytestmark = pytest.mark.django_db


def _errors(exc_info) -> dict[str, list[str]]:
    return exc_info.value.message_dict


def _correct(record, value, **kwargs):
    kwargs.setdefault("unit", "N*m")
    kwargs.setdefault("reason", "typed 21 for 12 on the keypad")
    kwargs.setdefault("client_key", new_key())
    return torque_record_correct(record=record, value=value, **kwargs)


def test_a_correction_supersedes_the_reading_and_keeps_the_original(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    assert wrong.result == TorqueRecord.Result.HIGH
    fixed = _correct(wrong, "12", wrench=wrench, technician=technician)
    wrong.refresh_from_db()
    assert wrong.value == Decimal("21") and wrong.superseded_by == fixed
    assert fixed.supersedes == wrong and fixed.correction_reason.startswith("typed")
    assert fixed.result == TorqueRecord.Result.HIGH  # 12 N·m is still above 10 ±10 %
    assert fixed.recorded_at == wrong.recorded_at and fixed.spec_nm == wrong.spec_nm
    assert list(TorqueRecord.objects.current()) == [fixed]


@pytest.mark.parametrize("reason", ["", "   ", "typo"])
def test_a_correction_needs_a_reason(install, termination, wrench, technician, reason):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    with pytest.raises(ValidationError) as exc_info:
        _correct(wrong, "10", reason=reason, wrench=wrench, technician=technician)
    assert "Say why" in " ".join(_errors(exc_info)["reason"])
    assert TorqueRecord.objects.count() == 1
    assert _correct(wrong, "10", reason="typed 21 for 12", wrench=wrench, technician=technician).pk


def test_a_correction_is_judged_against_the_spec_of_the_original_reading(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    termination.torque_value = Decimal("20")
    termination.save()
    fixed = _correct(wrong, "10", wrench=wrench, technician=technician)
    assert fixed.spec_value == Decimal("10") and fixed.result == TorqueRecord.Result.WITHIN


def test_a_corrected_reading_cannot_be_corrected_again_only_its_correction(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    fixed = _correct(wrong, "12", wrench=wrench, technician=technician)
    with pytest.raises(ValidationError) as exc_info:
        _correct(wrong, "10", wrench=wrench, technician=technician)
    assert "already corrected to 12 N·m" in " ".join(_errors(exc_info)["record"])
    assert _correct(fixed, "10", wrench=wrench, technician=technician).supersedes == fixed


def test_a_correction_sent_twice_is_stored_once(install, termination, wrench, technician):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    key = new_key()
    first = _correct(wrong, "12", client_key=key, wrench=wrench, technician=technician)
    again = _correct(wrong, "12", client_key=key, wrench=wrench, technician=technician)
    assert again.pk == first.pk and TorqueRecord.objects.count() == 2


def test_a_correction_is_refused_once_the_stage_is_signed(install, termination, wrench, technician):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    install.state = Stage.State.SIGNED
    install.save()
    with pytest.raises(ValidationError) as exc_info:
        _correct(wrong, "12", wrench=wrench, technician=technician)
    assert "signed" in " ".join(_errors(exc_info)["stage"])


def test_a_correction_checks_its_value_and_wrench_like_a_reading(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    small = make_wrench(range_min=Decimal("1"), range_max=Decimal("5"))
    with pytest.raises(ValidationError) as exc_info:
        _correct(wrong, "nan", unit="furlong", wrench=small, technician=technician)
    assert {"value", "unit"} <= set(_errors(exc_info))
    with pytest.raises(ValidationError) as exc_info:
        _correct(wrong, "12", wrench=small, technician=technician)
    assert "above the range" in " ".join(_errors(exc_info)["value"])


def test_office_cannot_correct_a_reading(install, termination, wrench, technician, office):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    with pytest.raises(PermissionDenied):
        _correct(wrong, "12", wrench=wrench, technician=office)
