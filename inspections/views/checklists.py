"""A stage's checklist and marking its items.

The items come from inspections.services.checklist_items_for: torque items (they follow
the readings and are never marked by hand), the circuit checks, and the shop's own. Each
hand-marked item is a small form: pass, fail or not applicable, a note, a photo, and a
key made for that one render so a double submit is stored once. With htmx only the item
is swapped (and the progress line beside it); without JavaScript the post redirects back
to the list, anchored at the item."""

from __future__ import annotations

import uuid
from dataclasses import dataclass, field

from django.contrib.auth.decorators import login_required
from django.core.exceptions import ValidationError
from django.http import Http404, HttpRequest, HttpResponse
from django.shortcuts import redirect, render
from django.urls import path, reverse
from django.views.decorators.http import require_GET, require_POST

from inspections import services
from inspections.models import Stage
from inspections.services import ChecklistItem
from inspections.services.checklists import MAX_NOTE
from inspections.views.heat import left_in_words
from shop.models import Job
from shop.views.access import _get_job_for_user, job_access

VIEW_PERM = "inspections.view_checklistmark"
MARK_PERM = "inspections.add_checklistmark"
# Service messages shown beside the item's own fields; the rest go above its buttons.
ITEM_FIELDS = ("result", "note", "photo")


def item_anchor(key: str) -> str:
    """An HTML id for an item key ("circuit:12:labels" -> "item-circuit-12-labels")."""
    return "item-" + "".join(c if c.isalnum() else "-" for c in key)


@dataclass
class ItemView:
    """One item as the page shows it: the service's item, a fresh key for its form, and
    the messages and values of a refused post."""

    item: ChecklistItem
    client_key: str = field(default_factory=lambda: str(uuid.uuid4()))
    errors: dict[str, list[str]] = field(default_factory=dict)
    other_errors: list[str] = field(default_factory=list)
    result: str = ""
    note: str = ""

    @property
    def anchor(self) -> str:
        return item_anchor(self.item.key)

    @property
    def chosen(self) -> str:
        """The result ticked in the form: what was just posted, else the current mark."""
        if self.result:
            return self.result
        mark = self.item.current_mark
        return mark.result if mark is not None else ""


@dataclass
class Progress:
    hand_total: int
    hand_marked: int
    fails: int
    changed: int
    torque_total: int
    torque_read: int
    torque_out: int

    def __str__(self) -> str:
        text = f"{self.hand_marked} of {self.hand_total} marked, {self.fails} fail"
        if self.fails != 1:
            text += "s"
        if self.changed:
            text += f", {self.changed} changed since marked"
        return text

    @property
    def torque(self) -> str:
        if not self.torque_total:
            return ""
        return (
            f"Torque: {self.torque_read} of {self.torque_total} read,"
            f" {self.torque_out} out of tolerance"
        )


def progress_of(items: list[ChecklistItem]) -> Progress:
    hand = [i for i in items if not i.derived]
    torque = [i for i in items if i.derived]
    return Progress(
        hand_total=len(hand),
        hand_marked=sum(1 for i in hand if i.marked),
        fails=sum(1 for i in hand if i.state == "fail"),
        changed=sum(1 for i in hand if i.state == "changed"),
        torque_total=len(torque),
        torque_read=sum(1 for i in torque if i.reading is not None),
        torque_out=sum(1 for i in torque if i.state == "fail"),
    )


def group_items(items: list[ItemView]) -> list[tuple[str, str, list[ItemView]]]:
    """(heading, anchor, items): per circuit by tag (its torque items, then its checks),
    then the shop's own list."""
    by_circuit: dict[int, tuple[str, list[ItemView]]] = {}
    shop: list[ItemView] = []
    for view in items:
        item = view.item
        circuit = item.circuit or (item.termination.circuit if item.termination else None)
        if circuit is None:
            shop.append(view)
            continue
        heading = f"{circuit.tag} · {circuit.name}" if getattr(circuit, "name", "") else circuit.tag
        by_circuit.setdefault(circuit.pk, (heading, []))[1].append(view)
    groups = [
        (heading, f"circuit-{pk}", views)
        for pk, (heading, views) in sorted(by_circuit.items(), key=lambda kv: kv[1][0])
    ]
    if shop:
        groups.append(("The shop's own checks", "shop-items", shop))
    return groups


def _job_stage(user, number: str, kind: int, *, perm: str, write: bool) -> tuple[Job, Stage]:
    job = _get_job_for_user(user, number, perm=perm, write=write)
    if kind not in Stage.Kind.values:
        raise Http404("No such stage.")
    stage = services.stage_for(job, kind)
    if stage is None:
        raise Http404("This job has no stages yet.")
    return job, stage


def _why_not(stage: Stage, access, user) -> str:
    """Why the page offers no buttons, in plain words; "" when it does."""
    name = stage.get_kind_display().lower()
    if access.locked:
        return access.lock_message
    if not stage.accepts_work:
        return (
            f"The {name} stage is {stage.get_state_display().lower()}; its checklist is"
            " marked only while it is open."
        )
    if not access.may_write:
        return "Items are marked by the people assigned to this job."
    if not user.has_perm(MARK_PERM):
        return "Only technicians and leads mark checklist items."
    return ""


def _context(request, job: Job, stage: Stage, views: list[ItemView], **extra) -> dict:
    access = job_access(request.user, job, request)
    why_not = _why_not(stage, access, request.user)
    soak_until = soak_left = None
    if stage.kind == Stage.Kind.RETORQUE and not why_not:
        remaining = services.soak_remaining(job)
        if remaining is None:
            why_not = (
                "No heat-cycle run is logged yet; the retorque begins after the run and its soak."
            )
        elif remaining.total_seconds() > 0:
            soak_until = services.soak_ends_at(job)
            soak_left = left_in_words(remaining)
            why_not = "Retorque items are marked after the soak."
    return {
        "job": job,
        "stage": stage,
        "access": access,
        "groups": group_items(views),
        "progress": progress_of([v.item for v in views]),
        "can_mark": not why_not,
        "why_not": why_not,
        "soak_until": soak_until,
        "soak_left": soak_left,
        "max_note": MAX_NOTE,
        "mark_url": reverse("checklist_mark", args=[job.number, stage.kind]),
        **extra,
    }


@login_required
@require_GET
def stage_checklist(request: HttpRequest, number: str, kind: int) -> HttpResponse:
    job, stage = _job_stage(request.user, number, kind, perm=VIEW_PERM, write=False)
    views = [ItemView(item) for item in services.checklist_items_for(stage=stage)]
    return render(request, "inspections/checklist.html", _context(request, job, stage, views))


def _errors(exc: ValidationError) -> dict[str, list[str]]:
    return exc.message_dict if hasattr(exc, "error_dict") else {"__all__": exc.messages}


@login_required
@require_POST
def checklist_mark(request: HttpRequest, number: str, kind: int) -> HttpResponse:
    job, stage = _job_stage(request.user, number, kind, perm=MARK_PERM, write=True)
    key = str(request.POST.get("item_key", ""))[:80]
    errors: dict[str, list[str]] = {}
    try:
        services.checklist_item_mark(
            stage=stage,
            item_key=key,
            result=request.POST.get("result", ""),
            note=request.POST.get("note", ""),
            photo=request.FILES.get("photo"),
            by=request.user,
            client_key=request.POST.get("client_key", ""),
        )
    except ValidationError as exc:
        errors = _errors(exc)
    if not errors and not request.htmx:
        url = reverse("stage_checklist", args=[job.number, stage.kind])
        return redirect(f"{url}#{item_anchor(key)}")
    stage.refresh_from_db()
    views = [ItemView(item) for item in services.checklist_items_for(stage=stage)]
    this = next((v for v in views if v.item.key == key), None)
    general = []
    if errors:
        fields = {f: m for f, m in errors.items() if f in ITEM_FIELDS}
        others = [m for f, msgs in errors.items() if f not in ITEM_FIELDS for m in msgs]
        if this is not None:
            this.errors, this.other_errors = fields, others
            this.result = str(request.POST.get("result", ""))[:10]
            this.note = str(request.POST.get("note", ""))[:MAX_NOTE]
        else:
            general = [m for msgs in errors.values() for m in msgs]
    context = _context(request, job, stage, views, general=general, oob=bool(request.htmx))
    if request.htmx and this is not None:
        context["v"] = this
        return render(request, "inspections/_checklist_item.html", context)
    if request.htmx:  # the item is gone (a stale page): its place says why
        return render(request, "inspections/checklist.html#general", context)
    return render(request, "inspections/checklist.html", context)


urlpatterns = [
    path("jobs/<str:number>/stages/<int:kind>/checklist/", stage_checklist, name="stage_checklist"),
    path(
        "jobs/<str:number>/stages/<int:kind>/checklist/mark/", checklist_mark, name="checklist_mark"
    ),
]
