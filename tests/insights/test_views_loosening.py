"""The loosening page: leads and office, the figures, the CSV, the period's bad input and
the shop-rule button (leads only)."""

from __future__ import annotations

import csv
import io

import pytest
from django.urls import reverse

from tests.insights.data import build

pytestmark = pytest.mark.django_db
URL = reverse("insights_loosening")


def test_anonymous_is_sent_to_sign_in(anon_client):
    response = anon_client.get(URL)
    assert response.status_code == 302 and "/login/" in response["Location"]


def test_technicians_may_not_see_it(technician_client):
    assert technician_client.get(URL).status_code == 403


@pytest.mark.parametrize("who", ["lead_client", "office_client"])
def test_leads_and_office_see_the_figures_worst_first(who, request):
    build()
    response = request.getfixturevalue(who).get(URL)
    assert response.status_code == 200
    page = response.content.decode()
    assert "4</strong> retorqued connections" in page
    kinds = response.context["sections"][0]
    assert [r["key"] for r in kinds["rows"]] == ["set_screw", "lug"]  # 2/2 before 0/2
    assert "<svg" in page and "<title" in page and "<desc" in page
    assert "never replaces" in page  # the caution


def test_only_leads_get_the_shop_rule_button(lead_client, office_client):
    build()
    assert "Make a shop rule" in lead_client.get(URL).content.decode()
    assert "Make a shop rule" not in office_client.get(URL).content.decode()


def test_csv_holds_the_table(lead_client):
    build()
    response = lead_client.get(URL, {"format": "csv"})
    assert response["Content-Type"].startswith("text/csv")
    assert "attachment" in response["Content-Disposition"]
    rows = list(csv.reader(io.StringIO(response.content.decode())))
    assert rows[0][:4] == ["breakdown", "group", "retorqued", "found loose"]
    set_screw = next(r for r in rows if r[1] == "Set-screw")
    # 2 of 2 found loose; Wilson 95 % for 2/2 is 34.2 % to 100 % (Newcombe 1998 method 3,
    # computed with the same formula as test_stats: from memory for the table value).
    assert set_screw[2:5] == ["2", "2", "100.0"]
    assert float(set_screw[5]) == pytest.approx(34.24, abs=0.01)
    assert set_screw[7:9] == ["-1.0", "-10.0"]


@pytest.mark.parametrize(
    ("query", "field", "message"),
    [
        ({"start": "31/31/2025"}, "start", "Give the first day as a date"),
        ({"start": "2025-06-01", "end": "2025-01-01"}, "end", "comes before the first"),
        ({"start": "1990-01-01", "end": "2025-01-01"}, "start", "Start on or after"),
        ({"start": "2001-01-01", "end": "2025-01-01"}, "start", "at most ten years"),
        ({"end": "x" * 5000}, "end", "Give the last day as a date"),
    ],
)
def test_a_wrong_period_says_what_is_wrong_beside_the_field(lead_client, query, field, message):
    response = lead_client.get(URL, query)
    assert response.status_code == 200
    form = response.context["form"]
    assert message in " ".join(form.errors[field])
    assert response.context["sections"] == []
    # The CSV is not served for a wrong period either: the page says why instead.
    assert lead_client.get(URL, {**query, "format": "csv"})["Content-Type"].startswith("text/html")


def test_period_filter_leaves_out_readings_outside_it(lead_client):
    build()
    response = lead_client.get(URL, {"start": "2001-01-01", "end": "2001-12-31"})
    assert response.context["total"] == 0
    assert "No retorque readings in this period" in response.content.decode()
