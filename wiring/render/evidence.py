"""The inspections half of the record's data: the conductor ends and their torque log
(first install beside retorque), the heat-cycle run and thermal check, the checklist
outcomes, photos, sign-offs and reopen events. Part of `record_data` (data.py); the same
conventions (decimal strings as stored, ISO times). Nothing here writes."""

from __future__ import annotations

import base64

from circuits.models import Termination
from inspections.models import AuditEvent, ChecklistMark, SignOff, Stage, TorqueRecord
from inspections.services import checklist_items_for, current_readings, latest_run
from inspections.services.review import thermal_lines
from inspections.units import format_torque

RESULT_WORDS = {"pass": "pass", "fail": "fail", "na": "not applicable", "open": "open"}
RESULT_WORDS["changed"] = "changed since marked"


def _text(value) -> str | None:
    from wiring.render.data import text

    return text(value)


def _when(moment) -> str | None:
    return None if moment is None else moment.isoformat()


def _name(user) -> str | None:
    if user is None:
        return None
    return user.get_full_name() or user.get_username()


def termination_label(t: Termination) -> str:
    """'D-01 from +' (with '#2' for the second conductor in parallel)."""
    index = f" #{t.conductor_index}" if t.circuit.parallel > 1 else ""
    return f"{t.circuit.tag} {t.end} {t.get_polarity_display()}{index}"


def _termination(t: Termination) -> dict:
    return {
        "label": termination_label(t),
        "circuit": t.circuit.tag,
        "end": t.end,
        "polarity": t.polarity,
        "conductor_index": t.conductor_index,
        "device": t.device.name,
        "terminal": t.terminal.name if t.terminal else "",
        "kind": t.kind,
        "kind_label": t.get_kind_display(),
        "stud_size": t.stud_size,
        "torque_value": _text(t.torque_value),
        "torque_unit": t.torque_unit,
        "torque_tolerance_pct": _text(t.torque_tolerance_pct),
        "torque_source": t.torque_source,
        "torque_source_label": t.get_torque_source_display(),
        "torque_source_note": t.torque_source_note,
        "spec_display": (
            f"{format_torque(t.torque_value, t.torque_unit)} ±{t.torque_tolerance_pct:g} %"
            if t.torque_value is not None
            else "not set"
        ),
    }


def _reading(record: TorqueRecord | None, *, loose: bool) -> dict | None:
    if record is None:
        return None
    return {
        "value": _text(record.value),
        "unit": record.unit,
        "display": record.value_display,
        "value_nm": round(record.value_nm, 3),
        "spec_display": record.spec_display,
        "spec_nm": round(record.spec_nm, 3),
        "result": record.result,
        "result_label": record.get_result_display(),
        # Found loose at any current reading of this stage, not only the latest: the
        # connection is re-torqued and read again, and the fact it was loose must stay.
        "found_loose": loose,
        "corrected": record.is_correction,
        "correction_reason": record.correction_reason,
        "wrench": record.wrench.code,
        "wrench_calibration_due": _when(record.wrench.calibration_due),
        "technician": _name(record.technician),
        "recorded_at": _when(record.recorded_at),
        "note": record.note,
    }


def _loose_ids(stage: Stage | None) -> set[int]:
    if stage is None:
        return set()
    return set(
        TorqueRecord.objects.current()
        .filter(stage=stage, found_loose=True)
        .values_list("termination_id", flat=True)
    )


def _torque(job, stages: dict[int, Stage], terminations: list[Termination]) -> list[dict]:
    first = stages.get(Stage.Kind.FIRST_INSTALL)
    second = stages.get(Stage.Kind.RETORQUE)
    first_now = current_readings(first) if first else {}
    second_now = current_readings(second) if second else {}
    loose_first, loose_second = _loose_ids(first), _loose_ids(second)
    rows = []
    for t in terminations:
        a = _reading(first_now.get(t.pk), loose=t.pk in loose_first)
        b = _reading(second_now.get(t.pk), loose=t.pk in loose_second)
        moved_pct = None
        if a and b:
            # How far the retorque reading sits from the first, as a share of the spec.
            moved_pct = round(100 * (b["value_nm"] - a["value_nm"]) / a["spec_nm"], 1)
        rows.append(
            {
                "termination": termination_label(t),
                "circuit": t.circuit.tag,
                "spec": _termination(t)["spec_display"],
                "first_install": a,
                "retorque": b,
                "moved_pct": moved_pct,
            }
        )
    return rows


def _heat(job) -> tuple[dict | None, list[dict]]:
    run = latest_run(job)
    heat = None
    if run is not None:
        heat = {
            "started_at": _when(run.started_at),
            "ended_at": _when(run.ended_at),
            "peak_current_a": _text(run.peak_current_a),
            "ambient_c": _text(run.ambient_c),
            "logged_by": _name(run.logged_by),
            "notes": run.notes,
        }
    thermal = []
    for line in thermal_lines(job):
        reading, assessment = line.result.reading, line.result.assessment
        thermal.append(
            {
                "termination": termination_label(reading.termination),
                "temperature_c": _text(reading.temperature_c),
                "rise_over_ambient_c": round(assessment.rise_over_ambient_c, 1),
                "rise_over_similar_c": None
                if assessment.rise_over_similar_c is None
                else round(assessment.rise_over_similar_c, 1),
                "class": line.result.thermal_class.name.lower(),
                "class_label": line.result.thermal_class.label,
                "blocks": line.result.blocks_retorque,
                "taken_by": _name(reading.taken_by),
                "taken_at": _when(reading.taken_at),
                "note": reading.note,
                "waiver": None
                if line.waiver is None
                else {
                    "reason": line.waiver.reason,
                    "lead": _name(line.waiver.lead),
                    "waived_at": _when(line.waiver.waived_at),
                },
                "source": "ANSI/NETA MTS thermographic survey table (from memory)",
            }
        )
    return heat, thermal


def _checklists(stages: dict[int, Stage]) -> list[dict]:
    out = []
    for kind, stage in sorted(stages.items()):
        # The torque items follow the readings, which the torque log prints in full.
        items = [i for i in checklist_items_for(stage=stage, with_torque=False) if not i.derived]
        if not items:
            continue
        rows = []
        for item in items:
            mark = item.mark
            rows.append(
                {
                    "text": item.text,
                    "basis": item.basis,
                    "result": item.state,
                    "result_label": RESULT_WORDS.get(item.state, item.state),
                    "note": mark.note if mark else "",
                    "marked_by": _name(mark.marked_by) if mark else None,
                    "marked_at": _when(mark.marked_at) if mark else None,
                }
            )
        counts = {word: sum(1 for r in rows if r["result"] == word) for word in RESULT_WORDS}
        out.append(
            {
                "stage": kind,
                "stage_label": stage.get_kind_display(),
                "counts": counts,
                "items": rows,
            }
        )
    return out


def _photos(job) -> list[dict]:
    """Photos taken with torque readings and checklist marks, oldest first."""
    found = []
    records = (
        TorqueRecord.objects.current()
        .filter(stage__job=job)
        .exclude(photo="")
        .select_related("termination__circuit", "stage")
    )
    for r in records:
        caption = f"{termination_label(r.termination)}, {r.stage.get_kind_display().lower()}"
        found.append((r.recorded_at, caption, r.photo.name))
    marks = ChecklistMark.objects.filter(stage__job=job).exclude(photo="").select_related("stage")
    for m in marks:
        found.append(
            (m.marked_at, f"{m.item_text} ({m.stage.get_kind_display().lower()})", m.photo.name)
        )
    found.sort(key=lambda f: f[0])
    return [{"caption": c, "file": name, "taken_at": _when(at)} for at, c, name in found]


def _signoffs(job) -> list[dict]:
    rows = []
    for s in SignOff.objects.filter(job=job).order_by("signed_at", "pk"):
        rows.append(
            {
                "kind": s.kind,
                "kind_label": s.get_kind_display(),
                "printed_name": s.printed_name,
                "role": s.role,
                "role_label": s.get_role_display(),
                "meaning": s.meaning,
                "signed_at": _when(s.signed_at),
                "content_sha256": s.content_sha256,
                "signature_png_base64": base64.b64encode(bytes(s.signature_png)).decode("ascii"),
            }
        )
    return rows


def _reopens(job) -> list[dict]:
    events = AuditEvent.objects.filter(job=job, kind=AuditEvent.Kind.REOPEN).order_by("at", "pk")
    return [
        {
            "at": _when(e.at),
            "by": _name(e.actor),
            "reason": (e.after or {}).get("reason", e.summary),
        }
        for e in events.select_related("actor")
    ]


def evidence_data(job) -> dict:
    stages = {s.kind: s for s in Stage.objects.filter(job=job)}
    terminations = list(
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit__from_device", "circuit__to_device", "terminal")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    heat, thermal = _heat(job)
    signoffs = _signoffs(job)
    approvals = [s for s in signoffs if s["kind"] == SignOff.Kind.APPROVAL]
    return {
        "terminations": [_termination(t) for t in terminations],
        "torque_log": _torque(job, stages, terminations),
        "heat_cycle": heat,
        "thermal": thermal,
        "checklists": _checklists(stages),
        "photos": _photos(job),
        "signoffs": signoffs,
        "approval": approvals[-1] if approvals else None,
        "reopens": _reopens(job),
    }
