"""Checklists: the items of a stage (generated from the job's system, plus the shop's own)
with their current marks, marking one, and keeping the shop's own list.

Which items a stage has:

* first install and retorque: one torque item per termination. Its state follows the
  torque records at that stage (a current reading within tolerance passes it); it is
  never marked by hand.
* first install only, per circuit: protection fitted and rated as recorded (when the
  circuit records protection), colours as recorded, wire labels fitted, chafe protection
  where the run passes through bulkheads (not applicable, with a note, where it passes
  through none), and a service loop wherever the slack rule asks for one. These are the
  checks of what was installed; the retorque checks that it stayed tight.
* every stage: the shop's own active items for it (ShopChecklistItem), and any retired
  one that was marked at this stage (so a mark never drops out of the record).

Each generated item carries a `basis`: what the item is checked against, as recorded now
("fuse 15 A"). A mark keeps the basis it was given on; when the circuit later records
something else, the mark no longer counts and the item shows as changed since marked.
"""

from __future__ import annotations

import copy
from collections.abc import Callable
from dataclasses import dataclass

from django.core.exceptions import ValidationError
from django.db import IntegrityError, transaction
from django.utils import timezone

from circuits.models import Circuit, Termination
from circuits.rules.slack import slack
from circuits.tags import natural_by_tag
from inspections.models import AuditEvent, ChecklistMark, ShopChecklistItem, Stage, TorqueRecord
from inspections.services.common import (
    Errors,
    add_error,
    audit,
    check_photo,
    clean_client_key,
    clean_text,
    raise_if,
    require_perm,
    shared_stage,
    stage_name,
)
from inspections.services.queries import check_soak, current_readings
from inspections.services.status import check_unlocked
from inspections.units import format_number, format_torque

MARK_PERM = "inspections.add_checklistmark"
MANAGE_PERM = "inspections.manage_checklist"
MAX_NOTE = 1000
MIN_NOTE = 3
TORQUE = "torque"
SHOP = "shop"
RESULT_WORDS = {"pass": "pass", "fail": "fail", "na": "not applicable"}


@dataclass
class ChecklistItem:
    key: str
    kind: str  # torque, protection, colours, labels, chafe, service_loop, shop
    text: str
    basis: str = ""
    termination: Termination | None = None
    circuit: Circuit | None = None
    shop_item: ShopChecklistItem | None = None
    mark: ChecklistMark | None = None  # the latest mark of this item at this stage
    reading: TorqueRecord | None = None  # torque items: the current reading

    @property
    def derived(self) -> bool:
        """Follows the torque records; not marked by hand."""
        return self.kind == TORQUE

    @property
    def generated(self) -> bool:
        return self.kind != SHOP

    @property
    def current_mark(self) -> ChecklistMark | None:
        """The latest mark, if it was given on what the record says now."""
        if self.mark is not None and self.mark.item_basis == self.basis:
            return self.mark
        return None

    @property
    def changed_since_marked(self) -> bool:
        return self.mark is not None and self.current_mark is None

    @property
    def state(self) -> str:
        """pass, fail, na, open (not marked or read yet) or changed (marked, but the
        record has changed since)."""
        if self.derived:
            if self.reading is None:
                return "open"
            return "pass" if self.reading.within_tolerance else "fail"
        mark = self.current_mark
        if mark is None:
            return "changed" if self.changed_since_marked else "open"
        return mark.result

    @property
    def marked(self) -> bool:
        return self.state in ("pass", "fail", "na")

    @property
    def done(self) -> bool:
        """Passed or not applicable: nothing left to do for it."""
        return self.state in ("pass", "na")


# --- the generated items ------------------------------------------------------------------


def _colours_basis(circuit: Circuit) -> str:
    parts = []
    names = (
        ("colour_a", "line" if circuit.is_ac else "positive"),
        ("colour_b", "neutral" if circuit.is_ac else "negative"),
        ("colour_earth", "earth"),
    )
    for field, what in names:
        if getattr(circuit, field):
            parts.append(f"{getattr(circuit, f'get_{field}_display')().lower()} {what}")
    if circuit.splice and circuit.colour_after_splice:
        parts.append(f"{circuit.get_colour_after_splice_display().lower()} after the splice")
    if circuit.tape_remarked:
        parts.append("re-marked with tape")
    return ", ".join(parts) or "no colours recorded"


def _slack_asks(circuit: Circuit) -> bool:
    """Whether the slack rule asks this run for a service loop. The rule is asked itself,
    as if the loop were not confirmed yet: confirming it on the circuit is the record,
    the checklist is where someone looks that it is really there."""
    probe = copy.copy(circuit)
    probe.service_loop_confirmed = False
    return bool(slack([], [probe], None))


def _circuit_items(circuit: Circuit) -> list[ChecklistItem]:
    tag = circuit.tag
    items = []
    protection = circuit.protection  # its one home: a protection device, or its own
    if protection.fitted:
        rating = (
            f"{format_number(protection.rating_a, 1)} A"
            if protection.rating_a is not None
            else "no rating recorded"
        )
        kind = Circuit.ProtectionType(protection.kind).label.lower()
        where = f" in {protection.device.name}" if protection.device is not None else ""
        basis = f"{kind} {rating}{where}"
        items.append(
            ChecklistItem(
                key=f"circuit:{circuit.pk}:protection",
                kind="protection",
                text=f"{tag}: protection fitted and rated as recorded ({basis})",
                basis=basis,
                circuit=circuit,
            )
        )
    colours = _colours_basis(circuit)
    items.append(
        ChecklistItem(
            key=f"circuit:{circuit.pk}:colours",
            kind="colours",
            text=f"{tag}: conductor colours as recorded ({colours})",
            basis=colours,
            circuit=circuit,
        )
    )
    items.append(
        ChecklistItem(
            key=f"circuit:{circuit.pk}:labels",
            kind="labels",
            text=f"{tag}: wire labels fitted at both ends, reading {tag}",
            basis=tag,
            circuit=circuit,
        )
    )
    items.append(
        ChecklistItem(
            key=f"circuit:{circuit.pk}:chafe",
            kind="chafe",
            text=f"{tag}: chafe protection where the run passes through bulkheads",
            circuit=circuit,
        )
    )
    if _slack_asks(circuit):
        ends = (
            f"{circuit.from_device.get_mounting_display().lower()} to"
            f" {circuit.to_device.get_mounting_display().lower()}"
        )
        items.append(
            ChecklistItem(
                key=f"circuit:{circuit.pk}:service_loop",
                kind="service_loop",
                text=f"{tag}: service loop where the run crosses from {ends}",
                basis=ends,
                circuit=circuit,
            )
        )
    return items


def _torque_text(termination: Termination) -> tuple[str, str]:
    if termination.torque_value is None:
        spec = "no torque spec yet"
    else:
        spec = (
            f"{format_torque(termination.torque_value, termination.torque_unit)}"
            f" ±{format_number(termination.torque_tolerance_pct, 1)} %"
        )
    return f"{termination}: torqued to {spec}", spec


def _latest_marks(stage: Stage) -> dict[str, ChecklistMark]:
    latest: dict[str, ChecklistMark] = {}
    for mark in ChecklistMark.objects.filter(stage=stage).select_related("marked_by"):
        latest[mark.item_key] = mark  # ordered by marked_at, pk: the last one wins
    return latest


# Further sources of items, each `source(stage) -> [ChecklistItem]`, registered by the apps
# that build on these records (the shop rules of insights, from its AppConfig.ready), so
# that inspections imports none of them. Their items come after the shop's own.
ITEM_SOURCES: list[Callable[[Stage], list[ChecklistItem]]] = []


def checklist_item_source(source: Callable[[Stage], list[ChecklistItem]]):
    """Register a further source of checklist items (once, however often it is called)."""
    if source not in ITEM_SOURCES:
        ITEM_SOURCES.append(source)
    return source


def checklist_items_for(*, stage: Stage, with_torque: bool = True) -> list[ChecklistItem]:
    """The stage's checklist, generated items first (torque per termination, then the
    circuit checks by tag), then the shop's own in their order, each with its latest mark
    (or, for torque items, its current reading). `with_torque` False leaves out the torque
    items (they follow the readings, for a reader that prints the readings themselves)."""
    marks = _latest_marks(stage)
    items: list[ChecklistItem] = []
    if stage.takes_torque_readings and with_torque:
        readings = current_readings(stage)
        terminations = (
            Termination.objects.filter(circuit__job=stage.job_id)
            .select_related("circuit")
            .order_by("circuit__tag", "end", "polarity", "conductor_index")
        )
        for termination in terminations:
            text, spec = _torque_text(termination)
            items.append(
                ChecklistItem(
                    key=f"torque:{termination.pk}",
                    kind=TORQUE,
                    text=text,
                    basis=spec,
                    termination=termination,
                    reading=readings.get(termination.pk),
                )
            )
    if stage.kind == Stage.Kind.FIRST_INSTALL:
        for circuit in natural_by_tag(Circuit.objects.filter(job=stage.job_id).for_schedule()):
            items.extend(_circuit_items(circuit))
    marked_shop_items = {mark.shop_item_id for mark in marks.values() if mark.shop_item_id}
    for shop_item in ShopChecklistItem.objects.filter(stage_kind=stage.kind):
        if shop_item.active or shop_item.pk in marked_shop_items:
            items.append(
                ChecklistItem(
                    key=shop_item.key, kind=SHOP, text=shop_item.text, shop_item=shop_item
                )
            )
    for source in ITEM_SOURCES:
        items.extend(source(stage))
    for item in items:
        if not item.derived:
            item.mark = marks.get(item.key)
    return items


# --- marking ------------------------------------------------------------------------------


def _snapshot(mark: ChecklistMark | None) -> dict | None:
    if mark is None:
        return None
    return {
        "item": mark.item_text,
        "basis": mark.item_basis,
        "result": mark.result,
        "note": mark.note,
        "by": mark.marked_by.get_username(),
        "at": mark.marked_at.isoformat(),
        "photo": mark.photo.name if mark.photo else "",
    }


def _clean_result(result: object, errors: Errors) -> str | None:
    text = str(result or "").strip().lower().replace("/", "").replace(" ", "_")
    text = {"not_applicable": "na", "notapplicable": "na"}.get(text, text)
    if text not in ChecklistMark.Result.values:
        add_error(errors, "result", "Mark the item pass, fail or not applicable.")
        return None
    return text


def _insert_once(mark: ChecklistMark) -> tuple[ChecklistMark, bool]:
    try:
        with transaction.atomic():
            mark.save()
    except IntegrityError:
        stored = ChecklistMark.objects.filter(client_key=mark.client_key).first()
        if stored is None:
            raise
        return stored, False
    return mark, True


def _refuse_if_different(stored: ChecklistMark, given: dict) -> ChecklistMark:
    if any(getattr(stored, name) != value for name, value in given.items()):
        raise ValidationError(
            {
                "client_key": "This entry's key was already used for another mark; nothing"
                " was changed. Reload the page and mark the item again."
            }
        )
    return stored


def checklist_item_mark(
    *,
    stage: Stage,
    item_key: str,
    result: object,
    note: str = "",
    by,
    photo=None,
    client_key: object,
) -> ChecklistMark:
    """Mark one item pass, fail or not applicable (a note says why for the last two).
    Stored once per key the page made, however often it arrives; marking an item again
    is a new mark, and the latest counts. Torque items are refused: they follow the
    readings."""
    require_perm(by, MARK_PERM, "Only technicians and leads mark checklist items.")
    key = clean_client_key(client_key)
    errors: Errors = {}
    result = _clean_result(result, errors)
    note = clean_text(note, field="note", what="note", limit=MAX_NOTE, errors=errors)
    if result in ("fail", "na") and len(note) < MIN_NOTE:
        why = "fails" if result == "fail" else "does not apply"
        add_error(errors, "note", f"Say in the note why the item {why}.")
    item_key = str(item_key or "").strip()
    with transaction.atomic():
        stage = shared_stage(stage.pk)
        given = {
            "stage_id": stage.pk,
            "item_key": item_key,
            "result": result,
            "note": note,
            "marked_by_id": by.pk,
        }
        stored = ChecklistMark.objects.filter(client_key=key).first()
        if stored is not None:
            return _refuse_if_different(stored, given)
        check_unlocked(stage.job, errors)
        name = stage_name(stage)
        if not stage.accepts_work:
            add_error(
                errors,
                "stage",
                f"The {name} stage is {stage.get_state_display().lower()}; its checklist is"
                " marked only while it is open.",
            )
        else:
            check_soak(stage, at=timezone.now(), errors=errors)
        items = {item.key: item for item in checklist_items_for(stage=stage)}
        item = items.get(item_key)
        if item is None:
            add_error(
                errors,
                "item_key",
                f"The {name} checklist has no such item ({item_key or 'none given'});"
                " reload the page.",
            )
        elif item.derived:
            add_error(
                errors,
                "item_key",
                f"Torque items follow the readings: record a reading of {item.termination}"
                " instead.",
            )
        photo = check_photo(photo, errors)
        raise_if(errors)
        mark = ChecklistMark(
            stage=stage,
            item_key=item_key,
            item_text=item.text[:300],
            item_basis=item.basis[:300],
            shop_item=item.shop_item,
            result=result,
            note=note,
            photo=photo or "",
            marked_by=by,
            client_key=key,
        )
        mark, created = _insert_once(mark)
        if not created:
            return _refuse_if_different(mark, given)
        audit(
            job=stage.job,
            kind=AuditEvent.Kind.ITEM_TICKED,
            actor=by,
            summary=f"{item.text}: {RESULT_WORDS[result]}" + (f" ({note})" if note else ""),
            before=_snapshot(item.mark),
            after=_snapshot(mark),
            subject=mark,
        )
    return mark


# --- the shop's own list ------------------------------------------------------------------


def shop_checklist_item_save(
    *,
    by,
    stage_kind: object,
    text: str,
    order: object = None,
    active: bool = True,
    item: ShopChecklistItem | None = None,
) -> ShopChecklistItem:
    """Add an item to the shop's list for a stage, or change one (`item`). Items are
    retired (active=False), never deleted here: marks refer to them."""
    require_perm(by, MANAGE_PERM, "Only the office keeps the shop's checklist.")
    errors: Errors = {}
    try:
        kind = Stage.Kind(int(stage_kind))
    except (TypeError, ValueError):
        kind = None
        add_error(errors, "stage_kind", "Choose the stage the item belongs to.")
    text = clean_text(text, field="text", what="item's text", limit=200, errors=errors)
    if not text:
        add_error(errors, "text", "Write what is to be checked.")
    position = None
    if order not in (None, ""):
        try:
            position = int(order)
            if position < 0 or position > 100000:
                raise ValueError
        except (TypeError, ValueError):
            add_error(errors, "order", "Give the position as a whole number from 0.")
    raise_if(errors)
    with transaction.atomic():
        if item is None:
            item = ShopChecklistItem(stage_kind=kind)
            if position is None:
                last = ShopChecklistItem.objects.filter(stage_kind=kind).order_by("-order").first()
                position = (last.order + 10) if last is not None else 10
        else:
            item = ShopChecklistItem.objects.select_for_update().get(pk=item.pk)
            item.stage_kind = kind
        item.text = text
        if position is not None:
            item.order = position
        item.active = bool(active)
        item.full_clean()
        item.save()
    return item


__all__ = [
    "ChecklistItem",
    "checklist_item_mark",
    "checklist_item_source",
    "checklist_items_for",
    "shop_checklist_item_save",
]
