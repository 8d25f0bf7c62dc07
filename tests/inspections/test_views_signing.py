"""The signing pages: a stage is signed by its technician (or a lead) with their own
password and a drawn signature once nothing blocks it; a lead sends a stage back with a
note, approves with password and signature (which locks the job) and reopens with a
reason; the owner signs for receipt after approval. Every refusal shows why and saves
nothing."""

from __future__ import annotations

import pytest
from django.urls import reverse

from inspections.models import AuditEvent, SignOff, Stage
from inspections.services import job_is_locked
from shop import roles
from shop.models import Job
from tests.factories import make_user
from tests.inspections.factories import (
    PASSWORD,
    approved,
    latest_stage,
    mark_all,
    read_all,
    signature,
    through_install,
    through_retorque,
)

pytestmark = pytest.mark.django_db

INSTALL = int(Stage.Kind.FIRST_INSTALL)


@pytest.fixture
def on_job(job, technician, circuit):
    """The technician assigned to a job with one circuit (four terminations)."""
    job.technicians.add(technician)
    return job


def sign_url(job, kind=INSTALL) -> str:
    return reverse("stage_sign", args=[job.number, kind])


def ready(job, technician, wrench) -> Stage:
    install = latest_stage(job, INSTALL)
    read_all(install, technician=technician, wrench=wrench)
    mark_all(install, by=technician)
    return install


def text(response) -> str:
    return response.content.decode()


# ---- who may open each page -------------------------------------------------------------


@pytest.mark.parametrize(
    "name, kind",
    [
        ("stage_sign", INSTALL),
        ("stage_send_back", INSTALL),
        ("job_approve", None),
        ("job_reopen", None),
        ("handover_receipt", None),
    ],
)
def test_anonymous_visitors_are_sent_to_sign_in(anon_client, job, name, kind):
    args = [job.number] if kind is None else [job.number, kind]
    for response in (
        anon_client.get(reverse(name, args=args)),
        anon_client.post(reverse(name, args=args)),
    ):
        assert response.status_code == 302
        assert response["Location"].startswith(reverse("login"))


@pytest.mark.parametrize("name", ["stage_send_back", "job_approve", "job_reopen"])
def test_a_technician_cannot_send_back_approve_or_reopen(technician_client, on_job, name):
    args = [on_job.number, INSTALL] if name == "stage_send_back" else [on_job.number]
    assert technician_client.get(reverse(name, args=args)).status_code == 403
    assert technician_client.post(reverse(name, args=args), {"note": "x" * 20}).status_code == 403


# ---- signing a stage --------------------------------------------------------------------


def test_the_sign_page_shows_the_meaning_and_what_still_blocks(technician_client, on_job):
    response = technician_client.get(sign_url(on_job))
    assert response.status_code == 200
    page = text(response)
    assert "Installed and torqued" in page  # SignOff.MEANINGS, shown above the pad
    assert "4 terminations not read yet at first install" in page
    assert "things still block signing" in page
    assert 'name="signature"' in page and "data-signature-pad" in page
    assert 'type="password"' in page
    # Without JavaScript the page says the pad needs it.
    assert "needs JavaScript" in page


def test_a_stage_ready_to_sign_says_nothing_blocks(technician_client, on_job, technician, wrench):
    ready(on_job, technician, wrench)
    page = text(technician_client.get(sign_url(on_job)))
    assert "Nothing blocks signing" in page


def test_the_technician_signs_with_their_own_password_and_a_drawn_signature(
    technician_client, on_job, technician, wrench
):
    ready(on_job, technician, wrench)
    response = technician_client.post(
        sign_url(on_job), {"password": PASSWORD, "signature": signature()}
    )
    assert response.status_code == 302
    assert response["Location"] == on_job.get_absolute_url()
    signoff = SignOff.objects.get(job=on_job, kind=SignOff.Kind.FIRST_INSTALL)
    assert signoff.signer == technician
    assert signoff.meaning == "installed and torqued"
    assert latest_stage(on_job, INSTALL).state == Stage.State.SIGNED


def test_a_wrong_password_is_refused_and_nothing_is_saved(
    technician_client, on_job, technician, wrench
):
    ready(on_job, technician, wrench)
    events = AuditEvent.objects.count()
    response = technician_client.post(
        sign_url(on_job), {"password": "not-my-password", "signature": signature()}
    )
    assert response.status_code == 200
    assert "That is not your password" in text(response)
    assert not SignOff.objects.filter(job=on_job).exists()
    assert AuditEvent.objects.count() == events
    assert latest_stage(on_job, INSTALL).state == Stage.State.OPEN


def test_a_missing_signature_is_refused_beside_the_pad(
    technician_client, on_job, technician, wrench
):
    ready(on_job, technician, wrench)
    response = technician_client.post(sign_url(on_job), {"password": PASSWORD, "signature": ""})
    assert response.status_code == 200
    assert 'id="signature_error"' in text(response)
    assert "no signature was drawn" in text(response)
    assert not SignOff.objects.filter(job=on_job).exists()


def test_a_refused_signature_lists_every_blocker_under_the_pad(technician_client, on_job):
    response = technician_client.post(
        sign_url(on_job), {"password": PASSWORD, "signature": signature()}
    )
    page = text(response)
    assert response.status_code == 200
    assert "Not signed:" in page
    assert "4 terminations not read yet at first install" in page
    assert "checklist item" in page  # the circuit's generated items are unmarked
    assert page.index("data-signature-pad") < page.index('id="blockers"')
    assert not SignOff.objects.filter(job=on_job).exists()


def test_an_office_user_cannot_sign_a_technicians_stage(office_client, on_job, technician, wrench):
    ready(on_job, technician, wrench)
    assert office_client.get(sign_url(on_job)).status_code == 403
    response = office_client.post(
        sign_url(on_job), {"password": PASSWORD, "signature": signature()}
    )
    assert response.status_code == 403
    assert not SignOff.objects.filter(job=on_job).exists()


def test_a_technician_not_on_the_job_cannot_sign_it(on_job, technician, wrench, client):
    ready(on_job, technician, wrench)
    stranger = make_user(roles.TECHNICIAN)
    client.force_login(stranger)
    assert client.get(sign_url(on_job)).status_code == 403
    response = client.post(sign_url(on_job), {"password": PASSWORD, "signature": signature()})
    assert response.status_code == 403
    assert not SignOff.objects.filter(job=on_job).exists()


def test_the_heat_cycle_stage_is_signed_by_logging_its_run(technician_client, on_job):
    response = technician_client.get(sign_url(on_job, int(Stage.Kind.HEAT_CYCLE)))
    assert response.status_code == 302
    assert response["Location"] == reverse("heat_cycle_log", args=[on_job.number])


def test_the_handover_is_signed_by_approval_not_on_the_sign_page(technician_client, on_job):
    response = technician_client.get(sign_url(on_job, int(Stage.Kind.HANDOVER)))
    assert response.status_code == 200
    assert "signed by the lead's approval" in text(response)
    refused = technician_client.post(
        sign_url(on_job, int(Stage.Kind.HANDOVER)), {"password": PASSWORD, "signature": signature()}
    )
    assert refused.status_code == 200
    assert not SignOff.objects.filter(job=on_job).exists()


def test_an_unknown_stage_kind_is_not_found(technician_client, on_job):
    assert technician_client.get(sign_url(on_job, 9)).status_code == 404


# ---- sending back -----------------------------------------------------------------------


def test_sending_back_needs_a_note(lead_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    url = reverse("stage_send_back", args=[on_job.number, INSTALL])
    assert lead_client.get(url).status_code == 200
    response = lead_client.post(url, {"note": ""})
    assert response.status_code == 200
    assert 'id="note_error"' in text(response)
    assert latest_stage(on_job, INSTALL).state == Stage.State.SIGNED


def test_a_stage_sent_back_shows_the_leads_note_where_the_technician_signs(
    lead_client, technician_client, on_job, technician, wrench
):
    through_install(on_job, technician=technician, wrench=wrench)
    url = reverse("stage_send_back", args=[on_job.number, INSTALL])
    note = "Re-crimp the lug on the negative at Bus 1; the crimp is cracked."
    response = lead_client.post(url, {"note": note})
    assert response.status_code == 302
    assert latest_stage(on_job, INSTALL).state == Stage.State.SENT_BACK
    page = text(technician_client.get(sign_url(on_job)))
    assert "Sent back by a lead" in page
    assert "Re-crimp the lug on the negative at Bus 1" in page


# ---- approval and reopen ----------------------------------------------------------------


def test_the_approve_page_lists_what_blocks_approval(lead_client, on_job):
    response = lead_client.get(reverse("job_approve", args=[on_job.number]))
    assert response.status_code == 200
    page = text(response)
    assert "Reviewed and approved" in page
    assert "must be signed before approval" in page


def test_approval_with_a_wrong_password_is_refused(lead_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    through_retorque(on_job, technician=technician, wrench=wrench)
    response = lead_client.post(
        reverse("job_approve", args=[on_job.number]),
        {"password": "guess", "signature": signature()},
    )
    assert response.status_code == 200
    assert "That is not your password" in text(response)
    assert not job_is_locked(on_job)
    assert not SignOff.objects.filter(job=on_job, kind=SignOff.Kind.APPROVAL).exists()


def test_the_lead_approves_and_the_job_is_locked(lead_client, on_job, technician, wrench):
    through_install(on_job, technician=technician, wrench=wrench)
    through_retorque(on_job, technician=technician, wrench=wrench)
    response = lead_client.post(
        reverse("job_approve", args=[on_job.number]),
        {"password": PASSWORD, "signature": signature()},
    )
    assert response.status_code == 302
    assert job_is_locked(on_job)
    page = text(lead_client.get(reverse("job_approve", args=[on_job.number])))
    assert "The job is locked" in page


def test_reopening_needs_a_reason(lead_client, on_job, technician, lead, wrench):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    url = reverse("job_reopen", args=[on_job.number])
    response = lead_client.post(url, {"reason": "no"})
    assert response.status_code == 200
    assert 'id="reason_error"' in text(response)
    assert job_is_locked(on_job)


def test_a_reopen_with_a_reason_unlocks_the_job(lead_client, on_job, technician, lead, wrench):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    url = reverse("job_reopen", args=[on_job.number])
    response = lead_client.post(url, {"reason": "Owner asked for a second inverter circuit."})
    assert response.status_code == 302
    assert not job_is_locked(on_job)
    assert AuditEvent.objects.filter(job=on_job, kind=AuditEvent.Kind.REOPEN).exists()


def test_reopen_of_a_job_not_approved_says_there_is_nothing_to_reopen(lead_client, on_job):
    response = lead_client.post(
        reverse("job_reopen", args=[on_job.number]), {"reason": "Just checking this."}
    )
    assert response.status_code == 200
    assert "is not approved; there is nothing to reopen" in text(response)


# ---- the owner's receipt ----------------------------------------------------------------


def test_the_receipt_before_approval_is_refused(technician_client, on_job):
    url = reverse("handover_receipt", args=[on_job.number])
    assert "is not approved yet" in text(technician_client.get(url))
    response = technician_client.post(
        url, {"printed_name": "Robin Example", "signature": signature()}
    )
    assert response.status_code == 200
    assert "is not approved yet" in text(response)
    assert not SignOff.objects.filter(job=on_job, kind=SignOff.Kind.RECEIPT).exists()


def test_the_owner_types_their_name_and_signs_and_the_job_is_handed_over(
    technician_client, on_job, technician, lead, wrench
):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    url = reverse("handover_receipt", args=[on_job.number])
    page = text(technician_client.get(url))
    assert "Received by the owner" in page and 'name="printed_name"' in page
    missing = technician_client.post(url, {"printed_name": "", "signature": signature()})
    assert 'id="printed_name_error"' in text(missing)
    response = technician_client.post(
        url, {"printed_name": "Robin Example", "signature": signature()}
    )
    assert response.status_code == 302
    receipt = SignOff.objects.get(job=on_job, kind=SignOff.Kind.RECEIPT)
    assert receipt.printed_name == "Robin Example" and receipt.signer is None
    assert Job.objects.get(pk=on_job.pk).status == Job.Status.HANDED_OVER


def test_a_staff_member_not_on_the_job_cannot_take_the_receipt(
    on_job, technician, lead, wrench, client
):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    client.force_login(make_user(roles.TECHNICIAN))
    url = reverse("handover_receipt", args=[on_job.number])
    assert client.get(url).status_code == 403
    assert (
        client.post(url, {"printed_name": "Robin Example", "signature": signature()}).status_code
        == 403
    )
    assert not SignOff.objects.filter(job=on_job, kind=SignOff.Kind.RECEIPT).exists()


# ---- careless and hostile input ---------------------------------------------------------

HOSTILE = [
    "",
    "\x00",
    "Robin\x00Example",
    "x" * 10_000,
    '<script>alert("x")</script>',
    "data:image/png;base64,",
    "data:image/png;base64,!!!!",
    "data:image/png;base64," + "A" * 800_000,
    "data:image/gif;base64,R0lGODlhAQABAAAAACw=",
]


@pytest.mark.parametrize("value", HOSTILE)
def test_hostile_input_is_refused_with_a_message_never_a_server_error(
    lead_client, on_job, technician, lead, wrench, value
):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    signoffs = SignOff.objects.count()
    events = AuditEvent.objects.count()
    posts = [
        (
            reverse("handover_receipt", args=[on_job.number]),
            {"printed_name": value, "signature": value},
        ),
        (reverse("job_approve", args=[on_job.number]), {"password": value, "signature": value}),
        (sign_url(on_job), {"password": value, "signature": value}),
        (reverse("stage_send_back", args=[on_job.number, INSTALL]), {"note": value}),
    ]
    for url, data in posts:
        response = lead_client.post(url, data)
        assert response.status_code == 200, (url, response.status_code)
        assert "<script>alert" not in text(response)
    assert SignOff.objects.count() == signoffs
    assert AuditEvent.objects.count() == events


def test_a_name_with_a_nul_character_is_refused_beside_the_field(
    technician_client, on_job, technician, lead, wrench
):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    response = technician_client.post(
        reverse("handover_receipt", args=[on_job.number]),
        {"printed_name": "Robin\x00Example", "signature": signature()},
    )
    assert response.status_code == 200
    assert 'id="printed_name_error"' in text(response)
    assert "Null characters are not allowed" in text(response)
    assert not SignOff.objects.filter(job=on_job, kind=SignOff.Kind.RECEIPT).exists()


@pytest.mark.parametrize("reason", ["\x00", "Owner asked\x00 for more", "short"])
def test_a_reopen_reason_that_cannot_be_stored_is_refused(
    lead_client, on_job, technician, lead, wrench, reason
):
    approved(on_job, technician=technician, lead=lead, wrench=wrench)
    response = lead_client.post(reverse("job_reopen", args=[on_job.number]), {"reason": reason})
    assert response.status_code == 200
    assert 'id="reason_error"' in text(response)
    assert job_is_locked(on_job)
