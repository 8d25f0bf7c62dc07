"""The accessibility checks themselves: axe finds what it is there to find (so a page that
passes has been looked at), and the keyboard check sees a focus ring too faint to see."""

from __future__ import annotations

import pytest

from tests.browser.helpers import axe_violations, describe, tab_through

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]


def test_axe_reports_planted_serious_violations(live_server, page):
    page.goto(f"{live_server.url}/login/")
    assert axe_violations(page, "login") == []
    # #c8c8c8 on white, 1.67:1 by WCAG 2.2's relative luminance (SC 1.4.3 asks 4.5:1), and
    # a form field without a name: serious and critical in axe.
    page.evaluate(
        """() => {
          const p = document.createElement("p");
          p.textContent = "Faint words"; p.style.color = "#c8c8c8"; p.style.background = "#fff";
          document.querySelector("main").append(p);
          const input = document.createElement("input"); input.type = "text";
          document.querySelector("main").append(input);
        }"""
    )
    violations = axe_violations(page, "login with planted faults")
    assert {"color-contrast", "label"} <= {v["id"] for v in violations}
    # The failure names the rule, its impact, where and what to fix.
    report = describe(violations)
    assert "color-contrast (serious)" in report
    assert "insufficient color contrast of 1.67" in report  # (1 + 0.05) / (0.578 + 0.05)
    assert 'at #main > input[type="text"]' in report


def test_focus_check_measures_the_ring_against_its_ground(live_server, page):
    page.goto(f"{live_server.url}/login/")
    # Through the CSSOM (the page's policy refuses a <style> element): the ring's colour
    # near-white, whatever the state.
    page.evaluate(
        """() => {
          const field = document.getElementById("id_username");
          field.style.setProperty("outline-color", "#f0f0f0", "important");
          field.style.setProperty("box-shadow", "none", "important");
        }"""
    )
    reached = {entry["id"]: entry for entry in tab_through(page)}
    assert reached["id_username"]["contrast"] < 3  # near-white on white
    assert reached["id_password"]["contrast"] >= 3  # the shop's own ring
