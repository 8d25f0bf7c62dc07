"""On a tablet, the circuit editor's live panel follows what is typed without a page load,
and a lead waives a finding in place; both pages pass axe (no serious or critical
violation) as they stand after the change."""

from __future__ import annotations

import pytest
from django.template.defaultfilters import floatformat
from django.urls import reverse
from playwright.sync_api import expect

from circuits.sizing import CircuitInput, size_circuit
from tests.browser.helpers import assert_accessible
from tests.browser.scenario import shots
from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]

FOOT_M = 0.3048  # exact by definition (NIST SP 811)


def _expected(current_a: float, length_m: float) -> dict[str, str]:
    """What the panel should show, from the sizing engine itself, formatted as the page
    formats it."""
    # The editor's defaults: 105 °C insulation, tinned, one conductor, not bundled.
    inp = CircuitInput(system_voltage_v=12, current_a=current_a, length_m=length_m, tinned=True)
    report = size_circuit(inp)
    result = report.result
    return {
        "size": report.recommended_size.label,
        "ampacity": f"{floatformat(result.ampacity_a, '-1')} A",
        "drop": f"{floatformat(result.voltage_drop_v, 2)} V · "
        f"{floatformat(result.voltage_drop_pct, 1)} %",
    }


def test_live_panel_follows_current_and_length_in_feet_or_metres(live_server, sign_in, technician):
    job = make_job(technicians=[technician])  # a technician writes to the jobs they are on
    make_device(job, name="Busbar", kind="busbar")
    make_device(job, name="Fridge")
    page = sign_in(technician.username)
    page.goto(f"{live_server.url}{reverse('circuit_new', args=[job.number])}")
    page.evaluate("window.__sameDocument = true")

    page.get_by_role("textbox", name="Tag").fill("D-01")
    page.get_by_role("textbox", name="Name").fill("Fridge feed")
    page.get_by_label("From device").select_option(label="Busbar")
    page.get_by_label("To device").select_option(label="Fridge")
    panel = page.locator("#panel")
    size = panel.locator("section.recommend .metric-value")
    ampacity = panel.locator("section[aria-label='Ampacity'] .metric-value")
    drop = panel.locator("section[aria-label='Voltage drop'] .metric-value")

    page.get_by_label("Design current (A)").fill("20")
    page.get_by_label("One-way length").fill("10 ft")
    first = _expected(20, 10 * FOOT_M)
    expect(size).to_contain_text(first["size"])
    expect(ampacity).to_contain_text(first["ampacity"])
    expect(drop).to_contain_text(first["drop"])

    page.get_by_label("One-way length").fill("3 m")
    metres = _expected(20, 3.0)
    assert metres["drop"] != first["drop"]
    expect(drop).to_contain_text(metres["drop"])

    page.get_by_label("Design current (A)").fill("40")
    heavier = _expected(40, 3.0)
    assert heavier["size"] != first["size"]
    expect(size).to_contain_text(heavier["size"])
    expect(ampacity).to_contain_text(heavier["ampacity"])
    expect(drop).to_contain_text(heavier["drop"])
    # The summary bar above the fold follows too.
    expect(page.locator("#panel-summary")).to_contain_text(heavier["size"])
    assert_accessible(page, "circuit editor, live panel")
    shots(page, "18-circuit-editor")

    assert page.evaluate("window.__sameDocument") is True  # no page load happened
    assert not job.circuits.exists()  # previews save nothing


def test_lead_waives_a_finding_and_sees_it_marked_waived(live_server, sign_in, lead):
    job = make_job()
    circuit = make_circuit(
        job, make_device(job), make_device(job), tag="D-01", construction="solid"
    )
    page = sign_in(lead.username)
    page.goto(f"{live_server.url}{circuit.get_absolute_url()}")
    page.evaluate("window.__sameDocument = true")

    finding = page.locator("li.finding", has_text="CONSTRUCTION_SOLID")
    expect(finding).to_contain_text("Blocking")
    finding.get_by_text("Waive this finding").tap()
    reason = finding.get_by_label("Reason for accepting it")
    reason.fill("Short")
    finding.get_by_role("button", name="Waive").tap()
    expect(finding.locator(".field-error")).to_contain_text("at least 15 characters")

    reason = finding.get_by_label("Reason for accepting it")
    reason.fill("Lamp lead supplied by the owner; replaced at the next service.")
    finding.get_by_role("button", name="Waive").tap()
    expect(finding).to_contain_text("Waived by Test Lead")
    expect(finding).to_contain_text("replaced at the next service")
    expect(finding.locator(".waived-tag")).to_be_visible()
    assert_accessible(page, "circuit page, finding waived")
    assert page.evaluate("window.__sameDocument") is True

    box = finding.get_by_role("button", name="Withdraw waiver").bounding_box()
    assert box is not None and box["height"] >= 44
    # The schedule lists every finding (the job page shows only their counts).
    page.goto(f"{live_server.url}{reverse('circuit_schedule', args=[job.number])}")
    expect(page.locator("li.finding", has_text="CONSTRUCTION_SOLID")).to_contain_text(
        "Waived by Test Lead"
    )
