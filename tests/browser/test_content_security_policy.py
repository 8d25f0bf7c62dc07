"""Under the real Content-Security-Policy and Permissions-Policy, the pages a shop uses
every day load without a single violation, and what runs on them still works: the htmx
live panel of the circuit editor, the labels page's print button, the one-line diagram."""

from __future__ import annotations

import pytest
from django.urls import reverse
from playwright.sync_api import Page, expect

from tests.circuits.factories import make_circuit, make_device
from tests.factories import make_job

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]

# The test's own script, run by Playwright before each document's scripts (not subject to
# the page's policy): it reports every violation on the console, where the test collects
# it, and replaces window.print so a print button can be pressed without a dialog.
WATCH = """
document.addEventListener("securitypolicyviolation", (event) => {
  console.error(`CSP violation: ${event.effectiveDirective} blocked `
    + `${event.blockedURI || "inline"} at ${event.sourceFile}:${event.lineNumber}`);
}, true);
window.__printed = 0;
window.print = () => { window.__printed += 1; };
"""

# Chromium's own console wording for a blocked resource or an unknown policy feature.
POLICY_WORDS = ("CSP violation", "Content Security Policy", "Permissions-Policy", "Refused to")


@pytest.fixture
def reports(page: Page) -> list[str]:
    """Every policy complaint and script error on any page this test opens."""
    found: list[str] = []
    page.add_init_script(WATCH)
    page.on(
        "console",
        lambda message: (
            found.append(message.text)
            if any(word in message.text for word in POLICY_WORDS)
            else None
        ),
    )
    page.on("pageerror", lambda error: found.append(f"script error: {error}"))
    return found


def _system_job():
    job = make_job(title="Policy check build")
    battery = make_device(job, name="House battery", kind="battery")
    busbar = make_device(job, name="Positive busbar", kind="busbar")
    fridge = make_device(job, name="Fridge")
    make_circuit(job, battery, busbar, tag="B-01", name="Battery to busbar")
    make_circuit(job, busbar, fridge, tag="D-01", name="Fridge feed")
    return job, busbar, fridge


def test_the_watch_catches_a_planted_violation(live_server, page, reports):
    # Without this, a watch that heard nothing would pass every test below.
    page.goto(f"{live_server.url}{reverse('login')}")
    page.evaluate("document.body.insertAdjacentHTML('beforeend', '<b style=\"color:red\">x</b>')")
    page.wait_for_timeout(200)
    assert any("style-src" in report for report in reports), reports


def test_daily_pages_load_without_a_policy_violation(live_server, sign_in, lead, reports):
    job, _, _ = _system_job()
    page = sign_in(lead.username)  # the sign-in page and the job list

    page.get_by_role("searchbox").fill(job.number)  # an htmx swap of the results
    expect(page.locator("#job-results tbody tr")).to_have_count(1)

    page.goto(f"{live_server.url}{job.get_absolute_url()}")
    expect(page.locator("#stage-panel, .stage-panel").first).to_be_visible()

    page.goto(f"{live_server.url}{reverse('job_diagram_svg', args=[job.number])}")
    diagram = page.locator("svg").first
    expect(diagram).to_be_visible()
    assert diagram.bounding_box()["height"] > 100  # drawn at size, not collapsed

    page.goto(f"{live_server.url}{reverse('circuit_schedule', args=[job.number])}")
    expect(page.get_by_text("Fridge feed").first).to_be_visible()
    page.wait_for_load_state("networkidle")
    assert reports == []


def test_live_panel_works_under_the_policy(live_server, sign_in, lead, reports):
    job, busbar, fridge = _system_job()
    page = sign_in(lead.username)
    page.goto(f"{live_server.url}{reverse('circuit_new', args=[job.number])}")
    page.evaluate("window.__sameDocument = true")

    page.get_by_role("textbox", name="Tag").fill("D-02")
    page.get_by_role("textbox", name="Name").fill("Lights feed")
    page.get_by_label("From device").select_option(label=busbar.name)
    page.get_by_label("To device").select_option(label=fridge.name)
    page.get_by_label("Conductor size").fill("12 AWG")  # fixed, so the drop follows the length
    page.get_by_label("Design current (A)").fill("10")
    page.get_by_label("One-way length").fill("2 m")

    drop = page.locator("#panel section[aria-label='Voltage drop']")
    expect(drop.locator(".metric-value")).to_contain_text("%")
    # The gauge's fill carries the drop in a width attribute, not an inline style.
    fill = drop.locator("svg.gauge rect.gauge-fill")
    expect(fill).to_have_count(1)
    first_width = fill.get_attribute("width") or ""
    assert float(first_width) > 0

    page.get_by_label("One-way length").fill("4 m")  # twice the length, twice the drop
    expect(fill).not_to_have_attribute("width", first_width)
    assert float(fill.get_attribute("width")) > float(first_width)
    assert fill.bounding_box()["width"] > 0  # drawn, not blocked
    assert page.evaluate("window.__sameDocument") is True  # htmx swapped, no page load
    page.wait_for_load_state("networkidle")
    assert reports == []


def test_print_button_works_under_the_policy(live_server, sign_in, lead, reports):
    job, _, _ = _system_job()
    page = sign_in(lead.username)
    page.goto(f"{live_server.url}{reverse('circuit_labels', args=[job.number])}")

    button = page.get_by_role("button", name="Print labels")
    expect(button).to_be_visible()  # shown by static/js/print.js, so the hook loaded
    button.tap()
    assert page.evaluate("window.__printed") == 1
    expect(page.locator(".wire-label svg.qr").first).to_be_visible()
    page.wait_for_load_state("networkidle")
    assert reports == []


def test_admin_pages_load_without_a_policy_violation(live_server, sign_in, office, reports):
    page = sign_in(office.username)
    page.goto(f"{live_server.url}{reverse('admin:index')}")
    expect(page.locator("#site-name")).to_be_visible()
    page.goto(f"{live_server.url}{reverse('admin:shop_job_changelist')}")
    expect(page.locator("#changelist")).to_be_visible()
    page.wait_for_load_state("networkidle")
    assert reports == []
