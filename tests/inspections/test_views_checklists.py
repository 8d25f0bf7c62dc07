"""A stage's checklist: the items grouped by circuit and the shop's own, each marked pass,
fail or not applicable with three big buttons; a fail or not applicable needs a note;
htmx swaps only the item, without JavaScript the post comes back to the item's anchor;
a double submit is stored once."""

from __future__ import annotations

import io
import re

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.test import Client
from django.urls import reverse

from inspections.models import ChecklistMark, ShopChecklistItem, Stage
from inspections.services import checklist_items_for
from inspections.views.checklists import item_anchor
from shop import roles
from tests.factories import make_user
from tests.inspections.factories import latest_stage, log_soaked_run, signature_png

pytestmark = pytest.mark.django_db

INSTALL = int(Stage.Kind.FIRST_INSTALL)
RETORQUE = int(Stage.Kind.RETORQUE)


def text(response) -> str:
    return response.content.decode()


@pytest.fixture
def on_job(job, technician, circuit, stages):
    job.technicians.add(technician)
    return job


@pytest.fixture
def shop_item(db):
    return ShopChecklistItem.objects.create(
        stage_kind=INSTALL, text="Battery box vent clear", order=10
    )


def list_url(job, kind=INSTALL) -> str:
    return reverse("stage_checklist", args=[job.number, kind])


def mark_url(job, kind=INSTALL) -> str:
    return reverse("checklist_mark", args=[job.number, kind])


def hand_items(job, kind=INSTALL):
    return [i for i in checklist_items_for(stage=latest_stage(job, kind)) if not i.derived]


def item_with(job, kind_of_check: str):
    return next(i for i in hand_items(job) if i.kind == kind_of_check)


def mark(client, job, item_key, result, note="", key="key-1", kind=INSTALL, **extra):
    data = {"item_key": item_key, "result": result, "note": note, "client_key": key, **extra}
    return client.post(mark_url(job, kind), data, **extra.pop("headers", {}))


# ---- who may open and mark ----------------------------------------------------------------


def test_anonymous_visitors_are_sent_to_sign_in(anon_client, job, stages):
    for response in (anon_client.get(list_url(job)), anon_client.post(mark_url(job))):
        assert response.status_code == 302
        assert response["Location"].startswith(reverse("login"))


def test_the_office_reads_the_checklist_but_marks_nothing(office_client, on_job):
    page = office_client.get(list_url(on_job))
    assert page.status_code == 200
    assert 'name="result"' not in text(page)
    labels = item_with(on_job, "labels")
    assert mark(office_client, on_job, labels.key, "pass").status_code == 403
    assert not ChecklistMark.objects.exists()


def test_a_technician_not_on_the_job_marks_nothing(on_job):
    client = Client()
    client.force_login(make_user(roles.TECHNICIAN))
    page = client.get(list_url(on_job))
    assert page.status_code == 200
    assert "marked by the people assigned to this job" in text(page)
    assert mark(client, on_job, item_with(on_job, "labels").key, "pass").status_code == 403
    assert not ChecklistMark.objects.exists()


@pytest.mark.parametrize("kind", [0, 5, 9, 99])
def test_an_unknown_stage_kind_is_not_found(technician_client, on_job, kind):
    assert technician_client.get(list_url(on_job, kind)).status_code == 404
    assert technician_client.post(mark_url(on_job, kind), {}).status_code == 404


def test_an_unknown_job_is_not_found(technician_client, on_job):
    assert technician_client.get(list_url(type(on_job)(number="NO-SUCH-JOB"))).status_code == 404


def test_marking_is_post_only(technician_client, on_job):
    assert technician_client.get(mark_url(on_job)).status_code == 405


# ---- the list ---------------------------------------------------------------------------


def test_the_items_are_grouped_by_circuit_then_the_shops_own(
    technician_client, on_job, circuit, shop_item
):
    page = text(technician_client.get(list_url(on_job)))
    assert page.index(f'id="circuit-{circuit.pk}"') < page.index('id="shop-items"')
    assert "Battery box vent clear" in page
    # make_spec_circuit: protection, colours, labels, chafe, and the shop's one item.
    assert "0 of 5 marked, 0 fails" in page
    assert "Torque: 0 of 4 read, 0 out of tolerance" in page
    # Three big buttons per hand-marked item, each with its own fresh key.
    assert page.count('name="result" value="fail"') == 5
    keys = re.findall(r'name="client_key" value="([^"]+)"', page)
    assert len(keys) == len(set(keys)) == 5
    assert "never replaces" in page


def test_a_pass_without_javascript_comes_back_to_the_item(technician_client, on_job):
    labels = item_with(on_job, "labels")
    response = mark(technician_client, on_job, labels.key, "pass")
    assert response.status_code == 302
    assert response["Location"] == f"{list_url(on_job)}#{item_anchor(labels.key)}"
    stored = ChecklistMark.objects.get()
    assert (stored.item_key, stored.result) == (labels.key, "pass")
    page = text(technician_client.get(list_url(on_job)))
    assert "1 of 4 marked, 0 fails" in page


def test_a_fail_without_a_note_is_refused_beside_the_item(technician_client, on_job):
    chafe = item_with(on_job, "chafe")
    response = mark(technician_client, on_job, chafe.key, "fail")
    assert response.status_code == 200
    page = text(response)
    anchor = item_anchor(chafe.key)
    assert f'id="{anchor}-note-error"' in page
    assert "Say in the note why the item fails." in page
    # The choice made is still ticked, so the technician only adds the note.
    item_html = page.split(f'id="{anchor}"', 1)[1].split("</li>", 1)[0]
    assert 'value="fail" checked' in item_html
    assert not ChecklistMark.objects.exists()


def test_not_applicable_needs_a_note_too(technician_client, on_job):
    chafe = item_with(on_job, "chafe")
    page = text(mark(technician_client, on_job, chafe.key, "na", note=""))
    assert "Say in the note why the item does not apply." in page
    assert not ChecklistMark.objects.exists()
    response = mark(technician_client, on_job, chafe.key, "na", note="No bulkheads on this run")
    assert response.status_code == 302
    assert ChecklistMark.objects.get().note == "No bulkheads on this run"


def test_a_fail_with_its_note_is_shown_and_counted(technician_client, on_job):
    labels = item_with(on_job, "labels")
    mark(technician_client, on_job, labels.key, "fail", note="Label missing at the fuse end")
    page = text(technician_client.get(list_url(on_job)))
    assert "1 of 4 marked, 1 fail" in page
    assert "Label missing at the fuse end" in page
    assert "ck-state-fail" in page


def test_with_htmx_only_the_item_and_the_progress_come_back(technician_client, on_job):
    labels = item_with(on_job, "labels")
    response = technician_client.post(
        mark_url(on_job),
        {"item_key": labels.key, "result": "pass", "client_key": "htmx-1"},
        headers={"HX-Request": "true"},
    )
    assert response.status_code == 200
    page = text(response)
    assert page.lstrip().startswith(
        f'<li class="ck-item state-pass" id="{item_anchor(labels.key)}"'
    )
    assert "<html" not in page
    assert 'id="checklist-progress" hx-swap-oob="true"' in page
    assert "1 of 4 marked, 0 fails" in page


def test_with_htmx_a_refusal_is_swapped_into_the_item(technician_client, on_job):
    labels = item_with(on_job, "labels")
    response = technician_client.post(
        mark_url(on_job),
        {"item_key": labels.key, "result": "fail", "client_key": "htmx-2"},
        headers={"HX-Request": "true"},
    )
    assert response.status_code == 200
    assert "Say in the note why the item fails." in text(response)
    assert "<html" not in text(response)
    assert not ChecklistMark.objects.exists()


def test_a_double_submit_is_stored_once(technician_client, on_job):
    labels = item_with(on_job, "labels")
    for _ in range(2):
        assert mark(technician_client, on_job, labels.key, "pass", key="same").status_code == 302
    assert ChecklistMark.objects.count() == 1


def test_no_result_chosen_is_refused(technician_client, on_job):
    labels = item_with(on_job, "labels")
    page = text(mark(technician_client, on_job, labels.key, ""))
    assert f'id="{item_anchor(labels.key)}-result-error"' in page
    assert "Mark the item pass, fail or not applicable." in page
    assert not ChecklistMark.objects.exists()


def test_an_empty_post_saves_nothing_and_says_why(technician_client, on_job):
    response = technician_client.post(mark_url(on_job), {})
    assert response.status_code == 200
    assert "no valid key from the page" in text(response)
    assert not ChecklistMark.objects.exists()


def test_a_torque_item_cannot_be_ticked_by_hand(technician_client, on_job, termination):
    response = mark(technician_client, on_job, f"torque:{termination.pk}", "pass")
    assert response.status_code == 200
    assert "Torque items follow the readings" in text(response)
    assert not ChecklistMark.objects.exists()


def test_a_photo_is_kept_with_the_mark(technician_client, on_job, settings, tmp_path):
    settings.MEDIA_ROOT = tmp_path
    labels = item_with(on_job, "labels")
    photo = SimpleUploadedFile("label.png", signature_png(), content_type="image/png")
    response = mark(technician_client, on_job, labels.key, "pass", photo=photo)
    assert response.status_code == 302
    assert ChecklistMark.objects.get().photo.name.endswith(".png")


def test_a_file_that_is_not_an_image_is_refused_beside_the_photo(
    technician_client, on_job, settings, tmp_path
):
    settings.MEDIA_ROOT = tmp_path
    labels = item_with(on_job, "labels")
    fake = SimpleUploadedFile("label.png", io.BytesIO(b"not an image").read())
    page = text(mark(technician_client, on_job, labels.key, "pass", photo=fake))
    assert f'id="{item_anchor(labels.key)}-photo-error"' in page
    assert not ChecklistMark.objects.exists()


# ---- stages that take no marks now -------------------------------------------------------


def test_a_stage_not_started_shows_its_items_without_buttons(technician_client, on_job):
    page = text(technician_client.get(list_url(on_job, RETORQUE)))
    assert "The retorque stage is not started" in page
    assert 'name="result"' not in page


def test_during_the_soak_the_retorque_checklist_counts_down(
    technician_client, on_job, technician, shop_item
):
    ShopChecklistItem.objects.create(stage_kind=RETORQUE, text="Lugs marked with paint", order=1)
    log_soaked_run(on_job, technician, minutes_ago=0)
    page = text(technician_client.get(list_url(on_job, RETORQUE)))
    assert "data-countdown-until" in page
    assert "js/countdown.js" in page
    assert "retorque items are marked after it" in page
    assert 'name="result"' not in page


def test_with_htmx_an_item_that_is_gone_says_so_in_its_place(technician_client, on_job):
    response = technician_client.post(
        mark_url(on_job),
        {"item_key": "circuit:999999:labels", "result": "pass", "client_key": "htmx-3"},
        headers={"HX-Request": "true"},
    )
    assert response.status_code == 200
    assert "no such item" in text(response)
    assert "<html" not in text(response)
    assert not ChecklistMark.objects.exists()
