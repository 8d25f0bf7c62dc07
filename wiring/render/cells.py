"""The record's long tables and lists as plain text cells.

Why plain text: WeasyPrint's layout cost grows with every inline element and every forced
line break (`<br>`) inside a table cell far more than with the text itself; on a 600-end
torque log the nested `<strong>`/`<span>`/`<br>` markup cost several times what the
words did. So each cell here is ONE string, its lines joined by "\\n" and printed with
`white-space: pre-line` (record.css), the first line made bold by `::first-line` where
the cell leads with its value. Every state stays a mark and a word in the text itself
(✖ FOUND LOOSE, ▲ low, ✎ corrected), never colour or styling alone.

The schedule names the source of each value by a key ([1], [2] ...) into the list of
sources printed under the table: the same dozen source names repeated on every circuit
made the schedule several times longer without telling the reader anything new.

Input is the `readable` copy of record_data (times carry their `_text` twin).
"""

from __future__ import annotations

from django.template.defaultfilters import floatformat

NOT_READ = "not read"


class SourceKeys:
    """Numbers each distinct source name in order of first use: "[1]", "[2]" ..."""

    def __init__(self) -> None:
        self._keys: dict[str, int] = {}

    def __call__(self, source: str) -> str:
        if not source:
            return ""
        number = self._keys.setdefault(source, len(self._keys) + 1)
        return f"[{number}]"

    def legend(self) -> list[dict]:
        return [{"key": f"[{n}]", "source": s} for s, n in self._keys.items()]


def _lines(*parts: str | None) -> str:
    return "\n".join(p for p in parts if p)


def _schedule_row(c: dict, key: SourceKeys) -> dict:
    s = c["sizing"]
    route = f"{c['from_device']}{' ' + c['from_terminal'] if c['from_terminal'] else ''}"
    route += f" → {c['to_device']}{' ' + c['to_terminal'] if c['to_terminal'] else ''}"
    size = c["size_label"] + (f" × {c['parallel']} in parallel" if c["parallel"] > 1 else "")
    build = (
        f"{c['construction_label']}{', tinned' if c['tinned'] else ''}, "
        f"{c['insulation_c']} °C insulation; {c['conductors_label'].lower()}"
    )
    colours = " / ".join(c["colour_labels"].values()) or "not recorded"
    current = _lines(
        f"{floatformat(c['design_current_a'], '-2')} A",
        "continuous" if c["continuous"] else None,
        f"at {floatformat(c['nominal_voltage'], '-1')} V",
    )
    if c["protection_type"] == "none":
        protection = "None"
    else:
        protection = (
            f"{floatformat(c['protection_a'], '-1')} A {c['protection_type_label'].lower()}"
        ) + (f" in {c['protection_device']}" if c.get("protection_device") else "")
    row = {
        "tag": _lines(c["tag"], c["name"], c["role_label"]),
        "route": route,
        "conductor": _lines(size, build),
        "colours": _lines(
            *[f"{t['conductor']} {t['text']}" for t in c.get("colour_texts", [])] or [colours],
            "spliced" if c["splice"] else None,
        ),
        "length": c["length_display"],
        "current": current,
        "over_drop": False,
    }
    if s is None:
        row["ampacity"] = _lines("—", c["sizing_error"] or "not sized")
        row["drop"] = "—"
        row["protection"] = protection
        return row
    factors = [
        f"× {floatformat(f['value'], '-2')} {f['name']} {key(f['source'])}" for f in s["factors"]
    ]
    row["ampacity"] = _lines(
        f"{floatformat(s['ampacity_a'], '-1')} A {key(s['table_source'])}", *factors
    )
    over = s["voltage_drop_pct"] > s["drop_limit_pct"]
    limit = floatformat(s["drop_limit_pct"], "-1")
    row["over_drop"] = over
    row["drop"] = _lines(
        f"{floatformat(s['voltage_drop_pct'], 1)} %" + (f" ✖ over {limit} %" if over else ""),
        None if over else f"limit {limit} %",
        f"{key(s['drop_source'])} {key(s['resistance_source'])}",
    )
    row["protection"] = _lines(protection, key(s["protection_source"]))
    return row


def schedule_rows(circuits: list[dict]) -> tuple[list[dict], list[dict]]:
    """The schedule's rows and the legend of the sources their keys name."""
    key = SourceKeys()
    rows = [_schedule_row(c, key) for c in circuits]
    return rows, key.legend()


class WrenchKeys:
    """Numbers each wrench, with the calibration due date it had when it was used, in
    order of first use: "W1", "W2" ... A shop reads hundreds of ends with two or three
    wrenches; the same wrench and date on every reading made each row a line taller."""

    def __init__(self) -> None:
        self._keys: dict[tuple[str, str], int] = {}

    def __call__(self, wrench: str, due: str) -> str:
        number = self._keys.setdefault((wrench, due), len(self._keys) + 1)
        return f"W{number}"

    def legend(self) -> list[dict]:
        return [
            {"key": f"W{n}", "wrench": wrench, "due": due or "not recorded"}
            for (wrench, due), n in self._keys.items()
        ]


def reading_text(x: dict | None, wrench_key: WrenchKeys) -> str:
    """One torque reading: the value, its marks and the wrench's key first (bold by
    ::first-line), then technician and time, a correction's reason, a note."""
    if not x:
        return NOT_READ
    marks = [x["display"]]
    if x["result"] != "within":
        marks.append(f"▲ {x['result_label'].lower()}")
    if x["found_loose"]:
        marks.append("✖ FOUND LOOSE")
    if x["corrected"]:
        marks.append("✎ corrected")
    key = wrench_key(x["wrench"], x.get("wrench_calibration_due_text") or "")
    return _lines(
        f"{' '.join(marks)} · {key}",
        f"{x['technician']} · {x['recorded_at_text']}",
        f"reason: {x['correction_reason']}" if x["corrected"] else None,
        x["note"],
    )


def torque_rows(torque_log: list[dict]) -> tuple[list[dict], list[dict]]:
    """The torque log's rows and the legend of the wrenches their keys name."""
    wrench_key = WrenchKeys()
    rows = []
    for row in torque_log:
        loose = bool(row["retorque"] and row["retorque"]["found_loose"])
        moved = row["moved_pct"]
        rows.append(
            {
                "loose": loose,
                # The spec shares the end's cell: one cell fewer on each of hundreds of rows.
                "end": _lines(("✖ " if loose else "") + row["termination"], row["spec"]),
                "first": reading_text(row["first_install"], wrench_key),
                "retorque": reading_text(row["retorque"], wrench_key),
                "change": "—" if moved is None else f"{floatformat(moved, 1)} %",
            }
        )
    return rows, wrench_key.legend()


def thermal_rows(thermal: list[dict]) -> list[dict]:
    rows = []
    for t in thermal:
        rise = f"{floatformat(t['rise_over_ambient_c'], 1)} °C over ambient"
        if t["rise_over_similar_c"] is not None:
            rise += f"\n{floatformat(t['rise_over_similar_c'], 1)} °C over similar"
        result = ("▲ " if t["blocks"] else "") + t["class_label"]
        w = t["waiver"]
        if w:
            result += f"\nwaived by {w['lead']}, {w['waived_at_text']}: “{w['reason']}”"
        rows.append(
            {
                "blocks": t["blocks"],
                "end": t["termination"],
                "temperature": f"{floatformat(t['temperature_c'], 1)} °C",
                "rise": rise,
                "result": result,
                "taken": _lines(f"{t['taken_by']} · {t['taken_at_text']}", t["note"]),
            }
        )
    return rows


CHECK_MARKS = {"fail": "✖ fail", "na": "– not applicable"}


def checklist_exceptions(items: list[dict]) -> list[str]:
    """Each item that did not pass, as one line: its mark and word, text, basis, note,
    who marked it and when."""
    out = []
    for item in items:
        if item["result"] == "pass":
            continue
        line = CHECK_MARKS.get(item["result"], f"○ {item['result_label']}") + " " + item["text"]
        if item["basis"]:
            line += f" ({item['basis']})"
        if item["note"]:
            line += f": “{item['note']}”"
        if item["marked_by"]:
            line += f" · {item['marked_by']}, {item['marked_at_text']}"
        out.append(line)
    return out


SEVERITY_MARKS = {"blocking": "✖ Blocking", "warning": "▲ Warning"}


def finding_text(f: dict) -> str:
    head = SEVERITY_MARKS.get(f["severity"], "● Note")
    if f["waived"]:
        head += " · waived"
    head += f" · {f['subject']} · {f['code']}"
    if f["waiver"]:
        w = f["waiver"]
        tail = f"Waived by {w['lead']} on {w['granted_at_text']}: “{w['reason']}”"
    elif f["lapse_note"]:
        tail = f"Open again: {f['lapse_note']}"
    else:
        tail = None
    return _lines(head, f["message"], f"Source: {f['source']}", tail)
