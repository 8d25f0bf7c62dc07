"""The demo shop's history (shop.demo): approved jobs over the past months, so the insight
pages and the re-check reminders have real records to read, and one vehicle back for its
yearly check as a return visit in progress.

  compact van   built and approved 13 months ago; back this week for its yearly re-check
                (a return visit of that job): the re-check run logged, most connections
                read as found, two found loose again, the rest still to read
  truck         a second solar string, approved 8 months ago with a connection found loose
                at retorque (so its re-check is due sooner: overdue now)
  motorhome     a second solar string, approved 11½ months ago (its re-check due soon)
  boat          a second solar string, approved 4 months ago

Everything is invented. The work is written through the inspections services, at times
in the past (readings, runs, temperatures, and the signatures, which the signing services
take a past time for only from here); idempotent like inspections.demo: a job is worked
only while it is exactly as job_create left it.

The small systems are written with circuits.demo's loaders, as inspections.demo_retrofit
does (the compact van's from the truck's tables, the add-ons from the retrofit's).
"""

from __future__ import annotations

import dataclasses
import datetime
import logging
from decimal import Decimal

from django.core.exceptions import PermissionDenied, ValidationError
from django.db import transaction
from django.utils import timezone

from circuits.demo.loading import _circuit, _devices
from circuits.demo.tables import CONTROLLER, System, circuit_spec, read_table
from inspections.demo import People, specs_fill, untouched
from inspections.demo_retrofit import RETROFIT
from inspections.demo_work import Work, signature_png, terminations_of
from inspections.models import Stage, TorqueWrench
from inspections.services import handover_receive, heat_cycle_log, job_approve, stage_sign
from inspections.services.return_visit import return_visit_create
from shop.models import Job

log = logging.getLogger(__name__)

COMPACT_VIN = "2TLRB14C7R0007731"  # invented; its check digit is right (49 CFR 565.15)
COMPACT_BUILD = "12 V build: house battery, roof solar, fridge and lights"
RETURN_TITLE = "Yearly re-check"
ADD_ON = "Add a second solar string"

# The compact van's system: the demo truck's battery, busbar, distribution and solar
# lines at 12 V (circuits.demo.truck), a smaller set of loads.
COMPACT = System(
    vehicle=COMPACT_VIN,
    title=COMPACT_BUILD,
    dc=("red", "black"),
    ac=("black", "white", "green"),
    ac_volts=120,
    devices=f"""
House battery | battery | battery_box | source | | Under the passenger seat | +: pos M8 10; -: neg M8 10
Main busbar | busbar | body | | Seat base | | +: pos M8; -: neg M8
DC distribution | dc_panel | body | | Seat base | | + in: pos M6; - bus: neg M6; Way 1..3: pos screw
Roof solar panel | other | body | source | | Roof, fused in the roof gland box | PV+: pos -; PV-: neg -
Solar charge controller | charge_controller | body | | Seat base | | {CONTROLLER}
Compressor fridge | load | body | | | Kitchen block |
Cabin lights | load | body | | | Ceiling |
""",  # noqa: E501
    circuits="""
C-01 | House battery to main busbar | main_feed | House battery > Main busbar | 1/0 AWG | 120 | 1.0 m | fuse=200; at=0.1; note=Terminal fuse on the battery's positive post.
C-02 | DC distribution feed | dc_branch | Main busbar > DC distribution | 6 AWG | 40 | 0.6 m | fuse=60; to=+ in
S-01 | Solar panel to charge controller | charging | Roof solar panel > Solar charge controller | 10 AWG | 11 | 4.0 m | V=40; fuse=15; at=0.4; to=PV+; to.neg=PV-
S-02 | Charge controller to main busbar | charging | Solar charge controller > Main busbar | 8 AWG | 20 | 0.8 m | fuse=30; from=BAT+; from.neg=BAT-
D-01 | Compressor fridge | dc_branch | DC distribution > Compressor fridge | 14 AWG | 3 | 3.0 m | continuous; critical; fuse=10; from=Way 1
D-02 | Cabin lights | dc_branch | DC distribution > Cabin lights | 14 AWG | 2 | 4.0 m | fuse=10; from=Way 2
""",  # noqa: E501
)

# (vehicle identification, title, approved this many days ago, found loose at retorque).
ADD_ONS = [
    ("5KWTR24X9S0000388", ADD_ON, 240, True),
    ("4TWLR18C5P0019022", ADD_ON, 350, False),
    ("QKW12345D616", ADD_ON, 122, False),
]


# The compact van's re-check: (circuit tag, end, polarity) -> (share of the spec read as
# found, turned before the click, note). Invented, and the reason the owner called.
PLANTED = {
    ("D-01", "from", "pos"): (
        0.62,
        True,
        "Screw turned half a turn before the click; the fridge feed was loose.",
    ),
    ("C-01", "to", "pos"): (0.84, False, "Below the band as found; no turn before the click."),
}


def _ago(**delta: float) -> datetime.datetime:
    return timezone.now() - datetime.timedelta(**delta)


def system_of(job) -> System:
    if job.vehicle.identification == COMPACT_VIN:
        return COMPACT
    return dataclasses.replace(RETROFIT, vehicle=job.vehicle.identification, title=job.title)


def system_load(job) -> None:
    """Give a history job its devices and circuits (those missing)."""
    system = system_of(job)
    devices = _devices(job, system)
    tags = set(job.circuits.values_list("tag", flat=True))
    for spec in read_table(system.circuits, circuit_spec):
        if spec.tag not in tags:
            _circuit(job, system, spec, devices)


def _signed(work: Work, people, kind: int, tech, *, start, loose: int = 0) -> datetime.datetime:
    """Read every end at `kind` from `start` (the first `loose` of them found loose and
    re-read tight), mark the checklist, sign a little after the last reading."""
    stage = work.stage(kind)
    at = start
    for termination in terminations_of(work.job)[:loose]:
        work.read(
            termination,
            stage,
            by=tech,
            at=at,
            factor=0.82,
            found_loose=True,
            note="Turned before the click; re-torqued.",
        )
        work.read(termination, stage, by=tech, at=at + datetime.timedelta(minutes=2))
        at += datetime.timedelta(minutes=4)
    at = work.read_all(stage, by=tech, start=at)
    work.mark_all(stage, by=tech)
    signed_at = at + datetime.timedelta(minutes=10)
    stage_sign(
        stage=stage,
        user=tech,
        password=people.password(tech),
        signature_png=signature_png(tech.pk + work.seed),
        at=signed_at,
    )
    return signed_at


def _run(work: Work, tech, *, end: datetime.datetime, peak: str, ambient: str):
    run = heat_cycle_log(
        job=work.job,
        start=end - datetime.timedelta(hours=1.5),
        end=end,
        peak_current_a=peak,
        ambient_c=ambient,
        by=tech,
        notes="Charging at full rate with the fridge and lights on.",
    )
    at = end + datetime.timedelta(minutes=5)
    for termination in terminations_of(work.job):
        warm = run.ambient_c + Decimal(str(round(work.rng.uniform(1.5, 3.0), 1)))
        work.temperature(run, termination, str(warm), by=tech, at=at)
        at += datetime.timedelta(minutes=1)
    return run


def built_and_approved(work: Work, people, *, days_ago: float, loose: int = 0) -> None:
    """The whole staged checklist `days_ago`: install, run, retorque after the soak,
    the lead's approval and the owner's receipt the next day."""
    tech, lead = people["ravi"], people["june"]
    system_load(work.job)
    start = _ago(days=days_ago)
    specs_fill(work.job)
    _signed(work, people, Stage.Kind.FIRST_INSTALL, tech, start=start)
    run_end = start + datetime.timedelta(hours=5)
    _run(work, tech, end=run_end, peak="38", ambient="17.0")
    retorque_at = run_end + datetime.timedelta(hours=16)  # the next morning: soak long over
    signed = _signed(work, people, Stage.Kind.RETORQUE, tech, start=retorque_at, loose=loose)
    approved_at = signed + datetime.timedelta(hours=2)
    job_approve(
        job=work.job,
        lead=lead,
        password=people.password(lead),
        signature_png=signature_png(lead.pk + work.seed),
        at=approved_at,
    )
    owner = work.job.vehicle.owner
    handover_receive(
        job=work.job,
        printed_name=owner.name,
        signature_png=signature_png(owner.pk * 7 + work.seed),
        by=lead,
        at=approved_at + datetime.timedelta(days=1),
    )


def return_visit_in_progress(earlier: Job, people, wrenches) -> Job | None:
    """The compact van back for its yearly check: booked two days ago by the office from
    its approved job, the re-check run logged and most ends read as found (two found
    loose again), the rest still to read."""
    if (
        earlier.return_visits.exists()
        or not earlier.stages.filter(kind=Stage.Kind.HANDOVER, state=Stage.State.SIGNED).exists()
    ):
        return None
    visit = return_visit_create(
        job=earlier,
        by=people["oscar"],
        technicians=[people["tessa"], people["ravi"]],
        title=RETURN_TITLE,
        description="Yearly check; the owner reports the fridge cutting out on rough roads.",
        booked_in_on=timezone.localdate() - datetime.timedelta(days=2),
    )
    work = Work(visit, wrenches=wrenches, seed=41)
    tessa = people["tessa"]
    end = _ago(hours=5)
    run = heat_cycle_log(
        job=visit,
        start=end - datetime.timedelta(hours=1),
        end=end,
        peak_current_a="36",
        ambient_c="12.5",
        by=tessa,
        notes="Re-check run: fridge, lights and the charger at full rate, before any"
        " connection was touched.",
    )
    ends = terminations_of(visit)
    stage = work.stage(Stage.Kind.RECHECK)
    at = end + datetime.timedelta(minutes=4)
    for termination in ends:
        hot = (termination.circuit.tag, termination.end, termination.polarity) == (
            "D-01",
            "from",
            "pos",
        )
        warm = "19.8" if hot else None
        celsius = warm or str(run.ambient_c + Decimal(str(round(work.rng.uniform(1.2, 3.0), 1))))
        work.temperature(run, termination, celsius, by=tessa, at=at)
        at += datetime.timedelta(minutes=1)
    at = _ago(hours=3)
    read = 0
    for termination in ends[: round(len(ends) * 0.75)]:
        key = (termination.circuit.tag, termination.end, termination.polarity)
        found = PLANTED.get(key)
        if found is not None:
            factor, loose, note = found
            work.read(
                termination, stage, by=tessa, at=at, factor=factor, found_loose=loose, note=note
            )
        else:
            work.read(termination, stage, by=tessa, at=at)
        read += 1
        at += datetime.timedelta(minutes=3)
    log.info("%s: %d of %d ends read as found", visit.number, read, len(ends))
    return visit


def load(*, users: dict, passwords: dict[str, str]) -> list[str]:
    """Play the history on the history jobs still as job_create left them; returns one
    line per job left alone because its scenario could not be played."""
    people = People(users, passwords)
    wrenches = [w for w in TorqueWrench.objects.filter(in_service=True) if not w.days_overdue()]
    skipped = []
    plays = [(COMPACT_VIN, COMPACT_BUILD, 395, 0)] + [
        (ident, title, days, 1 if loose else 0) for ident, title, days, loose in ADD_ONS
    ]
    for seed, (ident, title, days, loose) in enumerate(plays, start=20):
        job = Job.objects.filter(vehicle__identification=ident, title=title).first()
        if job is None or not untouched(job):
            continue
        try:
            with transaction.atomic():
                work = Work(job, wrenches=wrenches, seed=seed)
                built_and_approved(work, people, days_ago=days, loose=loose)
        except (ValidationError, PermissionDenied, LookupError, StopIteration) as exc:
            skipped.append(f"{job.number}: demo history not added ({exc})")
            log.warning(skipped[-1])
    earlier = Job.objects.filter(vehicle__identification=COMPACT_VIN, title=COMPACT_BUILD).first()
    if earlier is not None:
        try:
            with transaction.atomic():
                return_visit_in_progress(earlier, people, wrenches)
        except (ValidationError, PermissionDenied, LookupError, StopIteration) as exc:
            skipped.append(f"{earlier.number}: demo return visit not added ({exc})")
            log.warning(skipped[-1])
    return skipped


__all__ = ["COMPACT_VIN", "RETURN_TITLE", "load"]
