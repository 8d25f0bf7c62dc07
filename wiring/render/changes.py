"""The record of a return visit shows the change since the last record: per conductor end,
the last record's final reading beside this visit's reading as found at the re-check
(before any re-tightening), with "found loose again" marked by a mark and a word; the
circuits added and removed since; and the connections found hot on the re-check run.

`changes_data(job)` is part of `record_data` (key `changes`, null for a job that is not a
return visit; schema.md). Conventions as the rest of the record: decimal strings as
stored, ISO times; each row also carries its cells as plain text (cells.py says why).
Nothing here writes."""

from __future__ import annotations

from circuits.models import Termination
from circuits.tags import tag_key
from inspections.models import PriorRecord, Stage, TorqueRecord
from inspections.services import current_readings, thermal_results
from inspections.services.return_visit import as_found_loose, end_key, skip_reason
from inspections.units import format_torque, from_nm
from shop.models import Job

LOOSE_AGAIN = "✖ FOUND LOOSE AGAIN"
NOT_READ = "not read as found"


def _when(moment) -> str | None:
    return None if moment is None else moment.isoformat()


def _label(t: Termination) -> str:
    index = f" #{t.conductor_index}" if t.circuit.parallel > 1 else ""
    return f"{t.circuit.tag} {t.end} {t.get_polarity_display()}{index}"


def _last(reading) -> dict | None:
    if reading is None:
        return None
    return {
        "pass": reading.pass_name,
        "value": format(reading.value, "f"),
        "unit": reading.unit,
        "display": format_torque(reading.value, reading.unit),
        "value_nm": round(reading.value_nm, 3),
        "spec_display": reading.spec_display,
        "result": reading.result,
        "found_loose": reading.found_loose,
        "wrench": reading.wrench,
        "technician": reading.technician,
        "recorded_at": _when(reading.recorded_at),
    }


def _as_found(record: TorqueRecord | None, loose: set[int]) -> dict | None:
    if record is None:
        return None
    flagged = record.termination_id in loose
    return {
        "value": format(record.value, "f"),
        "unit": record.unit,
        "display": record.value_display,
        "value_nm": round(record.value_nm, 3),
        "spec_display": record.spec_display,
        "spec_nm": round(record.spec_nm, 3),
        "result": record.result,
        "result_label": record.get_result_display(),
        "found_loose": flagged,
        # Loose again: it turned before the wrench clicked, or read below its band.
        "loose_again": flagged or as_found_loose(record),
        "corrected": record.is_correction,
        "wrench": record.wrench.code,
        "technician": record.technician.get_full_name() or record.technician.get_username(),
        "recorded_at": _when(record.recorded_at),
    }


def _cells(last: dict | None, found: dict | None) -> dict:
    """The row as plain text: the last reading, the as-found one with its marks, the
    change in N·m (mark and word carry the state, never colour alone)."""
    last_text = "no reading in the last record"
    if last:
        loose = " · found loose then" if last["found_loose"] else ""
        last_text = f"{last['display']} at {last['pass']}{loose}\n{last['wrench']}"
    found_text = NOT_READ
    if found:
        marks = [found["display"]]
        if found["loose_again"]:
            marks.append(LOOSE_AGAIN)
        elif found["result"] != "within":
            marks.append(f"▲ {found['result_label'].lower()}")
        else:
            marks.append("✓ within tolerance")
        if found["corrected"]:
            marks.append("✎ corrected")
        found_text = f"{' '.join(marks)}\n{found['wrench']} · {found['technician']}"
    change = "—"
    if last and found:
        # In the unit the connection was read in now, as the technician reads it.
        delta = from_nm(found["value_nm"] - last["value_nm"], found["unit"])
        places = 0 if found["unit"] == "lbf*in" else 1
        sign = "+" if round(delta, places) > 0 else ""
        change = f"{sign}{format_torque(round(delta, places), found['unit'], places)}"
    return {"last_text": last_text, "found_text": found_text, "change_text": change}


def _circuit_changes(job, prior: PriorRecord) -> tuple[list[dict], list[dict]]:
    now = {c.tag: c.name for c in job.circuits.all()}
    then = {c.get("tag"): c.get("name") for c in prior.circuits if c.get("tag")}
    added = [{"tag": tag, "name": now[tag]} for tag in sorted(now.keys() - then, key=tag_key)]
    removed = [
        {"tag": tag, "name": then[tag] or ""} for tag in sorted(then.keys() - now, key=tag_key)
    ]
    return added, removed


def _hot(job) -> list[dict]:
    rows = []
    results = thermal_results(job, recheck=True)
    terminations = Termination.objects.filter(pk__in=results.keys()).select_related("circuit")
    labels = {t.pk: _label(t) for t in terminations}
    for pk, result in sorted(results.items(), key=lambda item: labels.get(item[0], "")):
        if not result.blocks_retorque:
            continue
        rows.append(
            {
                "termination": labels.get(pk, ""),
                "temperature_c": format(result.reading.temperature_c, "f"),
                "class": result.thermal_class.name.lower(),
                "class_label": result.thermal_class.label,
            }
        )
    return rows


def changes_data(job) -> dict | None:
    """The change since the last record, for a return visit; None for any other job."""
    if job.kind != Job.Kind.RETURN_VISIT:
        return None
    prior = PriorRecord.objects.filter(job=job).first()
    recheck = Stage.objects.filter(job=job, kind=Stage.Kind.RECHECK).first()
    found = current_readings(recheck) if recheck is not None else {}
    loose = set()
    if recheck is not None:
        loose = set(
            TorqueRecord.objects.current()
            .filter(stage=recheck, found_loose=True)
            .values_list("termination_id", flat=True)
        )
    last = {r.key: r for r in prior.readings.all()} if prior is not None else {}
    terminations = (
        Termination.objects.filter(circuit__job=job)
        .select_related("circuit")
        .order_by("circuit__tag", "end", "polarity", "conductor_index")
    )
    rows = []
    for t in sorted(terminations, key=lambda t: (tag_key(t.circuit.tag), end_key(t)[1:])):
        a, b = _last(last.get(end_key(t))), _as_found(found.get(t.pk), loose)
        rows.append({"termination": _label(t), "last": a, "as_found": b, **_cells(a, b)})
    added, removed = _circuit_changes(job, prior) if prior is not None else ([], [])
    read = [r for r in rows if r["as_found"]]
    return {
        "follows": None
        if prior is None
        else {
            "source": prior.source,
            "job_number": prior.job_number,
            "shop_name": prior.shop_name,
            "approved_at": _when(prior.approved_at),
        },
        "recheck_state": recheck.state if recheck is not None else None,
        "counts": {
            "ends": len(rows),
            "read_as_found": len(read),
            "loose_again": sum(1 for r in read if r["as_found"]["loose_again"]),
            "out_of_tolerance": sum(1 for r in read if r["as_found"]["result"] != "within"),
        },
        "rows": rows,
        "added_circuits": added,
        "removed_circuits": removed,
        "hot_at_recheck": _hot(job),
        "not_needed_reason": skip_reason(job),
    }
