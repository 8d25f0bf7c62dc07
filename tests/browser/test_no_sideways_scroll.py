"""No page scrolls sideways on a tablet in portrait (820 px wide): the job page, the
device list and the circuit schedule of a job the size of a real van build (23 circuits),
and the job page stays within about two screens (issue 8, "The tablet flow")."""

from __future__ import annotations

import pytest

from shop import roles
from tests.browser.conftest import TABLET
from tests.circuits.factories import make_circuit, make_device, make_terminal
from tests.factories import make_job, make_user

pytestmark = [pytest.mark.browser, pytest.mark.django_db(transaction=True)]

CIRCUITS = 23


def _van_build(lead):
    """A battery, a distribution busbar and 22 loads with long, realistic names."""
    job = make_job(title="Long-wheelbase van: full 12 V build with shore inlet", lead=lead)
    battery = make_device(
        job, name="House battery bank (rear locker)", kind="battery", enclosure="Rear locker"
    )
    busbar = make_device(
        job, name="Main distribution busbar", kind="busbar", location="Under the passenger seat"
    )
    for device in (battery, busbar):
        make_terminal(device, name="+", polarity="pos", stud_size="M8")
        make_terminal(device, name="-", polarity="neg", stud_size="M8")
    make_circuit(
        job, battery, busbar, tag="M-01", name="Battery to busbar main feed",
        role="main_feed", conductor_size="2 AWG", design_current_a=100,
        protection_type="fuse", protection_a=125,
    )  # fmt: skip
    for n in range(2, CIRCUITS + 1):
        load = make_device(job, name=f"Cabin load number {n} with a long name", mounting="body")
        make_circuit(
            job, busbar, load, tag=f"D-{n:02d}", name=f"Feed to cabin load {n}",
            design_current_a=8, length_m=3.5, conductor_size="14 AWG",
            protection_type="fuse", protection_a=15,
        )  # fmt: skip
    return job


def _width(page) -> int:
    return page.evaluate("document.scrollingElement.scrollWidth")


def test_job_page_device_list_and_schedule_fit_820_px(live_server, sign_in):
    lead = make_user(roles.LEAD, first_name="Wide", last_name="Tester")
    job = _van_build(lead)
    page = sign_in(lead.username)
    for path in (
        f"/jobs/{job.number}/",
        f"/jobs/{job.number}/devices/",
        f"/jobs/{job.number}/circuits/",
    ):
        page.goto(f"{live_server.url}{path}")
        assert _width(page) <= TABLET["width"], path
    page.goto(f"{live_server.url}/jobs/{job.number}/")
    # About two screens: the stage, the sign-offs, the findings summary and the facts.
    height = page.evaluate("document.body.scrollHeight")
    assert height <= 2.2 * TABLET["height"], height
    assert page.get_by_role("link", name="Carry on with the first install").is_visible()
