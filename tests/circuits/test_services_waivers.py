"""Waivers are bound to what was waived: a waiver covers its finding only while the
circuits it rests on are as they were when the lead granted it. A material change lapses
it (the finding is open again and says what changed) until a lead renews it; a cosmetic
change does not. Withdrawing keeps the row."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError

from circuits.models import Device, Waiver
from circuits.services import circuit_update, waiver_create, waiver_withdraw
from circuits.system import job_system_report
from shop import roles
from tests.circuits.factories import make_battery_bank
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db

REASON = "Interconnect kept as fitted by the owner; replaced at the next service."
CODE = "BOTTLENECK_INTERCONNECT"


@pytest.fixture
def job():
    return make_job()


@pytest.fixture
def bank(job):
    """Two paralleled batteries joined by a thin 2 AWG interconnect C-01 (150 A over
    0.3 m) and a 4/0 main feed C-02: a blocking BOTTLENECK_INTERCONNECT on C-01."""
    return make_battery_bank(job, interconnect="2 AWG")


def _found(job, code=CODE):
    [found] = [f for f in job_system_report(job).all_findings if f.code == code]
    return found


def _waive(job, lead, subject="C-01", reason=REASON) -> Waiver:
    return waiver_create(job=job, code=CODE, subject=subject, reason=reason, lead=lead)


def test_a_waiver_records_the_message_and_the_facts_it_was_granted_on(job, bank, lead):
    link, feed = bank
    waiver = _waive(job, lead)
    assert waiver.message.startswith("Thin interconnect is a bottleneck: C-01")
    assert set(waiver.facts["circuits"]) == {str(link.pk), str(feed.pk)}
    assert waiver.facts["circuits"][str(link.pk)]["length_m"] == "0.3"
    assert len(waiver.facts_hash) == 64
    assert _found(job).waived


def test_waiver_lapses_when_circuit_changes(job, bank, lead, technician):
    """The story: a lead waived a thin interconnect; a technician tripled the run's length
    and raised its current. The waiver no longer covers it."""
    link, _ = bank
    _waive(job, lead)
    circuit_update(circuit=link, length_m=0.9, design_current_a=Decimal("200"))
    found = _found(job)
    assert not found.waived
    assert found.severity == "blocking" and found.open_blocking
    assert found in job_system_report(job).open_blocking
    assert found.lapse_note == (
        "waived for an earlier version of this circuit: "
        "length 0.3 m → 0.9 m; design current 150 A → 200 A"
    )
    # The waiver itself is untouched: it is still on file, waiting to be renewed.
    assert found.lapsed_waiver.reason == REASON


def test_waiver_survives_cosmetic_edit(job, bank, lead):
    link, _ = bank
    _waive(job, lead)
    circuit_update(circuit=link, name="Bank link, renamed", notes="Label moved.", length_unit="ft")
    found = _found(job)
    assert found.waived and not found.open_blocking


def test_a_change_of_wording_alone_does_not_lapse_it(job, bank, lead):
    """Renaming a battery changes the finding's message, not the facts it rests on."""
    waiver = _waive(job, lead)
    Device.objects.filter(job=job, name="Battery 1").update(name="House battery A")
    found = _found(job)
    assert "House battery A" in found.message and found.message != waiver.message
    assert found.waived


def test_waiver_follows_renamed_tag_and_still_matches(job, bank, lead):
    link, feed = bank
    _waive(job, lead)
    circuit_update(circuit=link, tag="C-11")
    circuit_update(circuit=feed, tag="C-12")  # the other circuit it names, renamed too
    found = _found(job)
    assert found.subject == "C-11"
    assert found.waived and found.waiver.reason == REASON


def test_lead_can_renew_lapsed_waiver(job, bank, lead):
    link, _ = bank
    first = _waive(job, lead)
    circuit_update(circuit=link, length_m=0.9)
    assert not _found(job).waived
    renewed = _waive(job, lead, reason="Length checked again; still accepted for the rig.")
    assert renewed.renews == first and renewed.is_active
    first.refresh_from_db()
    assert first.superseded_at is not None and not first.is_active
    assert first.facts["circuits"][str(link.pk)]["length_m"] == "0.3"  # kept as history
    found = _found(job)
    assert found.waived and found.waiver == renewed
    assert Waiver.objects.count() == 2


def test_a_waiver_that_still_covers_its_finding_is_not_renewed(job, bank, lead):
    _waive(job, lead)
    with pytest.raises(ValidationError, match="already waived"):
        _waive(job, make_user(roles.LEAD))
    assert Waiver.objects.count() == 1


def test_withdrawing_keeps_the_row(job, bank, lead):
    waiver = _waive(job, lead)
    waiver_withdraw(waiver=waiver, user=lead, reason="  The owner is replacing it now.  ")
    waiver.refresh_from_db()
    assert waiver.withdrawn_by == lead and waiver.withdrawn_at is not None
    assert waiver.withdrawal_reason == "The owner is replacing it now."
    assert not waiver.is_active
    found = _found(job)
    assert not found.waived and found.waiver is None and found.open_blocking
    # A withdrawn waiver is not withdrawn twice, and a new waiver may be given.
    with pytest.raises(ValidationError, match="no longer in force"):
        waiver_withdraw(waiver=waiver, user=lead)
    again = _waive(job, lead)
    assert again.renews is None and Waiver.objects.count() == 2


def test_technician_cannot_waive_or_withdraw(job, bank, lead, technician, office):
    for user in (technician, office):
        with pytest.raises(PermissionDenied):
            _waive(job, user)
    waiver = _waive(job, lead)
    for user in (technician, office):
        with pytest.raises(PermissionDenied):
            waiver_withdraw(waiver=waiver, user=user)
    waiver.refresh_from_db()
    assert waiver.is_active and Waiver.objects.count() == 1


def test_one_waiver_in_force_per_finding_is_a_database_rule(job, bank, lead):
    waiver = _waive(job, lead)
    from django.db import IntegrityError, transaction

    with pytest.raises(IntegrityError), transaction.atomic():
        Waiver.objects.create(job=job, code=CODE, subject="C-01", reason=REASON, lead=lead)
    waiver_withdraw(waiver=waiver, user=lead)
    Waiver.objects.create(job=job, code=CODE, subject="C-01", reason=REASON, lead=lead)


def test_a_waiver_with_no_recorded_facts_needs_renewal(job, bank, lead):
    """As left by the upgrade (migration 0003) for waivers given before facts were kept."""
    old = Waiver.objects.create(job=job, code=CODE, subject="C-01", reason=REASON, lead=lead)
    found = _found(job)
    assert not found.waived and found.lapsed_waiver == old and found.open_blocking
    assert "renew it" in found.lapse_note
    renewed = _waive(job, lead)
    assert renewed.renews == old and _found(job).waived
