"""The drawing pages: the diagram as an SVG file, the label sheet, CSV export and import,
and the diagram region of the job page, each as anonymous, wrong role and right role."""

from __future__ import annotations

import xml.etree.ElementTree as ET

import pytest
from django.core.files.uploadedfile import SimpleUploadedFile
from django.test import Client
from django.urls import reverse

from circuits.csv_io import circuits_to_csv
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job, make_user

pytestmark = pytest.mark.django_db

VIEWS = ["job_diagram_svg", "circuit_labels", "circuit_csv_export", "circuit_csv_import"]


@pytest.fixture
def job(technician):
    job = make_job(technicians=[technician])
    battery = make_device(job, name="House battery", kind="battery")
    panel = make_device(job, name="DC panel", kind="dc_panel")
    lamp = make_device(job, name="Lamp", kind="load")
    make_circuit(job, battery, panel, tag="M-01", conductor_size="4 AWG", design_current_a=60,
                 protection_a=80)  # fmt: skip
    make_circuit(job, panel, lamp, tag="D-01")
    return job


@pytest.fixture
def no_role_client() -> Client:
    client = Client()
    client.force_login(make_user())
    return client


def _url(name: str, job) -> str:
    return reverse(name, args=[job.number])


@pytest.mark.parametrize("name", VIEWS)
def test_anonymous_is_sent_to_sign_in(anon_client, job, name):
    response = anon_client.get(_url(name, job))
    assert response.status_code == 302
    assert "/login/" in response["Location"]


@pytest.mark.parametrize("name", VIEWS)
def test_a_user_without_a_role_is_refused(no_role_client, job, name):
    assert no_role_client.get(_url(name, job)).status_code == 403


def test_a_user_without_a_role_cannot_post_an_import(no_role_client, job):
    upload = SimpleUploadedFile("c.csv", circuits_to_csv(job).encode(), "text/csv")
    response = no_role_client.post(_url("circuit_csv_import", job), {"file": upload})
    assert response.status_code == 403


@pytest.mark.parametrize("client_name", ["technician_client", "lead_client", "office_client"])
@pytest.mark.parametrize("name", VIEWS)
def test_every_staff_role_opens_the_drawings(request, job, name, client_name):
    client = request.getfixturevalue(client_name)
    assert client.get(_url(name, job)).status_code == 200


def test_an_unknown_job_is_not_found(technician_client):
    for name in VIEWS:
        assert technician_client.get(reverse(name, args=["NO-SUCH-JOB"])).status_code == 404


def test_the_diagram_is_served_as_a_standalone_svg_with_absolute_links(technician_client, job):
    response = technician_client.get(_url("job_diagram_svg", job))
    assert response["Content-Type"] == "image/svg+xml"
    assert response["Content-Disposition"] == f'inline; filename="{job.number}-one-line.svg"'
    assert response.content.startswith(b'<?xml version="1.0" encoding="UTF-8"?>')
    root = ET.fromstring(response.content)
    hrefs = [a.get("href") for a in root.iter("{http://www.w3.org/2000/svg}a")]
    circuit = job.circuits.get(tag="D-01")
    assert "http://testserver" + circuit.get_absolute_url() in hrefs


def test_the_schedule_downloads_as_csv(technician_client, job):
    response = technician_client.get(_url("circuit_csv_export", job))
    assert response["Content-Type"] == "text/csv; charset=utf-8"
    assert response["Content-Disposition"] == f'attachment; filename="{job.number}-circuits.csv"'
    text = response.content.decode("utf-8")
    assert text.startswith("\ufefftag,name,role,")  # the mark spreadsheets need for UTF-8
    assert text.lstrip("\ufeff") == circuits_to_csv(job)


def test_the_labels_are_an_html_page(technician_client, job):
    response = technician_client.get(_url("circuit_labels", job))
    assert response["Content-Type"].startswith("text/html")
    assert response.content.count(b'class="wire-label"') == 4


def test_an_upload_with_bad_rows_lists_them_and_saves_nothing(technician_client, job):
    text = circuits_to_csv(job).replace("House battery", "Starter battery")
    upload = SimpleUploadedFile("c.csv", text.encode(), "text/csv")
    response = technician_client.post(_url("circuit_csv_import", job), {"file": upload})
    assert response.status_code == 200
    page = response.content.decode()
    assert "Nothing was imported" in page
    assert "no device named &#x27;Starter battery&#x27;" in page
    assert job.circuits.get(tag="M-01").from_device.name == "House battery"


def test_a_good_upload_shows_a_summary(lead_client, job):
    # Updating existing circuits by import is a lead's (tests/circuits/test_views_csv_io.py).
    text = circuits_to_csv(job).replace("Circuit D-01", "Reading lamp")
    upload = SimpleUploadedFile("c.csv", text.encode(), "text/csv")
    response = lead_client.post(_url("circuit_csv_import", job), {"file": upload})
    page = response.content.decode()
    assert "Imported 2 circuits" in page and "2 updated: D-01, M-01" in page
    assert job.circuits.get(tag="D-01").name == "Reading lamp"


def test_an_upload_in_the_wrong_encoding_is_refused_beside_the_field(technician_client, job):
    text = circuits_to_csv(job).replace("Lamp", "Lämp")
    upload = SimpleUploadedFile("c.csv", text.encode("cp1252"), "text/csv")
    response = technician_client.post(_url("circuit_csv_import", job), {"file": upload})
    assert response.status_code == 200
    assert response.context["form"].errors["file"][0].startswith("The file is not UTF-8")
    assert b'class="field-error"' in response.content


def test_htmx_gets_only_the_import_region(lead_client, job):
    upload = SimpleUploadedFile("c.csv", circuits_to_csv(job).encode(), "text/csv")
    response = lead_client.post(
        _url("circuit_csv_import", job), {"file": upload}, headers={"HX-Request": "true"}
    )
    page = response.content.decode()
    assert page.lstrip().startswith('<div id="import-region"')
    assert "<html" not in page and "Imported 2 circuits" in page


def test_the_job_page_links_to_the_diagram_instead_of_drawing_it(technician_client, job):
    # The job page stays short on a tablet: the diagram is a page of its own.
    page = technician_client.get(job.get_absolute_url()).content.decode()
    assert _url("job_diagram_svg", job) in page
    assert '<svg xmlns="http://www.w3.org/2000/svg"' not in page


def test_the_job_page_offers_no_diagram_when_there_are_no_devices(technician_client):
    job = make_job()
    page = technician_client.get(job.get_absolute_url()).content.decode()
    assert "No circuits yet, so nothing to check." in page
    assert _url("job_diagram_svg", job) not in page


def test_posting_without_a_file_asks_for_one(technician_client, job):
    response = technician_client.post(_url("circuit_csv_import", job), {})
    assert response.status_code == 200
    assert "file" in response.context["form"].errors
    assert response.context["result"] is None
