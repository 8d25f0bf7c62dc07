"""The technicians page: leads only (office and technicians 403), figures and CSV."""

from __future__ import annotations

import csv
import io

import pytest
from django.urls import reverse

from tests.insights.data import build

pytestmark = pytest.mark.django_db
URL = reverse("insights_technicians")


def test_anonymous_is_sent_to_sign_in(anon_client):
    assert "/login/" in anon_client.get(URL)["Location"]


@pytest.mark.parametrize("who", ["technician_client", "office_client"])
def test_technicians_and_office_may_not_see_it(who, request):
    assert request.getfixturevalue(who).get(URL).status_code == 403
    assert request.getfixturevalue(who).get(URL, {"format": "csv"}).status_code == 403


def test_leads_see_each_technician(lead_client):
    build()
    response = lead_client.get(URL)
    assert response.status_code == 200
    page = response.content.decode()
    assert "Ira Installer" in page and "Cam Checker" in page
    assert "3 of 4 (75.0 %)" in page  # installer's first readings within tolerance
    assert "2 of 4 (50.0 %)" in page  # installed, found loose at retorque


def test_csv_download(lead_client):
    build()
    rows = list(csv.reader(io.StringIO(lead_client.get(URL, {"format": "csv"}).content.decode())))
    installer = next(r for r in rows if r[0] == "Ira Installer")
    # 3 of 4 within: Wilson 95 % 30.1 % to 95.4 % (same formula as test_stats).
    assert installer[1:4] == ["4", "3", "75.0"]
    assert float(installer[4]) == pytest.approx(30.06, abs=0.01)
    assert installer[6:9] == ["4", "2", "50.0"]
