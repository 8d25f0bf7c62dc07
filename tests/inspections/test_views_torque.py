"""The technician's torque pages: the work list, the entry, corrections and the label
scan (the offline queue's endpoint is in test_views_torque_sync.py). Each as anonymous,
wrong role and right role; bad
input gets a message beside its field and saves nothing; a resend is stored once."""

from __future__ import annotations

import uuid

import pytest
from django.urls import reverse

from circuits.models import Device
from inspections.models import Stage, TorqueRecord
from shop import roles
from tests.factories import make_job, make_user
from tests.inspections.factories import (
    approved,
    make_spec_circuit,
    make_wrench,
    read,
)
from tests.inspections.torque_pages import (
    LBF_IN_NM,
    payload,
    signed_in,
    sync,
)


@pytest.fixture
def job(job, technician):
    """The conftest's job, with the technician assigned to it."""
    job.technicians.add(technician)
    return job


def _entry(job, termination) -> str:
    return reverse("torque_entry", args=[job.number, termination.pk])


def _post_reading(client, job, termination, value="10", unit="N*m", wrench=None, **extra):
    data = {
        "value": value,
        "unit": unit,
        "wrench": "" if wrench is None else str(wrench.pk),
        "client_key": extra.pop("client_key", str(uuid.uuid4())),
        "stage": extra.pop("stage", str(Stage.Kind.FIRST_INSTALL)),
        **extra,
    }
    return client.post(_entry(job, termination), data)


# ---- the work list ----


def test_work_list_needs_sign_in(client, job, install):
    response = client.get(reverse("stage_work", args=[job.number]))
    assert response.status_code == 302 and "/login/" in response["Location"]


def test_work_list_says_progress_in_words_and_groups_by_device_in_walking_order(
    client, job, install, technician, wrench
):
    circuit = make_spec_circuit(job, tag="M-01")
    first, second = sorted(
        {t.device for t in circuit.terminations.all()}, key=lambda device: device.name
    )
    # The second device sits first in the vehicle.
    Device.objects.filter(pk=second.pk).update(walking_order=1)
    Device.objects.filter(pk=first.pk).update(walking_order=2)
    low = circuit.terminations.filter(end="from").first()
    read(low, install, "5", technician=technician, wrench=wrench)
    response = signed_in(client, technician).get(reverse("stage_work", args=[job.number]))
    html = response.content.decode()
    assert response.status_code == 200
    assert "1 of 4 terminations read, 1 out of tolerance" in html
    assert html.index(f'id="device-{second.pk}"') < html.index(f'id="device-{first.pk}"')
    assert "Low: 5 N·m" in html  # in words, not colour only
    assert "Not read" in html
    assert "Spec 10 N·m ±10 %" in html
    assert reverse("walking_order", args=[job.number]) in html


def test_work_list_offers_no_entry_or_reorder_to_the_office(client, job, install, office, wrench):
    circuit = make_spec_circuit(job)
    termination = circuit.terminations.first()
    html = signed_in(client, office).get(reverse("stage_work", args=[job.number])).content.decode()
    assert _entry(job, termination) not in html
    assert 'id="pending-readings"' in html


def test_a_stranger_sees_the_list_without_entry_links(client, job, install):
    termination = make_spec_circuit(job).terminations.first()
    stranger = make_user(roles.TECHNICIAN)
    html = (
        signed_in(client, stranger).get(reverse("stage_work", args=[job.number])).content.decode()
    )
    assert _entry(job, termination) not in html
    assert reverse("walking_order", args=[job.number]) not in html


# ---- the entry ----


def test_entry_needs_sign_in_and_refuses_office_and_strangers(client, job, install):
    termination = make_spec_circuit(job).terminations.first()
    url = _entry(job, termination)
    assert "/login/" in client.get(url)["Location"]
    client.force_login(make_user(roles.OFFICE))
    assert client.get(url).status_code == 403
    client.force_login(make_user(roles.TECHNICIAN))  # not on this job
    assert client.get(url).status_code == 403
    assert client.post(url, {"value": "10"}).status_code == 403
    assert not TorqueRecord.objects.exists()


def test_a_termination_of_another_job_is_not_found(client, job, install, technician):
    other = make_job()
    foreign = make_spec_circuit(other).terminations.first()
    response = signed_in(client, technician).get(_entry(job, foreign))
    assert response.status_code == 404


def test_entry_has_the_numeric_keypad_field_units_and_a_server_made_key(
    client, job, install, technician, wrench
):
    termination = make_spec_circuit(job).terminations.first()
    html = signed_in(client, technician).get(_entry(job, termination)).content.decode()
    assert 'inputmode="decimal"' in html
    for label in ("N·m", "lbf·in", "lbf·ft", "kgf·cm"):
        assert f">{label}</option>" in html
    assert 'name="client_key" value="' in html
    assert "found_loose" not in html  # only at retorque


def test_a_reading_is_saved_and_the_next_unread_termination_opens(
    client, job, install, technician, wrench
):
    circuit = make_spec_circuit(job)
    rows = list(circuit.terminations.order_by("end", "polarity", "pk"))
    response = _post_reading(signed_in(client, technician), job, rows[0], wrench=wrench)
    record = TorqueRecord.objects.get()
    assert response.status_code == 302
    assert response["Location"].startswith(_entry(job, rows[1]))
    assert f"saved={record.pk}" in response["Location"]
    shown = client.get(response["Location"]).content.decode()
    assert "Within tolerance: 10 N·m" in shown


def test_next_follows_the_walking_order_of_devices(client, job, install, technician, wrench):
    circuit = make_spec_circuit(job)
    from_device, to_device = circuit.from_device, circuit.to_device
    Device.objects.filter(pk=to_device.pk).update(walking_order=1)
    Device.objects.filter(pk=from_device.pk).update(walking_order=2)
    on_to = list(circuit.terminations.filter(end="to").order_by("polarity"))
    on_from = list(circuit.terminations.filter(end="from").order_by("polarity"))
    client = signed_in(client, technician)
    # The last termination on the first device in the vehicle leads to the next device.
    _post_reading(client, job, on_to[0], wrench=wrench)
    response = _post_reading(client, job, on_to[1], wrench=wrench)
    assert response["Location"].startswith(_entry(job, on_from[0]))


def test_after_the_last_reading_the_work_list_opens(client, job, install, technician, wrench):
    circuit = make_spec_circuit(job)
    terminations = list(circuit.terminations.all())
    client = signed_in(client, technician)
    for termination in terminations[:-1]:
        read(termination, install, "10", technician=technician, wrench=wrench)
    response = _post_reading(client, job, terminations[-1], wrench=wrench)
    assert response["Location"].startswith(reverse("stage_work", args=[job.number]))


def test_an_out_of_tolerance_reading_is_saved_as_such_with_a_correct_link(
    client, job, install, technician, wrench
):
    termination = make_spec_circuit(job).terminations.first()
    client = signed_in(client, technician)
    response = _post_reading(client, job, termination, value="12", wrench=wrench)
    record = TorqueRecord.objects.get()
    assert record.result == TorqueRecord.Result.HIGH
    page = client.get(response["Location"]).content.decode()
    # 10 N·m ±10 % accepts 9–11 N·m (shop default tolerance, common practice).
    assert "High by 2 N·m" in page
    assert reverse("torque_correct", args=[job.number, record.pk]) in page
    work = client.get(reverse("stage_work", args=[job.number])).content.decode()
    assert "1 of 4 terminations read, 1 out of tolerance" in work


@pytest.mark.parametrize(
    ("value", "unit", "field", "words"),
    [
        ("twelve", "N*m", "value", "must be a number"),
        ("-5", "N*m", "value", "greater than zero"),
        ("NaN", "N*m", "value", "must be a number"),
        ("inf", "N*m", "value", "must be a number"),
        ("1e309", "N*m", "value", "far too large"),
        ("60", "N*m", "value", "above the range of wrench"),  # the wrench reads 2–50 N·m
        ("10", "furlong", "unit", "not a torque unit"),
        ("10", "kg", "unit", "not a torque unit"),
    ],
)
def test_bad_input_gets_a_message_beside_the_field_and_saves_nothing(
    client, job, install, technician, wrench, value, unit, field, words
):
    termination = make_spec_circuit(job).terminations.first()
    response = _post_reading(
        signed_in(client, technician), job, termination, value=value, unit=unit, wrench=wrench
    )
    assert response.status_code == 200
    html = response.content.decode()
    assert f'id="{field}_error"' in html
    start = html.index(f'id="{field}_error"')
    assert words in html[start : start + 400]
    assert not TorqueRecord.objects.exists()


def test_no_wrench_chosen_is_refused_beside_the_wrench(client, job, install, technician):
    termination = make_spec_circuit(job).terminations.first()
    response = _post_reading(signed_in(client, technician), job, termination)
    html = response.content.decode()
    assert "Choose the wrench you used." in html[html.index('id="wrench_error"') :][:300]
    assert not TorqueRecord.objects.exists()


def test_a_double_submit_of_the_same_form_is_stored_once(client, job, install, technician, wrench):
    termination = make_spec_circuit(job).terminations.first()
    client = signed_in(client, technician)
    key = str(uuid.uuid4())
    first = _post_reading(client, job, termination, wrench=wrench, client_key=key)
    again = _post_reading(client, job, termination, wrench=wrench, client_key=key)
    assert first.status_code == again.status_code == 302
    assert TorqueRecord.objects.count() == 1


def test_the_entry_remembers_the_technician_s_last_unit_and_wrench(
    client, job, install, technician, wrench
):
    other_wrench = make_wrench()
    circuit = make_spec_circuit(job)
    first, second = list(circuit.terminations.all())[:2]
    read(first, install, "88.5", unit="lbf*in", technician=technician, wrench=other_wrench)
    html = signed_in(client, technician).get(_entry(job, second)).content.decode()
    assert 'value="lbf*in"' in html.split("selected>lbf·in<")[0][-200:]
    assert f'<option value="{other_wrench.pk}" selected>' in html
    # The spec is shown in the remembered unit: 10 N·m / 0.1129848 = 88.51 lbf·in
    # (NIST SP 811, B.9).
    expected = 10 / LBF_IN_NM
    assert f"{expected:.2f} lbf·in" in html


def test_a_lead_can_record_on_any_job(client, job, install, lead, wrench):
    termination = make_spec_circuit(job).terminations.first()
    response = _post_reading(signed_in(client, lead), job, termination, wrench=wrench)
    assert response.status_code == 302
    assert TorqueRecord.objects.get().technician == lead


def test_found_loose_is_a_switch_at_retorque_only(client, job, technician, wrench):
    from tests.inspections.factories import log_soaked_run, through_install

    through_install(job, technician=technician, wrench=wrench)
    log_soaked_run(job, technician)
    termination = job.circuits.first().terminations.first()
    client = signed_in(client, technician)
    html = client.get(_entry(job, termination)).content.decode()
    assert 'type="checkbox" role="switch" name="found_loose"' in html
    response = _post_reading(
        client, job, termination, wrench=wrench, stage=str(Stage.Kind.RETORQUE), found_loose="on"
    )
    assert response.status_code == 302
    record = TorqueRecord.objects.get(stage__kind=Stage.Kind.RETORQUE)
    assert record.found_loose is True


def test_a_locked_job_refuses_readings(client, job, technician, lead, wrench):
    approved(job, technician=technician, lead=lead, wrench=wrench)
    termination = job.circuits.first().terminations.first()
    before = TorqueRecord.objects.count()
    client = signed_in(client, technician)
    html = client.get(_entry(job, termination)).content.decode()
    assert 'name="value"' not in html  # no form to fill in
    response = _post_reading(client, job, termination, wrench=wrench)
    assert response.status_code == 200
    assert TorqueRecord.objects.count() == before


# ---- corrections ----


def test_a_correction_needs_a_reason_and_takes_the_old_reading_s_place(
    client, job, install, technician, wrench
):
    termination = make_spec_circuit(job).terminations.first()
    wrong = read(termination, install, "21", technician=technician, wrench=wrench)
    url = reverse("torque_correct", args=[job.number, wrong.pk])
    client = signed_in(client, technician)
    assert client.get(url).status_code == 200
    data = {"value": "12", "unit": "N*m", "wrench": str(wrench.pk), "client_key": "k-1"}
    refused = client.post(url, {**data, "reason": ""})
    assert refused.status_code == 200
    assert 'id="reason_error"' in refused.content.decode()
    assert TorqueRecord.objects.count() == 1
    done = client.post(url, {**data, "value": "10.5", "reason": "typed 21 for 10.5"})
    assert done.status_code == 302
    correction = TorqueRecord.objects.get(supersedes=wrong)
    assert correction.result == TorqueRecord.Result.WITHIN
    assert correction.correction_reason == "typed 21 for 10.5"


def test_corrections_are_refused_to_office_strangers_and_for_another_job(
    client, job, install, technician, wrench
):
    termination = make_spec_circuit(job).terminations.first()
    record = read(termination, install, "21", technician=technician, wrench=wrench)
    url = reverse("torque_correct", args=[job.number, record.pk])
    assert "/login/" in client.get(url)["Location"]
    client.force_login(make_user(roles.OFFICE))
    assert client.get(url).status_code == 403
    client.force_login(make_user(roles.TECHNICIAN))
    assert client.post(url, {"value": "10", "reason": "x" * 20}).status_code == 403
    other = make_job()
    other.technicians.add(technician)
    client.force_login(technician)
    assert client.get(reverse("torque_correct", args=[other.number, record.pk])).status_code == 404
    assert TorqueRecord.objects.count() == 1


# ---- the label scan ----


def test_a_label_scan_opens_the_first_unread_termination_of_that_end(
    client, job, install, technician, wrench
):
    circuit = make_spec_circuit(job)
    to_ends = list(circuit.terminations.filter(end="to").order_by("polarity"))
    read(to_ends[0], install, "10", technician=technician, wrench=wrench)
    response = signed_in(client, technician).get(reverse("label_scan", args=[circuit.pk, "to"]))
    assert response.status_code == 302
    assert response["Location"] == _entry(job, to_ends[1])


def test_a_label_scan_without_an_open_torque_stage_lands_on_the_circuit(
    client, job, technician, lead, wrench
):
    approved(job, technician=technician, lead=lead, wrench=wrench)
    circuit = job.circuits.first()
    response = signed_in(client, technician).get(reverse("label_scan", args=[circuit.pk, "from"]))
    assert response["Location"] == circuit.get_absolute_url()


def test_a_label_scan_by_someone_who_records_nothing_lands_on_the_circuit(client, job, install):
    circuit = make_spec_circuit(job)
    client.force_login(make_user(roles.OFFICE))
    response = client.get(reverse("label_scan", args=[circuit.pk, "from"]))
    assert response["Location"] == circuit.get_absolute_url()


def test_a_label_scan_needs_sign_in_a_known_circuit_and_a_real_end(client, job, technician):
    circuit = make_spec_circuit(job)
    assert "/login/" in client.get(reverse("label_scan", args=[circuit.pk, "from"]))["Location"]
    client.force_login(technician)
    assert client.get(reverse("label_scan", args=[circuit.pk, "middle"])).status_code == 404
    assert client.get(reverse("label_scan", args=[999999, "from"])).status_code == 404
    assert client.post(reverse("label_scan", args=[circuit.pk, "from"])).status_code == 405


HOSTILE = ["\x00", "1\x00", "9" * 400, "-0", "1e308", "²", '<script>alert("x")</script>', " "]


@pytest.mark.parametrize("field", ["value", "unit", "wrench", "note", "client_key", "stage"])
@pytest.mark.parametrize("hostile", HOSTILE)
def test_hostile_input_in_any_field_never_fails_the_page(
    client, job, install, technician, wrench, field, hostile
):
    """Careless or hostile text in any field: a plain answer (never a server error, markup
    escaped), and a NUL, which the database cannot store, saves nothing."""
    termination = make_spec_circuit(job).terminations.first()
    client = signed_in(client, technician)
    data = {
        "value": "10",
        "unit": "N*m",
        "wrench": str(wrench.pk),
        "note": "",
        "client_key": str(uuid.uuid4()),
        "stage": "1",
        field: hostile,
    }
    response = client.post(_entry(job, termination), data)
    assert response.status_code in (200, 302)
    assert "<script>alert" not in response.content.decode()
    if "\x00" in hostile and field != "stage":
        assert not TorqueRecord.objects.exists()
    if field in ("value", "unit", "note", "client_key"):
        name = "key" if field == "client_key" else field
        answer = sync(client, job, [payload(termination, wrench, **{name: hostile})])
        assert answer.status_code == 200
        if "\x00" in hostile:
            assert answer.json()["results"][0]["status"] == "refused"
    record = TorqueRecord.objects.first()
    if record is not None:
        correct = client.post(
            reverse("torque_correct", args=[job.number, record.pk]),
            {**data, "reason": "typed it wrong, fixed it"},
        )
        assert correct.status_code in (200, 302)
        assert "<script>alert" not in correct.content.decode()


def test_the_work_list_is_refused_to_a_user_without_a_role(client, job, install):
    client.force_login(make_user())
    assert client.get(reverse("stage_work", args=[job.number])).status_code == 403


def test_with_htmx_a_save_answers_the_next_entry_with_the_result(
    client, job, install, technician, wrench
):
    rows = list(make_spec_circuit(job).terminations.order_by("end", "polarity", "pk"))
    client = signed_in(client, technician)
    response = client.post(
        _entry(job, rows[0]),
        {
            "value": "9.5",
            "unit": "N*m",
            "wrench": str(wrench.pk),
            "client_key": str(uuid.uuid4()),
            "stage": "1",
        },
        HTTP_HX_REQUEST="true",
    )
    html = response.content.decode()
    assert response.status_code == 200
    assert "<html" not in html and 'id="torque-entry"' in html
    assert "Within tolerance: 9.5 N·m" in html
    assert f'data-termination="{rows[1].pk}"' in html
    assert response["HX-Push-Url"].startswith(_entry(job, rows[1]))
