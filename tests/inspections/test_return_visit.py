"""A return visit booked from this shop's approved job: a new job for the same vehicle with
the same devices, terminals, circuits and terminations (specs kept), the re-check open
first, the last record's final readings beside each end; lead or office books it, and
only from an approved record. Spec and readings are the tests' own figures (10 N·m
±10 %, the shop's default tolerance: common practice)."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.core.exceptions import PermissionDenied, ValidationError
from django.urls import reverse

from circuits.models import Circuit, Device, Terminal
from circuits.services import termination_update
from inspections.models import PriorRecord, Stage
from inspections.services.return_visit import final_readings, last_readings
from shop.models import Job
from tests.factories import make_job
from tests.inspections.factories import make_spec_circuit, make_wrench
from tests.inspections.return_visits import approved_job, book, ends, recheck_of

DEVICE_FIELDS = ("name", "kind", "is_source", "mounting", "enclosure", "location", "walking_order")
CIRCUIT_FIELDS = (
    "tag",
    "name",
    "role",
    "nominal_voltage",
    "design_current_a",
    "length_m",
    "conductor_size",
    "parallel",
    "protection_type",
    "protection_a",
)
END_FIELDS = (
    "end",
    "polarity",
    "conductor_index",
    "kind",
    "stud_size",
    "torque_value",
    "torque_unit",
    "torque_tolerance_pct",
    "torque_source",
    "torque_source_note",
)


@pytest.fixture
def wrench(db):
    return make_wrench()


HAND_TOLERANCE = Decimal("15.0")  # a lead's choice for one end (within the 1–30 % allowed)


@pytest.fixture
def earlier(db, technician, lead, wrench):
    job = make_job()
    make_spec_circuit(job)
    edited = ends(job)[0]
    edited.torque_tolerance_pct = HAND_TOLERANCE
    edited.torque_source_note = "Set by the lead for this lug"
    termination_update(termination=edited)
    correction = approved_job(job, technician=technician, lead=lead, wrench=wrench)
    job.refresh_from_db()
    job.correction = correction
    return job


def _devices(job):
    return [
        (
            tuple(getattr(d, f) for f in DEVICE_FIELDS),
            sorted(
                (t.name, t.polarity, t.stud_size, t.manual_torque_value) for t in d.terminals.all()
            ),
        )
        for d in Device.objects.filter(job=job).order_by("name")
    ]


def _circuits(job):
    return [
        (
            *(getattr(c, f) for f in CIRCUIT_FIELDS),
            c.from_device.name,
            c.to_device.name,
            c.from_terminal.name if c.from_terminal else None,
            c.to_terminal.name if c.to_terminal else None,
        )
        for c in Circuit.objects.filter(job=job).order_by("tag")
    ]


def _ends(job):
    return [
        (
            t.circuit.tag,
            *(getattr(t, f) for f in END_FIELDS),
            t.terminal.name if t.terminal else None,
        )
        for t in ends(job)
    ]


def test_a_return_visit_carries_the_whole_system_over(earlier, office):
    # The spec edited by hand on the earlier job comes over as it stood, not filled
    # afresh from the device manual.
    visit = book(earlier, by=office)
    assert ends(visit)[0].torque_tolerance_pct == HAND_TOLERANCE
    assert visit.kind == Job.Kind.RETURN_VISIT and visit.follows_id == earlier.pk
    assert visit.vehicle_id == earlier.vehicle_id and visit.number != earlier.number
    assert _devices(visit) == _devices(earlier)
    assert _circuits(visit) == _circuits(earlier)
    assert _ends(visit) == _ends(earlier)
    assert Terminal.objects.filter(device__job=visit).count() == 4


def test_its_re_check_is_open_first_and_the_build_stages_wait(earlier, office):
    visit = book(earlier, by=office)
    states = dict(Stage.objects.filter(job=visit).values_list("kind", "state"))
    assert states == {
        Stage.Kind.RECHECK: Stage.State.OPEN,
        Stage.Kind.FIRST_INSTALL: Stage.State.NOT_STARTED,
        Stage.Kind.HEAT_CYCLE: Stage.State.NOT_STARTED,
        Stage.Kind.RETORQUE: Stage.State.NOT_STARTED,
        Stage.Kind.HANDOVER: Stage.State.NOT_STARTED,
    }
    assert visit.status == Job.Status.RECHECK


def test_the_last_readings_are_the_earlier_jobs_final_ones_corrections_included(earlier, office):
    visit = book(earlier, by=office)
    last = last_readings(visit)
    assert len(last) == 4  # every end of the visit has its last reading
    corrected_end = earlier.correction.termination
    by_label = {reading.label: reading for reading in last.values()}
    corrected = next(
        r
        for r in by_label.values()
        if r.circuit_tag == corrected_end.circuit.tag
        and r.end == corrected_end.end
        and r.polarity == corrected_end.polarity
    )
    assert corrected.value == Decimal("10.500") and corrected.pass_name == "retorque"
    others = [r for r in last.values() if r.pk != corrected.pk]
    assert {r.value for r in others} == {Decimal("10.000")}
    assert all(r.wrench == earlier.correction.wrench.code for r in last.values())
    assert len(final_readings(earlier)) == 4


def test_the_last_record_is_kept_once_and_append_only(earlier, office):
    visit = book(earlier, by=office)
    prior = PriorRecord.objects.get(job=visit)
    assert prior.source == PriorRecord.Source.THIS_SHOP and prior.job_number == earlier.number
    assert prior.approved_at is not None
    assert [c["tag"] for c in prior.circuits] == list(
        earlier.circuits.order_by("tag").values_list("tag", flat=True)
    )
    from inspections.models import AppendOnlyError

    prior.shop_name = "changed"
    with pytest.raises(AppendOnlyError):
        prior.save()


def test_only_an_approved_job_starts_a_return_visit(db, office):
    job = make_job()
    with pytest.raises(ValidationError) as caught:
        book(job, by=office)
    assert "not approved" in str(caught.value)
    assert not Job.objects.filter(kind=Job.Kind.RETURN_VISIT).exists()


def test_a_technician_does_not_book_a_return_visit(earlier, technician):
    with pytest.raises(PermissionDenied):
        book(earlier, by=technician)


def test_a_return_visit_needs_a_title(earlier, lead):
    with pytest.raises(ValidationError) as caught:
        book(earlier, by=lead, title="   ")
    assert "title" in caught.value.message_dict
    assert not Job.objects.filter(kind=Job.Kind.RETURN_VISIT).exists()


# --- pages ---------------------------------------------------------------------------------


def test_the_approved_job_page_offers_the_return_visit_to_the_office(earlier, office_client):
    page = office_client.get(earlier.get_absolute_url())
    assert reverse("return_visit_book", args=[earlier.number]).encode() in page.content
    assert b"Book a return visit" in page.content


def test_a_technician_is_not_offered_it_and_is_refused(earlier, technician_client):
    page = technician_client.get(earlier.get_absolute_url())
    assert b"Book a return visit" not in page.content
    url = reverse("return_visit_book", args=[earlier.number])
    assert technician_client.get(url).status_code == 403
    assert technician_client.post(url, {"title": "Yearly re-check"}).status_code == 403
    assert not Job.objects.filter(kind=Job.Kind.RETURN_VISIT).exists()


def test_anonymous_is_sent_to_sign_in(earlier, anon_client):
    url = reverse("return_visit_book", args=[earlier.number])
    response = anon_client.get(url)
    assert response.status_code == 302 and "login" in response["Location"]


def test_the_office_books_it_on_the_page(earlier, office_client):
    url = reverse("return_visit_book", args=[earlier.number])
    assert office_client.get(url).status_code == 200
    response = office_client.post(
        url, {"title": "Yearly re-check", "booked_in_on": "2026-11-30", "description": ""}
    )
    visit = Job.objects.get(kind=Job.Kind.RETURN_VISIT)
    assert response.status_code == 302 and response["Location"] == visit.get_absolute_url()
    assert str(visit.booked_in_on) == "2026-11-30"
    page = office_client.get(visit.get_absolute_url())
    assert b"Return visit" in page.content and earlier.number.encode() in page.content
    assert b"Re-check" in page.content


def test_a_bad_date_is_shown_beside_its_field_and_nothing_is_booked(earlier, lead_client):
    url = reverse("return_visit_book", args=[earlier.number])
    response = lead_client.post(url, {"title": "Yearly re-check", "booked_in_on": "31.02.26"})
    assert response.status_code == 200 and b'id="booked_in_on_error"' in response.content
    assert not Job.objects.filter(kind=Job.Kind.RETURN_VISIT).exists()


def test_the_work_list_shows_the_last_reading_beside_each_end(
    earlier, office, technician, technician_client
):
    visit = book(earlier, by=office)
    visit.technicians.add(technician)
    page = technician_client.get(reverse("stage_work", args=[visit.number]))
    text = page.content.decode()
    assert page.status_code == 200 and "Re-check: torque readings" in text
    assert text.count("Last: 10 N·m at retorque") == 3
    assert text.count("Last: 10.5 N·m at retorque") == 1
    assert earlier.correction.wrench.code in text
    assert recheck_of(visit).state == Stage.State.OPEN


def test_a_return_visit_starts_from_the_vehicles_latest_approved_record(
    earlier, office, technician, lead, wrench
):
    later = make_job(vehicle=earlier.vehicle)
    approved_job(later, technician=technician, lead=lead, wrench=wrench)
    with pytest.raises(ValidationError) as caught:
        book(earlier, by=office)
    assert f"Job {later.number} is the vehicle's latest approved record" in str(caught.value)
    assert book(later, by=office).follows_id == later.pk
