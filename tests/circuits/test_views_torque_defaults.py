"""The shop's default torque specs are engineering data: everyone working on systems reads
them, leads edit them; office and technicians only read."""

from __future__ import annotations

from decimal import Decimal

import pytest
from django.test import Client
from django.urls import reverse

from circuits.models import TorqueDefault
from tests.factories import make_user

pytestmark = pytest.mark.django_db


def _spec(**fields) -> TorqueDefault:
    values = {
        "stud_size": "M8",
        "kind": "lug",
        "value": Decimal("10"),
        "unit": "N*m",
        "tolerance_pct": Decimal("10"),
        "source": "Shop table",
    }
    values.update(fields)
    return TorqueDefault.objects.create(**values)


def _post(**fields) -> dict:
    data = {
        "stud_size": "M6",
        "kind": "lug",
        "value": "5",
        "unit": "N*m",
        "tolerance_pct": "10",
        "source": "Shop table",
    }
    data.update(fields)
    return data


def test_anonymous_and_roleless_staff_are_kept_out(anon_client):
    spec = _spec()
    client = Client()
    client.force_login(make_user())
    for url in [
        reverse("torque_defaults"),
        reverse("torque_default_new"),
        reverse("torque_default_edit", args=[spec.pk]),
    ]:
        assert anon_client.get(url).status_code == 302
        assert client.get(url).status_code == 403


def test_technician_reads_the_table_without_edit_links(technician_client):
    spec = _spec()
    body = technician_client.get(reverse("torque_defaults")).content.decode()
    assert "10 N·m ± 10 %" in body
    assert reverse("torque_default_edit", args=[spec.pk]) not in body
    assert reverse("torque_default_new") not in body


@pytest.mark.parametrize("client_name", ["technician_client", "office_client"])
def test_office_and_technicians_read_torque_specs_only(request, client_name):
    client = request.getfixturevalue(client_name)
    spec = _spec()
    assert client.get(reverse("torque_default_new")).status_code == 403
    assert client.post(reverse("torque_default_new"), _post()).status_code == 403
    edit = reverse("torque_default_edit", args=[spec.pk])
    assert client.post(edit, _post(stud_size="M8", value="99")).status_code == 403
    spec.refresh_from_db()
    assert spec.value == Decimal("10")
    assert client.get(reverse("torque_defaults")).status_code == 200
    body = client.get(reverse("torque_defaults")).content.decode()
    assert reverse("torque_default_new") not in body


def test_lead_adds_and_edits_a_default(lead_client):
    response = lead_client.post(reverse("torque_default_new"), _post())
    assert response.status_code == 302
    spec = TorqueDefault.objects.get(stud_size="M6", kind="lug")
    edit = reverse("torque_default_edit", args=[spec.pk])
    assert lead_client.get(edit).status_code == 200
    assert edit in lead_client.get(reverse("torque_defaults")).content.decode()
    lead_client.post(edit, _post(value="6", unit="N*m"))
    spec.refresh_from_db()
    assert spec.value == Decimal("6")


def test_a_second_default_for_the_same_stud_and_kind_is_refused(lead_client):
    _spec(stud_size="M6")
    response = lead_client.post(reverse("torque_default_new"), _post())
    assert response.status_code == 200
    assert "There is already a default for this stud size and kind." in response.content.decode()
    assert TorqueDefault.objects.count() == 1


def test_a_tolerance_out_of_range_is_an_error_beside_it(lead_client):
    response = lead_client.post(reverse("torque_default_new"), _post(tolerance_pct="50"))
    assert 'id="id_tolerance_pct_error"' in response.content.decode()
    assert not TorqueDefault.objects.exists()
