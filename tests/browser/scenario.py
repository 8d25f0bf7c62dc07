"""The one job the browser scenario follows, and the state each of its steps starts from,
built through the real services (so each step runs alone):

    small_system(technician, lead) -> Job   a 12 V house battery bus feeding a distribution
        bus 15 m away: one circuit, four terminations at 10 N·m ±10 %, one calibrated
        wrench; its voltage drop is a warning (not blocking) that the lead waives
    installed(job, technician) -> Job       first install read, marked and signed
    retorqued(job, technician) -> Job       heat-cycle run logged and soaked, retorque signed
    issue_record(job, lead)                 the approved job's signed record (rendered and
                                            signed off Playwright's event loop)
    off_the_loop(fn, ...)                   fn in a thread of its own: pyHanko signs and
                                            validates with asyncio.run, which refuses to start
                                            in the thread where Playwright's loop runs
    shots(page, name)                       when AMPWRIGHT_SHOTS names a folder, a full-page
                                            screenshot there (for people looking at the screens)
"""

from __future__ import annotations

import os
import threading
from pathlib import Path

from django.db import connections

from inspections.models import Stage
from tests.factories import make_job, make_owner, make_vehicle
from tests.inspections.factories import (
    make_spec_circuit,
    make_wrench,
    through_install,
    through_retorque,
)

PASSWORD = "pw-for-tests-only"  # tests.factories.make_user's
TABLET_LANDSCAPE = {"width": 1180, "height": 820}
PHONE = {"width": 390, "height": 844}
# 1 lbf·ft = 1.355818 N·m (NIST SP 811, B.9): the spec of 10 N·m is 7.376 lbf·ft.
NM_PER_LBF_FT = 1.355818


def small_system(*, technician, lead):
    owner = make_owner(name="Ash Testowner", email="ash.testowner@test.example")
    vehicle = make_vehicle(owner, make="Testmake", model="Long van")
    job = make_job(
        vehicle,
        title="House battery bus and distribution bus",
        lead=lead,
        technicians=[technician],
    )
    # 12 AWG over 15 m each way at 10 A drops more than the 10 % allowed for a load that is
    # not critical: a warning the lead may accept (circuits.sizing.checks, voltage drop).
    make_spec_circuit(
        job, tag="M-01", name="Battery bus to distribution bus", length_m=15, design_current_a=10
    )
    make_wrench(code="TW-01")
    return job


def installed(job, *, technician):
    from inspections.models import TorqueWrench

    through_install(job, technician=technician, wrench=TorqueWrench.objects.get(code="TW-01"))
    return job


def retorqued(job, *, technician):
    from inspections.models import TorqueWrench

    installed(job, technician=technician)
    through_retorque(job, technician=technician, wrench=TorqueWrench.objects.get(code="TW-01"))
    assert Stage.objects.get(job=job, kind=Stage.Kind.RETORQUE).state == Stage.State.SIGNED
    return job


def off_the_loop(fn, *args, **kwargs):
    outcome: dict = {}

    def run():
        try:
            outcome["value"] = fn(*args, **kwargs)
        except BaseException as error:  # handed back to the test's thread below
            outcome["error"] = error
        finally:
            connections.close_all()

    thread = threading.Thread(target=run)
    thread.start()
    thread.join()
    if "error" in outcome:
        raise outcome["error"]
    return outcome.get("value")


def issue_record(job, *, lead):
    from wiring.services import record_issue

    return off_the_loop(record_issue, job=job, by=lead)


def shots(page, name: str) -> Path | None:
    folder = os.environ.get("AMPWRIGHT_SHOTS")
    if not folder:
        return None
    target = Path(folder) / f"{name}.png"
    target.parent.mkdir(parents=True, exist_ok=True)
    page.screenshot(path=str(target), full_page=True)
    return target
