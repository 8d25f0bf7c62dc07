"""The admin shows the evidence and offers no way to add, change or delete it, not even to
a superuser; torque wrenches are kept there."""

from __future__ import annotations

import pytest
from django.test import Client
from django.urls import reverse

from inspections.models import ShopChecklistItem, TorqueRecord, TorqueWrench
from tests.factories import make_user
from tests.inspections.factories import make_spec_circuit, read, through_install

pytestmark = pytest.mark.django_db


@pytest.fixture
def superuser_client():
    client = Client()
    client.force_login(make_user(is_superuser=True, is_staff=True))
    return client


@pytest.fixture
def record(install, termination, wrench, technician):
    return read(termination, install, "10", technician=technician, wrench=wrench)


@pytest.mark.parametrize(
    "model",
    [
        "torquerecord",
        "thermalreading",
        "auditevent",
        "stage",
        "heatcyclerun",
        "thermalwaiver",
        "checklistmark",
        "signoff",
    ],
)
def test_the_admin_offers_no_add_for_evidence_and_stages(superuser_client, model):
    assert superuser_client.get(reverse(f"admin:inspections_{model}_changelist")).status_code == 200
    assert superuser_client.get(reverse(f"admin:inspections_{model}_add")).status_code == 403


def test_a_superuser_can_view_a_torque_record_but_not_change_or_delete_it(superuser_client, record):
    change = reverse("admin:inspections_torquerecord_change", args=[record.pk])
    assert superuser_client.get(change).status_code == 200
    assert superuser_client.post(change, {"note": "edited"}).status_code == 403
    delete = reverse("admin:inspections_torquerecord_delete", args=[record.pk])
    assert superuser_client.post(delete, {"post": "yes"}).status_code == 403
    assert TorqueRecord.objects.get(pk=record.pk).note == ""


def test_bulk_delete_of_torque_records_is_not_offered(superuser_client, record):
    response = superuser_client.post(
        reverse("admin:inspections_torquerecord_changelist"),
        {"action": "delete_selected", "_selected_action": [record.pk], "post": "yes"},
    )
    assert response.status_code in (200, 302)
    assert TorqueRecord.objects.filter(pk=record.pk).exists()


def test_wrenches_are_edited_in_the_admin_by_a_superuser_and_the_office(
    superuser_client, office_client
):
    add = reverse("admin:inspections_torquewrench_add")
    assert superuser_client.get(add).status_code == 200
    assert office_client.get(add).status_code == 200
    response = superuser_client.post(
        add,
        {
            "code": "TW-09",
            "description": "Small click wrench",
            "range_min": "1",
            "range_max": "12",
            "unit": "N*m",
            "calibration_due": "2030-01-31",
            "in_service": "on",
        },
    )
    assert response.status_code == 302
    assert TorqueWrench.objects.get(code="TW-09").range_max == 12


def test_a_superuser_views_a_signoff_but_cannot_change_it(
    superuser_client, job, wrench, technician
):

    make_spec_circuit(job)
    signoff = through_install(job, technician=technician, wrench=wrench)
    change = reverse("admin:inspections_signoff_change", args=[signoff.pk])
    assert superuser_client.get(change).status_code == 200
    assert superuser_client.post(change, {"meaning": "edited"}).status_code == 403


def test_the_office_keeps_the_shops_checklist_in_the_admin(office_client, technician_client):
    add = reverse("admin:inspections_shopchecklistitem_add")
    response = office_client.post(
        add, {"stage_kind": "1", "text": "Battery box vent clear", "order": "10", "active": "on"}
    )
    assert response.status_code == 302
    assert ShopChecklistItem.objects.get().text == "Battery box vent clear"
    assert technician_client.get(add).status_code in (302, 403)
