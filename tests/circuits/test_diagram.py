"""The one-line diagram: a well-formed, self-contained SVG that names every circuit,
places sources above distribution above loads, marks findings and escapes all text."""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

import pytest

from circuits.diagram import job_diagram_svg
from circuits.services import waiver_create
from circuits.system import job_system_report
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

SVG = "{http://www.w3.org/2000/svg}"

pytestmark = pytest.mark.django_db


def _parse(svg: str) -> ET.Element:
    return ET.fromstring(svg)


def _texts(root: ET.Element) -> list[str]:
    return ["".join(t.itertext()) for t in root.iter(f"{SVG}text")]


def _group(root: ET.Element, cls: str, **data: str) -> ET.Element:
    for g in root.iter(f"{SVG}g"):
        if g.get("class") == cls and all(g.get(f"data-{k}") == v for k, v in data.items()):
            return g
    raise AssertionError(f"no <g class={cls}> with {data}")


def _box_y(root: ET.Element, device: str) -> float:
    return float(next(_group(root, "device", device=device).iter(f"{SVG}rect")).get("y"))


def _marks(group: ET.Element) -> set[str]:
    return {
        g.get("class").split()[-1].removeprefix("mark-")
        for g in group.iter(f"{SVG}g")
        if "mark" in (g.get("class") or "").split()
    }


@pytest.fixture
def system():
    """Two paralleled batteries feeding a DC panel (named with markup characters) and
    three loads."""
    job = make_job()
    battery = make_device(job, name="House battery", kind="battery")
    second = make_device(job, name="Second battery", kind="battery")
    panel = make_device(job, name="A&B <panel>", kind="dc_panel")
    lamp = make_device(job, name="Lamp", kind="load")
    pump = make_device(job, name="Pump", kind="load")
    fan = make_device(job, name="Fan", kind="load")
    make_circuit(job, battery, panel, tag="M-01", conductor_size="4 AWG", design_current_a=60,
                 protection_a=80, protection_distance_m=0.1)  # fmt: skip
    make_circuit(job, battery, second, tag="B-01", role="interconnect", conductor_size="4 AWG",
                 design_current_a=60, protection_type="none")  # fmt: skip
    make_circuit(job, panel, lamp, tag="D-01", name='Lamp "reading" <feed>', parallel=2)
    # 30 A on 18 AWG: the sizing engine finds it blocking (ampacity below the load).
    make_circuit(job, panel, pump, tag="D-02", conductor_size="18 AWG", design_current_a=30,
                 protection_a=40)  # fmt: skip
    # 10 A over 12 m of 12 AWG at 12 V: the engine warns of voltage drop over 10 %.
    make_circuit(job, panel, fan, tag="D-03", length_m=12, conductor_size="12 AWG")
    return job


def test_the_svg_is_well_formed_and_names_every_circuit(system):
    report = job_system_report(system)
    root = _parse(job_diagram_svg(report))
    texts = _texts(root)
    for sizing in report.circuits:
        tag = sizing.circuit.tag
        assert tag in texts
        _group(root, "circuit", tag=tag)
        assert _group(root, "circuit", tag=tag).find(f"{SVG}title") is not None  # hover text


def test_each_label_gives_size_times_parallel_and_protection(system):
    root = _parse(job_diagram_svg(job_system_report(system)))
    label = _texts(_group(root, "circuit-label", tag="D-01"))
    assert "12 AWG ×2" in label
    assert "15 A fuse" in label


def test_sources_are_above_distribution_above_loads(system):
    root = _parse(job_diagram_svg(job_system_report(system)))
    battery, panel = _box_y(root, "House battery"), _box_y(root, "A&B <panel>")
    assert battery == _box_y(root, "Second battery") < panel
    for load in ("Lamp", "Pump", "Fan"):
        assert panel < _box_y(root, load)


def test_circuits_are_drawn_as_straight_orthogonal_segments(system):
    root = _parse(job_diagram_svg(job_system_report(system)))
    for path in root.iter(f"{SVG}path"):
        assert re.fullmatch(r"M[\d.]+ [\d.]+([VH][\d.]+)+", path.get("d"))


def test_findings_are_marked_with_a_shape_and_a_word(system):
    report = job_system_report(system)
    worst = {s.circuit.tag: s.worst for s in report.circuits}
    assert worst["D-02"].severity == "blocking" and worst["D-03"].severity == "warning"
    assert worst["D-01"] is None
    root = _parse(job_diagram_svg(report))
    blocking = _group(root, "circuit-label", tag="D-02")
    assert _marks(blocking) == {"blocking"}
    assert any(t.startswith("BLOCKING") for t in _texts(blocking))
    warning = _group(root, "circuit-label", tag="D-03")
    assert _marks(warning) == {"warning"}
    assert any(t.startswith("WARNING") for t in _texts(warning))
    assert _marks(_group(root, "circuit-label", tag="D-01")) == set()
    # An open blocking finding also thickens the line itself.
    width = _group(root, "circuit", tag="D-02").find(f".//{SVG}path").get("stroke-width")
    assert float(width) > float(
        _group(root, "circuit", tag="D-01").find(f".//{SVG}path").get("stroke-width")
    )


def test_a_waived_finding_is_shown_as_waived_not_as_open(system, lead):
    (finding,) = [f for f in job_system_report(system).all_findings if f.subject == "D-03"]
    waiver_create(job=system, code=finding.code, subject="D-03", lead=lead,
                  reason="Fan tolerates the low voltage; accepted by the lead.")  # fmt: skip
    root = _parse(job_diagram_svg(job_system_report(system)))
    label = _group(root, "circuit-label", tag="D-03")
    assert _marks(label) == {"waived"}
    assert "waived" in _texts(label)
    assert not any(t.startswith("WARNING") for t in _texts(label))


def test_text_from_the_records_is_escaped(system):
    svg = job_diagram_svg(job_system_report(system))
    assert "A&amp;B &lt;panel&gt;" in svg
    assert "<panel>" not in svg and "<feed>" not in svg
    root = _parse(svg)
    assert "A&B <panel>" in _texts(root)
    titles = ["".join(t.itertext()) for t in root.iter(f"{SVG}title")]
    assert any('Lamp "reading" <feed>' in t for t in titles)


def test_links_when_asked_and_their_urls_are_escaped(system):
    svg = job_diagram_svg(job_system_report(system), link=lambda o: f"/x?a=1&b={o.pk}")
    root = _parse(svg)
    hrefs = [a.get("href") for a in root.iter(f"{SVG}a")]
    assert hrefs and all(h.startswith("/x?a=1&b=") for h in hrefs)


def test_the_svg_is_self_contained_and_sized(system):
    svg = job_diagram_svg(job_system_report(system))
    root = _parse(svg)
    assert root.get("viewBox") == f"0 0 {root.get('width')} {root.get('height')}"
    assert int(root.get("width")) > 0 and int(root.get("height")) > 0
    assert "<style" not in svg and "url(" not in svg and "@import" not in svg
    assert "<image" not in svg and "<script" not in svg


def test_the_same_system_always_draws_the_same_way(system):
    assert job_diagram_svg(job_system_report(system)) == job_diagram_svg(job_system_report(system))


def test_a_job_without_devices_draws_an_empty_diagram():
    root = _parse(job_diagram_svg(job_system_report(make_job())))
    assert "No devices recorded yet." in _texts(root)


def test_forty_circuits_with_wrapped_loads_and_lines_past_a_whole_tier():
    """A busy system: 38 loads wrap onto several rows, and two circuits run from a source
    straight to a load, passing the distribution tier and earlier rows of loads."""
    job = make_job()
    battery = make_device(job, name="Battery", kind="battery")
    busbar = make_device(job, name="Busbar", kind="busbar")
    make_circuit(job, battery, busbar, tag="M-01", conductor_size="2 AWG",
                 design_current_a=100, protection_a=125)  # fmt: skip
    loads = [make_device(job, name=f"Load {i:02d}", kind="load") for i in range(38)]
    for i, load in enumerate(loads[:37]):
        make_circuit(job, busbar, load, tag=f"D-{i:02d}")
    make_circuit(job, battery, loads[37], tag="X-01")
    make_circuit(job, battery, loads[0], tag="X-02")
    report = job_system_report(job)
    root = _parse(job_diagram_svg(report))
    texts = _texts(root)
    assert len(report.circuits) == 40
    assert all(s.circuit.tag in texts for s in report.circuits)
    load_rows = {_box_y(root, load.name) for load in loads}
    assert len(load_rows) > 1
    assert _box_y(root, "Busbar") < min(load_rows)
