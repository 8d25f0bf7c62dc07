"""Wire-marker labels: one per circuit end, each with the tag, the size in trade notation
(× parallel), the end it marks, and a QR code for that end's label scan page."""

from __future__ import annotations

import re

import pytest
import segno
from django.conf import settings
from django.test.html import Element, parse_html
from django.urls import reverse

from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = pytest.mark.django_db


@pytest.fixture
def job():
    job = make_job()
    battery = make_device(job, name="House battery", kind="battery")
    panel = make_device(job, name="DC panel", kind="dc_panel")
    lamp = make_device(job, name="Lamp & <fan>", kind="load")
    make_circuit(job, battery, panel, tag="M-01", conductor_size="4/0", parallel=2,
                 design_current_a=200, protection_a=250)  # fmt: skip
    make_circuit(job, panel, lamp, tag="D-01", conductor_size="14 AWG", design_current_a=5,
                 protection_a=10)  # fmt: skip
    return job


class _Node:
    """A parsed element with the few look-ups these tests need."""

    def __init__(self, element: Element) -> None:
        self.element = element

    def get(self, name: str) -> str | None:
        return dict(self.element.attributes).get(name)

    def find(self, cls: str) -> list[_Node]:
        found = []
        for child in self.element.children:
            if isinstance(child, Element):
                node = _Node(child)
                if cls in (node.get("class") or "").split() or child.name == cls:
                    found.append(node)
                found += node.find(cls)
        return found

    def text(self) -> str:
        parts = [c if isinstance(c, str) else _Node(c).text() for c in self.element.children]
        return " ".join(p.strip() for p in parts if p.strip())


def _modules(d: str) -> set[tuple[int, int]]:
    """Read back the dark modules of a QR code drawn as one SVG path of horizontal runs
    ("M x y" to start, "h n" for n dark modules, "m dx dy" to move on)."""
    dark: set[tuple[int, int]] = set()
    x = y = 0.0
    for op, args in re.findall(r"([Mmh])\s*([-\d.\s]+)", d):
        numbers = [float(n) for n in args.split()]
        if op == "M":
            x, y = numbers
        elif op == "m":
            x, y = x + numbers[0], y + numbers[1]
        else:
            dark |= {(int(x) + i, int(y)) for i in range(int(numbers[0]))}
            x += numbers[0]
    return dark


def _expected_modules(url: str) -> set[tuple[int, int]]:
    code = segno.make_qr(url, error="m")
    border = 2
    return {
        (col + border, row + border)
        for row, line in enumerate(code.matrix)
        for col, value in enumerate(line)
        if value & 1
    }


def _labels(client, job, **params):
    response = client.get(reverse("circuit_labels", args=[job.number]), params)
    assert response.status_code == 200
    return response, _Node(parse_html(response.content.decode())).find("wire-label")


def test_two_labels_per_circuit_one_for_each_end(technician_client, job):
    _, labels = _labels(technician_client, job)
    ends = [(a.get("data-tag"), a.get("data-end")) for a in labels]
    assert ends == [("D-01", "from"), ("D-01", "to"), ("M-01", "from"), ("M-01", "to")]


def test_each_label_gives_tag_size_and_the_end_it_marks(technician_client, job):
    _, labels = _labels(technician_client, job)
    text = {
        (a.get("data-tag"), a.get("data-end")): (
            a.find("wl-tag")[0].text(),
            a.find("wl-size")[0].text(),
            a.find("wl-end")[0].text(),
        )
        for a in labels
    }
    assert text["M-01", "from"] == ("M-01", "4/0 AWG ×2", "from House battery")
    assert text["M-01", "to"] == ("M-01", "4/0 AWG ×2", "to DC panel")
    assert text["D-01", "to"] == ("D-01", "14 AWG", "to Lamp & <fan>")


def test_each_qr_code_encodes_the_absolute_url_of_its_own_end(technician_client, job):
    _, labels = _labels(technician_client, job)
    for label in labels:
        circuit = job.circuits.get(tag=label.get("data-tag"))
        end = label.get("data-end")
        url = "http://testserver" + reverse("label_scan", args=[circuit.pk, end])
        assert label.get("data-url") == url
        assert label.find("wl-url")[0].text() == url
        # The modules drawn on the label are exactly the code for that URL.
        (path,) = label.find("wl-qr")[0].find("path")
        assert _modules(path.get("d")) == _expected_modules(url)


def test_the_qr_code_is_a_regular_code_with_medium_error_correction():
    code = segno.make_qr("http://testserver/jobs/JOB-2026-0001/circuits/1/", error="m")
    assert not code.is_micro
    assert code.error in ("M", "Q", "H")  # segno may raise it when the code has room


def test_one_circuit_can_be_reprinted_alone(technician_client, job):
    circuit = job.circuits.get(tag="D-01")
    _, labels = _labels(technician_client, job, circuit=circuit.pk)
    assert [a.get("data-tag") for a in labels] == ["D-01", "D-01"]


def test_a_circuit_of_another_job_is_not_found(technician_client, job):
    other = make_job()
    a = make_device(other, name="A", kind="battery")
    b = make_device(other, name="B", kind="load")
    foreign = make_circuit(other, a, b, tag="Z-01")
    url = reverse("circuit_labels", args=[job.number])
    assert technician_client.get(url, {"circuit": foreign.pk}).status_code == 404
    assert technician_client.get(url, {"circuit": "x"}).status_code == 404


def test_the_sheet_prints_on_its_own_page_settings(technician_client, job):
    response, _ = _labels(technician_client, job)
    css = (settings.BASE_DIR / "static" / "css" / "drawings.css").read_text(encoding="utf-8")
    assert "@page labels" in css and "@media print" in css
    assert b'class="label-sheet"' in response.content


def test_a_job_without_circuits_has_no_labels(technician_client):
    job = make_job()
    response, labels = _labels(technician_client, job)
    assert labels == []
    assert b"no labels to print" in response.content


@pytest.mark.parametrize("tampered", ["²", "١", str(10**308), str(2**63), "-1", "1e3"])
def test_unicode_digit_ids_do_not_crash(technician_client, job, tampered):
    # "²".isdigit() is True but int("²") fails; 10**308 overflows SQLite's integers.
    url = reverse("circuit_labels", args=[job.number])
    response = technician_client.get(url, {"circuit": tampered})
    assert response.status_code == 404
