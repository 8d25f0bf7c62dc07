"""Circuit tags sort naturally everywhere a list of circuits is shown or written: D-2
before D-10 (common practice: people number runs, they do not spell them)."""

from __future__ import annotations

import csv
import io

import pytest
from django.urls import reverse

from circuits.tags import tag_key
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = pytest.mark.django_db

TAGS = ["D-10", "D-2", "D-1", "M-01", "d-3", "BAT-2A", "BAT-10"]
NATURAL = ["BAT-2A", "BAT-10", "D-1", "D-2", "d-3", "D-10", "M-01"]


def test_the_key_reads_numbers_as_numbers():
    assert sorted(TAGS, key=tag_key) == NATURAL
    assert sorted(["D-02", "D-2", "D-1"], key=tag_key) == ["D-1", "D-02", "D-2"]  # ties fixed


@pytest.fixture
def job(db):
    job = make_job()
    a, b = make_device(job, name="Bus A"), make_device(job, name="Bus B")
    for tag in TAGS:
        make_circuit(job, a, b, tag=tag)
    return job


def _in_order(text: str, tags: list[str]) -> bool:
    positions = [text.index(f">{tag}<") if f">{tag}<" in text else text.index(tag) for tag in tags]
    return positions == sorted(positions)


def test_the_schedule_lists_circuits_in_natural_order(job, lead_client):
    page = lead_client.get(reverse("circuit_schedule", args=[job.number])).content.decode()
    assert _in_order(page, NATURAL)


def test_the_csv_export_writes_circuits_in_natural_order(job, lead_client):
    response = lead_client.get(reverse("circuit_csv_export", args=[job.number]))
    body = b"".join(response.streaming_content) if response.streaming else response.content
    rows = list(csv.DictReader(io.StringIO(body.decode("utf-8-sig"))))
    assert [row["tag"] for row in rows] == NATURAL


def test_the_labels_come_in_natural_order(job, lead_client):
    page = lead_client.get(reverse("circuit_labels", args=[job.number])).content.decode()
    assert _in_order(page, NATURAL)


def test_the_record_lists_circuits_in_natural_order(job):
    from wiring.render import record_data

    assert [c["tag"] for c in record_data(job)["circuits"]] == NATURAL
