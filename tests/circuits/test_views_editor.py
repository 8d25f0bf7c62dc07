"""The circuit editor: new, edit and a confirmed delete through the services (writes by
technicians assigned to the job, or any lead or office user), and the live panel that
sizes what is typed without saving anything."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import Circuit, Device, Termination
from circuits.sizing import CAUTION
from shop import roles
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


@pytest.fixture
def job(technician):
    job = make_job(technicians=[technician])
    make_device(job, name="Busbar", kind=Device.Kind.BUSBAR)
    make_device(job, name="Fridge")
    return job


def _form(job, **overrides) -> dict:
    data = {
        "tag": "D-01",
        "name": "Fridge feed",
        "role": "dc_branch",
        "conductors": "pair",
        "from_device": job.devices.get(name="Busbar").pk,
        "to_device": job.devices.get(name="Fridge").pk,
        "design_current_a": "8",
        "length": "10 ft",
        "length_unit": "m",
        "conductor_size": "14 AWG",
        "parallel": "1",
        "construction": "fine",
        "tinned": "on",
        "insulation_c": "105",
        "bundled": "1",
        "protection_type": "fuse",
        "protection_a": "15",
        "colour_a": "red",
        "colour_b": "black",
    }
    data.update(overrides)
    return data


def _no_role_client() -> Client:
    client = Client()
    client.force_login(make_user())
    return client


# ---- new ----


def test_new_circuit_page_needs_sign_in_and_a_role(anon_client, job):
    url = reverse("circuit_new", args=[job.number])
    assert anon_client.get(url).status_code == 302
    assert _no_role_client().get(url).status_code == 403
    assert _no_role_client().post(url, _form(job)).status_code == 403
    assert not Circuit.objects.exists()


def test_technician_adds_a_circuit_with_its_terminations(technician_client, job):
    url = reverse("circuit_new", args=[job.number])
    page = technician_client.get(url)
    assert page.status_code == 200
    assert "Live sizing" in page.content.decode()
    response = technician_client.post(url, _form(job))
    circuit = Circuit.objects.get(job=job, tag="D-01")
    assert response.status_code == 302
    assert response["Location"] == circuit.get_absolute_url()
    assert circuit.length_m == pytest.approx(10 * FOOT_M)
    assert circuit.length_unit == "ft"
    assert circuit.nominal_voltage == 12  # the vehicle's DC system, left blank
    # Positive and negative, two ends each (circuits.services.terminations_sync).
    assert circuit.terminations.count() == 4


def test_bad_input_shows_errors_beside_fields_and_saves_nothing(technician_client, job):
    url = reverse("circuit_new", args=[job.number])
    response = technician_client.post(url, _form(job, length="ten metres", conductor_size="4x"))
    body = response.content.decode()
    assert response.status_code == 200
    assert 'id="id_length_error"' in body
    assert "Cannot read the one-way length" in body
    assert 'id="id_conductor_size_error"' in body
    assert not Circuit.objects.exists()
    assert not Termination.objects.exists()


def test_a_page_without_javascript_shows_the_panel_for_a_bad_post(technician_client, job):
    url = reverse("circuit_new", args=[job.number])
    body = technician_client.post(url, _form(job, name="")).content.decode()
    # The name is missing, but the sizing fields are fine: the panel sizes the circuit.
    assert "Ampacity" in body
    assert "Voltage drop" in body
    assert not Circuit.objects.exists()


# ---- edit ----


def test_edit_page_shows_the_saved_sizing_findings_and_terminations(technician_client, job):
    bus, fridge = job.devices.get(name="Busbar"), job.devices.get(name="Fridge")
    make_terminal(bus, name="Stud 3", polarity="pos", stud_size="M8")
    circuit = make_circuit(
        job, bus, fridge, tag="D-01", construction="solid", length_m=3.0, length_unit="m"
    )
    response = technician_client.get(circuit.get_absolute_url())
    body = response.content.decode()
    assert response.status_code == 200
    assert 'value="3 m"' in body
    for text in ["Ampacity", "Voltage drop", "Recommended size", "CONSTRUCTION_SOLID"]:
        assert text in body, text
    assert "Blocking" in body and "■" in body  # a word and a shape, not colour alone
    assert "Terminations of D-01" in body
    assert "Stud 3" in body
    assert CAUTION in body


def test_editing_saves_through_the_services(technician_client, job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    data = _form(job, tag=circuit.tag, parallel="2", length="3 m")
    response = technician_client.post(circuit.get_absolute_url(), data)
    assert response.status_code == 302
    circuit.refresh_from_db()
    assert circuit.parallel == 2
    assert circuit.length_m == pytest.approx(3.0)
    assert circuit.terminations.count() == 8  # two conductors per polarity now


def test_edit_needs_change_permission_to_post(job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    client = _no_role_client()
    assert client.get(circuit.get_absolute_url()).status_code == 403
    assert client.post(circuit.get_absolute_url(), _form(job)).status_code == 403


def _unassigned_client() -> Client:
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    return client


def test_unassigned_technician_cannot_edit_circuit(job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    client = _unassigned_client()
    # Reading the circuit is open to every technician; saving is for those on the job.
    assert client.get(circuit.get_absolute_url()).status_code == 200
    response = client.post(circuit.get_absolute_url(), _form(job, tag=circuit.tag, parallel="2"))
    assert response.status_code == 403
    body = response.content.decode()
    assert f"You are not assigned to job {job.number}" in body
    assert "ask a lead to add you" in body
    circuit.refresh_from_db()
    assert circuit.parallel == 1


def test_unassigned_technician_cannot_add_circuit(job):
    client = _unassigned_client()
    url = reverse("circuit_new", args=[job.number])
    assert "ask a lead to add you" in client.get(url).content.decode()
    assert client.post(url, _form(job)).status_code == 403
    assert not Circuit.objects.exists()


def test_the_jobs_lead_writes_to_it_as_well_as_its_technicians(lead, job):
    # Leads write to any job (shop.work_on_any_job); being the job's lead is enough too.
    job.lead = lead
    job.save()
    client = Client()
    client.force_login(lead)
    assert client.post(reverse("circuit_new", args=[job.number]), _form(job)).status_code == 302


def test_a_refusal_is_logged(job, caplog):
    client = _unassigned_client()
    with caplog.at_level("WARNING", logger="security"):
        client.post(reverse("circuit_new", args=[job.number]), _form(job))
    assert any(
        "event=forbidden" in r.getMessage() and "not assigned" in r.getMessage()
        for r in caplog.records
    )


def test_a_circuit_of_another_job_is_not_found(technician_client, job):
    other = make_job()
    circuit = make_circuit(other, make_device(other), make_device(other))
    url = reverse("circuit_edit", args=[job.number, circuit.pk])
    assert technician_client.get(url).status_code == 404


# ---- live panel ----


def _preview(client, job, data, circuit=None):
    url = reverse("circuit_preview", args=[job.number])
    if circuit is not None:
        url += f"?circuit={circuit.pk}"
    return client.post(url, data, headers={"HX-Request": "true"})


def test_preview_sizes_what_is_typed_and_saves_nothing(technician_client, job):
    response = _preview(technician_client, job, _form(job, length="3 m"))
    body = response.content.decode()
    assert response.status_code == 200
    assert "<html" not in body
    # 14 AWG, 105 °C, outside engine spaces: 35 A (33 CFR 183.425 Table 5).
    assert "35 A" in body
    assert "Voltage drop" in body
    assert "Recommended size" in body
    assert CAUTION in body
    assert 'id="panel-summary" class="panel-summary" hx-swap-oob="true"' in body
    assert not Circuit.objects.exists()
    assert not Termination.objects.exists()


def test_preview_of_a_saved_circuit_leaves_it_unchanged(technician_client, job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    before = Circuit.objects.values().get(pk=circuit.pk)
    data = _form(job, tag=circuit.tag, design_current_a="40", length="30 ft")
    body = _preview(technician_client, job, data, circuit).content.decode()
    assert "below the" in body  # 40 A on 14 AWG is too much
    assert Circuit.objects.values().get(pk=circuit.pk) == before
    assert circuit.terminations.count() == 4


def test_preview_length_in_feet_or_metres_sizes_the_same_run(technician_client, job):
    feet = _preview(technician_client, job, _form(job, length="10 ft")).content.decode()
    metres = _preview(technician_client, job, _form(job, length="3.048 m")).content.decode()
    assert feet == metres


def test_preview_recommends_a_size_when_none_is_entered(technician_client, job):
    body = _preview(technician_client, job, _form(job, conductor_size="")).content.decode()
    assert "recommended; no size entered" in body
    assert "Why not" in body


def test_preview_of_an_incomplete_form_says_which_fields_are_needed(technician_client, job):
    data = _form(job, design_current_a="", length="")
    response = _preview(technician_client, job, data)
    body = response.content.decode()
    assert response.status_code == 200
    assert "To size this circuit, fill in:" in body
    assert "Design current (A)" in body
    assert "One-way length" in body


def test_preview_shows_sizing_findings_with_words_and_shapes(technician_client, job):
    # 14 AWG allows 35 A here (33 CFR 183.425 Table 5, 105 °C); a 60 A fuse is above it.
    body = _preview(technician_client, job, _form(job, protection_a="60")).content.decode()
    assert "PROTECTION_ABOVE_AMPACITY" in body
    assert "Blocking" in body and "■" in body


def test_preview_runs_the_whole_system_rules_on_a_valid_form(technician_client, job):
    body = _preview(technician_client, job, _form(job, construction="solid")).content.decode()
    assert "CONSTRUCTION_SOLID" in body
    assert "Sizing engine and whole-system rules." in body


def test_preview_sends_new_terminal_choices_when_a_device_changes(technician_client, job):
    fridge = job.devices.get(name="Fridge")
    make_terminal(fridge, name="Fridge +", polarity="pos")
    data = _form(job, terminals_for=f"{job.devices.get(name='Busbar').pk}:")
    body = _preview(technician_client, job, data).content.decode()
    assert '<div id="slot-to_terminal" hx-swap-oob="true">' in body
    assert "Fridge +" in body
    ends = f"{data['from_device']}:{data['to_device']}"
    same = _preview(technician_client, job, _form(job, terminals_for=ends)).content.decode()
    assert "slot-to_terminal" not in same


def test_preview_needs_a_role(anon_client, job):
    url = reverse("circuit_preview", args=[job.number])
    assert anon_client.post(url, _form(job)).status_code == 302
    assert _no_role_client().post(url, _form(job)).status_code == 403


# ---- delete ----


def test_only_leads_and_office_delete_circuits(technician_client, lead_client, job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    url = reverse("circuit_delete", args=[job.number, circuit.pk])
    assert technician_client.get(url).status_code == 403
    assert technician_client.post(url, {"confirm": "yes"}).status_code == 403
    assert Circuit.objects.filter(pk=circuit.pk).exists()
    assert lead_client.get(url).status_code == 200
    response = lead_client.post(url, {"confirm": "yes"})
    assert response.status_code == 302
    assert response["Location"] == job.get_absolute_url()
    assert not Circuit.objects.filter(pk=circuit.pk).exists()
    assert not Termination.objects.filter(circuit_id=circuit.pk).exists()


def test_office_may_delete_and_anonymous_may_not(anon_client, office_client, job):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    url = reverse("circuit_delete", args=[job.number, circuit.pk])
    assert anon_client.post(url, {"confirm": "yes"}).status_code == 302
    assert Circuit.objects.filter(pk=circuit.pk).exists()
    assert office_client.post(url, {"confirm": "yes"}).status_code == 302
    assert not Circuit.objects.filter(pk=circuit.pk).exists()


def test_delete_circuit_needs_confirmation(lead_client, job, caplog):
    circuit = make_circuit(
        job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"), tag="D-07"
    )
    url = reverse("circuit_delete", args=[job.number, circuit.pk])
    page = lead_client.get(url).content.decode()
    assert 'name="confirm" value="yes"' in page
    response = lead_client.post(url)  # an empty POST is not a confirmation
    assert response.status_code == 200
    assert "Nothing was deleted" in response.content.decode()
    assert Circuit.objects.filter(pk=circuit.pk).exists()
    assert circuit.terminations.count() == 4
    with caplog.at_level("WARNING", logger="security"):
        assert lead_client.post(url, {"confirm": "yes"}).status_code == 302
    assert not Circuit.objects.filter(pk=circuit.pk).exists()
    logged = [r.getMessage() for r in caplog.records if r.name == "security"]
    assert any(
        "event=delete" in m
        and "record='circuit'" in m
        and "tag='D-07'" in m
        and f"job='{job.number}'" in m
        and "who=lead" in m
        and "when=" in m
        for m in logged
    ), logged


@pytest.mark.parametrize(
    "overrides",
    [
        {"from_device": "abc", "to_device": "999999"},
        {"parallel": "0", "bundled": "-3"},
        {"insulation_c": "999"},
        {"design_current_a": "1e400", "length": "1e400 m"},
        {"design_current_a": "-5", "length": "-2 ft"},
        {"conductor_size": "0000000", "nominal_voltage": "abc"},
        {"role": "warp", "protection_type": "fuse", "protection_a": "NaN"},
        {"length": "3 m", "length_unit": "furlong"},
    ],
)
def test_preview_answers_nonsense_with_words_not_a_500(technician_client, job, overrides):
    response = _preview(technician_client, job, _form(job, **overrides))
    assert response.status_code == 200
    assert CAUTION in response.content.decode()
    assert not Circuit.objects.exists()


# ---- tampered ids and unit text: words beside the field, never a 500 ----


@pytest.mark.parametrize("tampered", ["²", "١", str(10**308), str(2**63)])
def test_unicode_digit_ids_do_not_crash(technician_client, job, tampered):
    circuit = make_circuit(job, job.devices.get(name="Busbar"), job.devices.get(name="Fridge"))
    url = reverse("circuit_preview", args=[job.number]) + f"?circuit={tampered}"
    data = _form(job, tag=circuit.tag, from_device=tampered)
    response = technician_client.post(url, data, headers={"HX-Request": "true"})
    assert response.status_code == 200  # no such circuit: previewed as a new one
    assert "Live sizing" in response.content.decode()
    new = technician_client.get(
        reverse("circuit_new", args=[job.number]), {"from_device": tampered}
    )
    assert new.status_code in (200, 403)  # 403: the technician is not on this job
    assert not Termination.objects.exclude(circuit=circuit).exists()


@pytest.mark.parametrize("side", ["from_device", "to_device", "from_terminal", "to_terminal"])
def test_huge_device_id_is_a_field_error(lead_client, job, side):
    url = reverse("circuit_new", args=[job.number])
    response = lead_client.post(url, _form(job, **{side: str(10**308)}))
    assert response.status_code == 200
    body = response.content.decode()
    assert f'id="id_{side}_error"' in body or "Choose a terminal" in body
    assert not Circuit.objects.exists()


@pytest.mark.parametrize("length", ["10 (", "10 m/0", "10 'ft'", "10 m**(9**9**9)", "1e308 m"])
def test_preview_answers_unit_text_with_words_beside_the_length(technician_client, job, length):
    response = _preview(technician_client, job, _form(job, length=length))
    assert response.status_code == 200
    body = response.content.decode()
    assert "One-way length" in body and ("do not read" in body or "exponent" in body)
    assert not Circuit.objects.exists()
