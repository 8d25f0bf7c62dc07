"""Job page: the head, then the stage the work is at with its progress and one button to
carry on, the sign-offs (unchanged or changed since signing), a summary of the findings
with links, and the job facts; write buttons only for those who may write the job."""

from __future__ import annotations

import datetime

import pytest
from django.test import Client
from django.urls import reverse

from inspections.models import Stage
from inspections.services import job_reopen
from shop import roles
from shop.models import ShopProfile
from tests.factories import make_job, make_owner, make_user, make_vehicle
from tests.inspections.factories import (
    approved,
    log_soaked_run,
    make_spec_circuit,
    make_wrench,
    read,
    stages_by_kind,
    through_install,
)

pytestmark = pytest.mark.django_db


def _client(user) -> Client:
    client = Client()
    client.force_login(user)
    return client


def _page(client, job) -> str:
    response = client.get(job.get_absolute_url())
    assert response.status_code == 200
    return response.content.decode()


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(make_job().get_absolute_url())
    assert response.status_code == 302
    assert response["Location"].startswith(reverse("login"))


def test_a_user_without_a_role_is_refused(client, django_user_model):
    client.force_login(django_user_model.objects.create_user("norole", password="x-pass-123"))
    assert client.get(make_job().get_absolute_url()).status_code == 403


def test_unknown_job_is_404(technician_client):
    assert technician_client.get("/jobs/NOPE-2026-9999/").status_code == 404


def test_the_page_is_read_only(technician_client):
    assert technician_client.post(make_job().get_absolute_url()).status_code == 405


def test_technician_sees_the_head_the_stage_and_the_facts(technician_client, technician, lead):
    owner = make_owner(name="Hollis Testowner")
    job = make_job(make_vehicle(owner, identification="1M8GDM9AXKP042788"), lead=lead)
    job.technicians.add(technician)
    body = _page(technician_client, job)
    for text in [
        job.number,
        "Hollis Testowner",
        "1M8GDM9AXKP042788",
        "Test Lead",
        "Test Technician",
        'id="stage"',
        'id="signoffs"',
        'id="circuits"',
        'id="findings"',
        'id="facts"',
    ]:
        assert text in body, text
    # The head comes first, then the stage, then the sign-offs, the system and the facts.
    order = [body.index(f'id="{name}"') for name in ("stage", "signoffs", "circuits", "facts")]
    assert order == sorted(order)
    # Technicians cannot edit jobs, so no edit link is offered.
    assert "Edit job" not in body


def test_lead_is_offered_the_edit_link(lead_client):
    assert "Edit job" in _page(lead_client, make_job())


def test_the_strip_names_every_stage_and_its_state_in_words(technician_client):
    body = _page(technician_client, make_job())
    for name in ("First install", "Heat-cycle run", "Retorque", "Handover"):
        assert f'<span class="step-name">{name}</span>' in body
    assert '<span class="step-state">open</span>' in body
    assert body.count('<span class="step-state">not started</span>') == 3
    assert body.count('aria-current="step"') == 1


def test_first_install_progress_in_words_and_one_button_to_carry_on(technician):
    job = make_job()
    job.technicians.add(technician)
    circuit = make_spec_circuit(job)
    wrench = make_wrench()
    install = stages_by_kind(job)[Stage.Kind.FIRST_INSTALL]
    first, second, *_ = circuit.terminations.order_by("pk")
    read(first, install, "10", technician=technician, wrench=wrench)
    # 14 N·m against 10 N·m ± 10 %: out of tolerance (the factory's spec).
    read(second, install, "14", technician=technician, wrench=wrench)
    body = _page(_client(technician), job)
    assert "2 of 4 terminations read, 1 out of tolerance" in body
    work = reverse("stage_work", args=[job.number])
    assert body.count(f'class="button primary carry-on" href="{work}"') == 1
    assert "Carry on with the first install" in body
    assert reverse("stage_checklist", args=[job.number, 1]) in body
    assert reverse("stage_sign", args=[job.number, 1]) in body
    assert reverse("job_timeline", args=[job.number]) in body


def test_an_unassigned_technician_gets_no_write_buttons(technician_client, lead):
    job = make_job()
    make_spec_circuit(job)
    body = _page(technician_client, job)
    assert "carry-on" not in body
    assert reverse("stage_sign", args=[job.number, 1]) not in body
    assert "Add circuit" not in body and "Add device" not in body
    assert "only those assigned to it" in body
    # Assigned, the same technician is offered them.
    job.technicians.add(technician_client.session["_auth_user_id"])
    body = _page(technician_client, job)
    assert "Carry on with the first install" in body and "Add circuit" in body


def test_office_reads_the_stage_but_is_not_asked_to_torque(office_client):
    body = _page(office_client, make_job())
    assert "carry-on" not in body
    assert "done by the technicians assigned to this job" in body


def test_heat_cycle_stage_leads_to_logging_the_run(technician, wrench_and_job):
    wrench, job = wrench_and_job
    through_install(job, technician=technician, wrench=wrench)
    body = _page(_client(technician), job)
    assert "No heat-cycle run logged yet." in body
    assert f'href="{reverse("heat_cycle_log", args=[job.number])}"' in body
    assert "Log the heat-cycle run" in body


def test_the_soak_counts_down_in_words_and_in_markup(technician, wrench_and_job):
    wrench, job = wrench_and_job
    through_install(job, technician=technician, wrench=wrench)
    soak = ShopProfile.load().soak_minutes
    log_soaked_run(job, technician, minutes_ago=0)
    body = _page(_client(technician), job)
    ends = Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE).job.heat_cycle_runs.get().ended_at
    until = (ends + datetime.timedelta(minutes=soak)).isoformat()
    assert f'<time data-countdown-until="{until}" datetime="{until}">' in body
    hours, minutes = divmod(soak, 60)
    left = f"{hours} h {minutes} min left" if hours else f"{minutes} min left"
    assert left in body
    assert "js/countdown.js" in body
    assert "Carry on with the retorque" in body
    assert "0 of 4 terminations read, 0 out of tolerance, 0 found loose" in body


def test_after_the_soak_no_countdown_is_loaded(technician, wrench_and_job):
    wrench, job = wrench_and_job
    through_install(job, technician=technician, wrench=wrench)
    log_soaked_run(job, technician)
    body = _page(_client(technician), job)
    assert "data-countdown-until" not in body and "countdown.js" not in body
    assert "Soak over" in body


def test_sign_offs_say_who_role_meaning_and_whether_unchanged(technician, wrench_and_job):
    wrench, job = wrench_and_job
    through_install(job, technician=technician, wrench=wrench)
    client = _client(technician)
    body = _page(client, job)
    assert "installed and torqued" in body
    assert "Test Technician · Technician" in body
    assert "✓</span> unchanged since signing" in body
    assert "✖</span> changed since signing" not in body
    # A reading added to the signed stage changes what the signature covers.
    install = Stage.objects.get(job=job, kind=Stage.Kind.FIRST_INSTALL)
    termination = job.circuits.get().terminations.order_by("pk").first()
    install.state = Stage.State.OPEN  # as a lead's send-back would leave it, for the reading
    install.save()
    read(termination, install, "11", technician=technician, wrench=wrench)
    install.state = Stage.State.SIGNED
    install.save()
    body = _page(client, job)
    assert "✖</span> changed since signing" in body


def test_an_approved_job_says_locked_hides_writes_and_offers_the_lead_reopen(
    technician, lead, wrench_and_job
):
    wrench, job = wrench_and_job
    job.lead = lead
    job.save()
    approved(job, technician=technician, lead=lead, wrench=wrench)
    body = _page(_client(technician), job)
    assert "Approved, locked" in body and "a lead must reopen it first" in body
    assert "Add circuit" not in body and "Edit job" not in body
    assert f'href="{reverse("handover_receipt", args=[job.number])}"' in body
    assert reverse("job_reopen", args=[job.number]) not in body
    lead_body = _page(_client(lead), job)
    assert reverse("job_reopen", args=[job.number]) in lead_body
    assert "Edit job" not in lead_body
    assert "reviewed and approved" in lead_body
    job_reopen(job=job, lead=lead, reason="Owner asked for one more socket in the galley.")
    lead_body = _page(_client(lead), job)
    assert "Approved, locked" not in lead_body and "Edit job" in lead_body
    assert f'href="{reverse("job_review", args=[job.number])}"' in lead_body


def test_awaiting_approval_the_lead_is_sent_to_the_review(technician, lead, wrench_and_job):
    from tests.inspections.factories import through_retorque

    wrench, job = wrench_and_job
    through_install(job, technician=technician, wrench=wrench)
    through_retorque(job, technician=technician, wrench=wrench)
    assert "Review and approve" in _page(_client(lead), job)
    body = _page(_client(technician), job)
    assert "Waiting for a lead to review and approve the job." in body
    assert "carry-on" not in body


def test_the_findings_summary_counts_and_links(technician_client):
    from tests.circuits.factories import make_battery_bank

    job = make_job()
    make_battery_bank(job)
    body = _page(technician_client, job)
    assert 'class="summary-counts"' in body
    assert reverse("circuit_schedule", args=[job.number]) in body
    assert reverse("job_diagram_svg", args=[job.number]) in body
    assert "supports, and never replaces" in body


def test_a_job_without_stages_says_so_instead_of_failing(technician_client):
    job = make_job()
    Stage.objects.filter(job=job).delete()
    body = _page(technician_client, job)
    assert "no stages yet" in body


@pytest.fixture
def wrench_and_job(technician):
    job = make_job()
    job.technicians.add(technician)
    make_spec_circuit(job)
    return make_wrench(), job


def test_a_lead_not_on_the_job_still_writes_it(lead):
    other = make_user(roles.LEAD)
    job = make_job(lead=lead)
    assert "Carry on with the first install" in _page(_client(other), job)


def test_the_record_is_reached_from_the_job_page(technician, lead, office_client):
    job = make_job(lead=lead)
    job.technicians.add(technician)
    make_spec_circuit(job)
    open_page = _page(_client(technician), job)
    assert reverse("record_preview", args=[job.number]) in open_page  # a draft until approved
    assert reverse("stage_sheet", args=[job.number, Stage.Kind.FIRST_INSTALL]) in open_page
    assert reverse("owner_links", args=[job.number]) not in open_page  # the office's
    assert reverse("owner_links", args=[job.number]) in _page(office_client, job)
    approved(job, technician=technician, lead=lead, wrench=make_wrench())
    locked_page = _page(_client(technician), job)
    assert reverse("revision_list", args=[job.number]) in locked_page
    assert reverse("record_preview", args=[job.number]) not in locked_page
