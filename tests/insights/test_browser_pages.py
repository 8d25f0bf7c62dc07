"""The insight pages in a real browser: nothing scrolls sideways on a tablet (820 px
wide, portrait) nor at 1180 x 820 (landscape), and each page shows its chart.
Screenshots land in var/test-results/insights/."""

from __future__ import annotations

from pathlib import Path

import pytest
from django.db import connection

from insights.services import shop_rule_create
from inspections.models import Stage
from shop import roles
from tests.browser.conftest import (  # noqa: F401  (the browser harness's fixtures)
    _orm_beside_playwright_loop,
    browser_context_args,
    browser_type_launch_args,
    sign_in,
)
from tests.factories import make_job, make_user
from tests.insights.data import build
from tests.inspections.guards import clear_evidence

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]
SHOTS = Path(__file__).resolve().parents[2] / "var" / "test-results" / "insights"
PAGES = ("loosening", "wrenches", "technicians", "rules")


@pytest.fixture
def evidence_cleared(transactional_db):
    """The append-only triggers refuse SQLite's row-by-row flush: clear the evidence
    first (PostgreSQL's flush truncates, which row triggers do not see)."""
    yield
    if connection.vendor == "sqlite":
        clear_evidence()


def _world():
    lead = make_user(roles.LEAD, first_name="Lee", last_name="Lead")
    for _ in range(3):
        build(make_job())
    shop_rule_create(
        by=lead,
        stage_kind=Stage.Kind.RETORQUE,
        device_kind="charge_controller",
        termination_kind="set_screw",
        text="Set-screws on charge controllers get a second retorque",
        made_from="Loosening: set-screw, 6 of 6 found loose",
    )
    return lead


@pytest.mark.parametrize("size", [(820, 1180), (1180, 820)])
def test_insight_pages_fit_the_screen(live_server, page, sign_in, evidence_cleared, size):  # noqa: F811
    lead = _world()
    page.set_viewport_size({"width": size[0], "height": size[1]})
    sign_in(lead.username)
    SHOTS.mkdir(parents=True, exist_ok=True)
    for name in PAGES:
        page.goto(f"{live_server.url}/insights/{name}/")
        assert page.locator("h1").count() == 1
        if name != "rules":
            assert page.locator("svg.ins-chart").count() >= 1
        width = page.evaluate("document.scrollingElement.scrollWidth")
        assert width <= size[0], f"{name} scrolls sideways at {size[0]} px ({width} px)"
        page.screenshot(path=str(SHOTS / f"{name}-{size[0]}x{size[1]}.png"), full_page=True)
