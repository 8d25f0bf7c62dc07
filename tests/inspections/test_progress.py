"""What a stage's progress line and the gates read: the current reading per termination
(the latest one no correction superseded) and the counts."""

from __future__ import annotations

import datetime

import pytest
from django.utils import timezone

from inspections.services import current_readings, torque_progress, torque_record_correct
from tests.inspections.factories import new_key, read

pytestmark = pytest.mark.django_db


def test_the_current_reading_is_the_latest_one_not_superseded(
    install, termination, wrench, technician
):
    earlier = timezone.now() - datetime.timedelta(minutes=10)
    low = read(termination, install, "7", at=earlier, technician=technician, wrench=wrench)
    retightened = read(termination, install, "10", technician=technician, wrench=wrench)
    assert current_readings(install)[termination.pk] == retightened
    # Correcting the earlier reading does not make it current again: it keeps its time.
    torque_record_correct(
        record=low,
        value="7.5",
        unit="N*m",
        wrench=wrench,
        technician=technician,
        reason="misread the scale",
        client_key=new_key(),
    )
    assert current_readings(install)[termination.pk] == retightened


def test_a_correction_of_the_current_reading_takes_its_place(
    install, termination, wrench, technician
):
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    fixed = torque_record_correct(
        record=wrong,
        value="10",
        unit="N*m",
        wrench=wrench,
        technician=technician,
        reason="typed 21 for 10",
        client_key=new_key(),
    )
    assert current_readings(install) == {termination.pk: fixed}


def test_progress_counts_read_out_of_tolerance_and_found_loose(
    retorque, terminations, wrench, technician
):
    a, b, c, _ = terminations
    read(a, retorque, "10", found_loose=True, technician=technician, wrench=wrench)
    read(b, retorque, "7", technician=technician, wrench=wrench)
    read(c, retorque, "10", technician=technician, wrench=wrench)
    progress = torque_progress(retorque)
    assert str(progress) == "3 of 4 terminations read, 1 out of tolerance, 1 found loose"
    assert not progress.complete


def test_a_connection_found_loose_stays_counted_after_it_is_read_again_tight(
    retorque, termination, wrench, technician
):
    read(termination, retorque, "10", found_loose=True, technician=technician, wrench=wrench)
    read(termination, retorque, "10", technician=technician, wrench=wrench)
    assert torque_progress(retorque).found_loose == 1


def test_a_later_reading_within_tolerance_clears_an_out_of_tolerance_one(
    install, terminations, wrench, technician
):
    for termination in terminations:
        read(termination, install, "10", technician=technician, wrench=wrench)
    read(terminations[0], install, "12", technician=technician, wrench=wrench)
    assert str(torque_progress(install)) == "4 of 4 terminations read, 1 out of tolerance"
    read(terminations[0], install, "10", technician=technician, wrench=wrench)
    assert torque_progress(install).complete


def test_first_install_progress_does_not_speak_of_found_loose(install, termination):
    assert str(torque_progress(install)) == "0 of 4 terminations read, 0 out of tolerance"
