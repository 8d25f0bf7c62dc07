"""What the job page leads with: the stage the work is at, its progress in words, the one
button to carry on, the secondary actions, the sign-offs (each checked against what it
covers now) and the counts of the system's findings. Reads only; nothing here writes."""

from __future__ import annotations

import datetime
from dataclasses import dataclass, field

from django.urls import reverse
from django.utils import timezone

from circuits.system import SystemReport
from inspections.models import SignOff, Stage, content_hash
from inspections.services import (
    latest_run,
    send_back_note,
    signoff_content,
    soak_ends_at,
    torque_progress,
)
from inspections.services.status import receipt_in_force
from shop.models import Job
from shop.views.access import JobAccess
from wiring.services import OWNER_LINKS_PERM

READINGS_PERM = "inspections.add_torquerecord"
RUN_PERM = "inspections.add_heatcyclerun"
SIGN_PERM = "inspections.sign_stage"
REVIEW_PERM = "inspections.approve_job"
REOPEN_PERM = "inspections.reopen_job"
CHECKLIST_PERM = "inspections.view_checklistmark"
TRAIL_PERM = "inspections.view_auditevent"
THERMAL_PERM = "inspections.view_thermalreading"

# The state of each stage as the strip says it (words, not only colour).
STATE_WORDS = {
    Stage.State.NOT_STARTED: "not started",
    Stage.State.OPEN: "open",
    Stage.State.SIGNED: "done",
    Stage.State.SENT_BACK: "sent back",
    Stage.State.REOPENED: "reopened",
    Stage.State.NOT_NEEDED: "not needed",
}
BOOK_PERM = "shop.add_job"


@dataclass(frozen=True)
class Action:
    label: str
    url: str


@dataclass
class StagePanel:
    stages: list[Stage]
    current: Stage | None = None
    locked: bool = False
    handed_over: SignOff | None = None
    progress: object = None  # TorqueProgress on the first install and the retorque
    run: object = None  # the latest HeatCycleRun
    soak_until: datetime.datetime | None = None  # set while the soak is still running
    soak_left: str = ""
    sent_back_note: str = ""
    waiting: str = ""  # why there is no button to carry on, in plain words
    carry_on: Action | None = None
    actions: list[Action] = field(default_factory=list)

    @property
    def strip(self) -> list[tuple[Stage, str, bool]]:
        """(stage, its state in words, whether it is the one the work is at)."""
        return [
            (stage, STATE_WORDS.get(stage.state, stage.state), stage == self.current)
            for stage in self.stages
        ]


def _url(name: str, job: Job, **kwargs) -> str:
    return reverse(name, kwargs={"number": job.number, **kwargs})


def left_in_words(left: datetime.timedelta) -> str:
    """ "3 h 12 min left", rounded up to the minute (never "0 min left" while it runs)."""
    minutes = max(1, -(-int(left.total_seconds()) // 60))
    hours, minutes = divmod(minutes, 60)
    return f"{hours} h {minutes} min left" if hours else f"{minutes} min left"


def _current(stages: list[Stage]) -> Stage | None:
    """The stage the work is at: the first one that takes work (open, sent back,
    reopened); after approval, the signed handover."""
    for stage in stages:
        if stage.accepts_work:
            return stage
    return next((s for s in stages if s.kind == Stage.Kind.HANDOVER), None)


def stage_panel(job: Job, user, access: JobAccess, *, now=None) -> StagePanel:
    stages = list(Stage.objects.filter(job=job).order_by("kind"))
    panel = StagePanel(stages=stages, locked=access.locked)
    if not stages:
        panel.waiting = "This job has no stages yet; a lead can set them up."
        return panel
    current = panel.current = _current(stages)
    works = access.may_edit
    panel.run = latest_run(job)
    if current.takes_torque_readings:
        panel.progress = torque_progress(current)
    if current.state == Stage.State.SENT_BACK:
        panel.sent_back_note = send_back_note(current)
    if current.kind == Stage.Kind.RETORQUE:
        ends = soak_ends_at(job)
        now = now or timezone.now()
        if ends is not None and ends > now:
            panel.soak_until = ends
            panel.soak_left = left_in_words(ends - now)
    _carry_on(panel, job, user, works, receives=access.may_write)
    _secondary(panel, job, user, works)
    return panel


def _carry_on(panel: StagePanel, job: Job, user, works: bool, *, receives: bool) -> None:
    """The one button to the next page; `works` when the user may write the job now,
    `receives` when they may take the owner's receipt (the one write after approval)."""
    current = panel.current
    kind = current.kind
    if panel.locked:
        panel.handed_over = receipt_in_force(job)
        if panel.handed_over is None and receives:
            panel.carry_on = Action("Owner signs for receipt", _url("handover_receipt", job))
        return
    if kind in (Stage.Kind.RECHECK, Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE):
        name = current.get_kind_display().lower()
        if works and user.has_perm(READINGS_PERM):
            panel.carry_on = Action(f"Carry on with the {name}", _url("stage_work", job))
        else:
            panel.waiting = f"The {name} is done by the technicians assigned to this job."
    elif kind == Stage.Kind.HEAT_CYCLE:
        if works and user.has_perm(RUN_PERM):
            panel.carry_on = Action("Log the heat-cycle run", _url("heat_cycle_log", job))
        else:
            panel.waiting = "The heat-cycle run is logged by the people assigned to this job."
    elif user.has_perm(REVIEW_PERM):
        panel.carry_on = Action("Review and approve", _url("job_review", job))
    else:
        panel.waiting = "Waiting for a lead to review and approve the job."


def _secondary(panel: StagePanel, job: Job, user, works: bool) -> None:
    current, actions = panel.current, panel.actions
    if panel.locked:
        if user.has_perm(BOOK_PERM):
            actions.append(Action("Book a return visit", _url("return_visit_book", job)))
        if user.has_perm(REOPEN_PERM):
            actions.append(Action("Reopen the job", _url("job_reopen", job)))
    elif current.takes_torque_readings:
        if user.has_perm(CHECKLIST_PERM):
            actions.append(
                Action("Checklist", _url("stage_checklist", job, kind=int(current.kind)))
            )
        if works and user.has_perm(SIGN_PERM):
            actions.append(
                Action("Sign this stage", _url("stage_sign", job, kind=int(current.kind)))
            )
        # A return visit: the re-check's run under load for its thermal check; after a
        # signed re-check that found nothing, the lead may mark the build not needed.
        if current.kind == Stage.Kind.RECHECK and works and user.has_perm(RUN_PERM):
            actions.append(Action("Re-check run and temperatures", _url("heat_cycle_log", job)))
        recheck = next((s for s in panel.stages if s.kind == Stage.Kind.RECHECK), None)
        if (
            recheck is not None
            and recheck.state == Stage.State.SIGNED
            and current.kind == Stage.Kind.FIRST_INSTALL
            and works
            and user.has_perm(REVIEW_PERM)
        ):
            actions.append(Action("No build work needed?", _url("build_stages_not_needed", job)))
    if panel.run is not None and user.has_perm(THERMAL_PERM):
        actions.append(Action("Temperatures", _url("thermal_readings", job)))
    if user.has_perm(TRAIL_PERM):
        actions.append(Action("Timeline", _url("job_timeline", job)))
    # The wiring record (wiring/): the signed revisions once approved, a draft preview
    # before; the stage sheet of a torque stage; the owner's private links for the office.
    if panel.locked:
        actions.append(Action("Wiring record", _url("revision_list", job)))
    else:
        actions.append(Action("Record preview", _url("record_preview", job)))
    if not panel.locked and current.kind in (Stage.Kind.FIRST_INSTALL, Stage.Kind.RETORQUE):
        actions.append(
            Action("Stage sheet (PDF)", _url("stage_sheet", job, kind=int(current.kind)))
        )
    if user.has_perm(OWNER_LINKS_PERM):
        actions.append(Action("Owner's link", _url("owner_links", job)))


@dataclass(frozen=True)
class SignOffRow:
    signoff: SignOff
    current: bool  # what it covers is as it was signed


def signoff_rows(job: Job) -> list[SignOffRow]:
    """Every sign-off of the job, oldest first, each told apart as unchanged or changed
    since signing. Same test as inspections.services.signoff_is_current, with the content
    of each stage hashed once (a stage re-signed after a send-back has several)."""
    signoffs = list(
        SignOff.objects.filter(job=job).select_related("stage__job").order_by("signed_at", "pk")
    )
    hashes: dict[int, str] = {}
    rows = []
    for signoff in signoffs:
        if signoff.stage_id not in hashes:
            hashes[signoff.stage_id] = content_hash(signoff_content(stage=signoff.stage))
        rows.append(SignOffRow(signoff, hashes[signoff.stage_id] == signoff.content_sha256))
    return rows


@dataclass(frozen=True)
class FindingsSummary:
    circuits: int
    devices: int
    blocking: int  # open (not waived) blocking findings, circuits that cannot be sized
    warnings: int  # open warnings
    waived: int
    lapsed: int  # waivers whose facts changed: open again

    @property
    def clear(self) -> bool:
        return not (self.blocking or self.warnings)


def findings_summary(system: SystemReport) -> FindingsSummary:
    findings = system.all_findings
    unsized = sum(1 for row in system.circuits if row.error)
    return FindingsSummary(
        circuits=len(system.circuits),
        devices=len(system.devices),
        blocking=len(system.open_blocking) + unsized,
        warnings=sum(1 for f in findings if f.severity == "warning" and not f.waived),
        waived=sum(1 for f in findings if f.waived),
        lapsed=len(system.lapsed),
    )
