"""The wrenches page: leads and office; spread, corrections, calibration, CSV."""

from __future__ import annotations

import csv
import io

import pytest
from django.urls import reverse

from tests.insights.data import build

pytestmark = pytest.mark.django_db
URL = reverse("insights_wrenches")


def test_anonymous_is_sent_to_sign_in(anon_client):
    assert "/login/" in anon_client.get(URL)["Location"]


def test_technicians_may_not_see_it(technician_client):
    assert technician_client.get(URL).status_code == 403


@pytest.mark.parametrize("who", ["lead_client", "office_client"])
def test_leads_and_office_see_each_wrench(who, request):
    build()
    response = request.getfixturevalue(who).get(URL)
    assert response.status_code == 200
    page = response.content.decode()
    assert "TW-A" in page and "TW-B" in page
    assert "1 of 5" in page  # wrench A: one of its five readings corrected
    assert "-5.0 % (-15.0 to 0.0 %)" in page  # wrench B's median and quartiles
    assert "Drift check" in page


def test_csv_download(office_client):
    build()
    response = office_client.get(URL, {"format": "csv"})
    rows = list(csv.reader(io.StringIO(response.content.decode())))
    b = next(r for r in rows if r[0] == "TW-B")
    assert b[3:8] == ["5", "5", "-5.0", "-15.0", "0.0"]


def test_a_wrong_period_is_explained(lead_client):
    response = lead_client.get(URL, {"start": "2025-13-01"})
    assert response.status_code == 200
    assert "Give the first day as a date" in response.content.decode()
