"""The one-line diagram of a job's electrical system, drawn as one self-contained SVG.

Devices sit in tiers: sources at the top, distribution in the middle, loads at the
bottom (loads wrap onto more rows when wide), all inside a dashed outline, the vehicle's
boundary; an external supply (a pedestal, a generator, a building socket) sits above it,
outside the vehicle, and its shore cord crosses the boundary. A circuit is an orthogonal
line: it leaves the upper device's bottom edge, crosses the channel below that row on a
lane of its own and enters the lower device from above, where the band over the device
carries its label (tag, size × parallel, protection, worst finding). A circuit between
two devices of one row dips below the row on a labelled lane. A line that must pass a
whole row goes down through a gap between its boxes.

Plain Python: the SVG is text with every piece of data escaped, styled by attributes only
(no stylesheet, font or file to fetch), so the same markup works inline on a page, as a
standalone file and inside a PDF; the layout depends on the records alone, so a system
always draws the same way.
"""

from __future__ import annotations

from collections import defaultdict
from collections.abc import Callable
from xml.sax.saxutils import escape, quoteattr

from circuits.diagram_layout import (
    BAND_H,
    BOX_H,
    DISTRIBUTION,
    LABEL_CHARS,
    MARGIN,
    OUTSIDE,
    SOURCES,
    TIER_NAMES,
    _Box,
    _layout,
    _Run,
)
from circuits.models import Circuit, Device
from circuits.sizing import CAUTION
from circuits.system import SystemFinding, SystemReport

INK, MUTED, PAPER, TIER_FILL = "#14181f", "#4a5260", "#ffffff", "#f1f3f6"

Link = Callable[[Circuit | Device], str | None]


def _n(value: float) -> str:
    return f"{value:.1f}".rstrip("0").rstrip(".")


def _el(name: str, attrs: dict[str, object], body: str | None = None) -> str:
    """One element; attribute names use '_' for '-', every value is escaped."""
    parts = "".join(
        f" {key.replace('_', '-')}={quoteattr(_n(v) if isinstance(v, float) else str(v))}"
        for key, v in attrs.items()
        if v is not None
    )
    return f"<{name}{parts}/>" if body is None else f"<{name}{parts}>{body}</{name}>"


def _text(x: float, y: float, content: str, *, size: int = 12, **attrs) -> str:
    return _el("text", {"x": x, "y": y, "font_size": size, "fill": INK, **attrs}, escape(content))


def _clip(text: str, chars: int) -> str:
    return text if len(text) <= chars else text[: max(chars - 1, 1)] + "…"


def _wrap(text: str, chars: int, lines: int) -> list[str]:
    out: list[str] = []
    for word in text.split():
        if out and len(out[-1]) + 1 + len(word) <= chars:
            out[-1] += " " + word
        else:
            out.append(word)
    if len(out) > lines:
        out = out[: lines - 1] + [" ".join(out[lines - 1 :])]
    return [_clip(line, chars) for line in out] or [""]


def size_text(circuit: Circuit) -> str:
    """Trade notation with the number in parallel, e.g. '4/0 AWG ×2'."""
    return circuit.size_label + (f" ×{circuit.parallel}" if circuit.parallel > 1 else "")


def protection_text(circuit: Circuit) -> str:
    """'250 A fuse', '30 A breaker', 'no protection', from the protection's one home (a
    device's rating or the circuit's own); the device is named in the line's tooltip."""
    protection = circuit.protection
    if not protection.fitted or protection.rating_a is None:
        return "no protection"
    kind = "breaker" if protection.kind == Circuit.ProtectionType.BREAKER else "fuse"
    return f"{protection.rating_a.normalize():f} A {kind}"


def _mark(findings: list[SystemFinding], error: str | None) -> tuple[str, str] | None:
    """The marker a circuit or device carries, (shape, words), from its worst open finding."""
    open_ = [f for f in findings if not f.waived]
    if open_:
        worst = min(open_, key=lambda f: f.rank)
        more = f" +{len(open_) - 1}" if len(open_) > 1 else ""
        return worst.severity, worst.severity.upper() + more
    if error:
        return "unsized", "NOT SIZED"
    return ("waived", "waived") if findings else None


# shape -> (outline around the centre, fill, outline colour, letter, letter colour); each
# finding level has its own shape and letter, so nothing depends on colour alone.
_MARKERS = {
    "blocking": ("0,-8 8,0 0,8 -8,0", "#a3161b", "#a3161b", "!", PAPER),
    "warning": ("0,-8 8,6 -8,6", "#fff1c9", "#8a5a00", "!", "#5c3d00"),
    "unsized": ("0,-8 8,6 -8,6", "#fff1c9", "#8a5a00", "?", "#5c3d00"),
    "note": ("-7,-4 -4,-7 4,-7 7,-4 7,4 4,7 -4,7 -7,4", PAPER, "#0b5cad", "i", "#0b5cad"),
    "waived": ("-6,-6 6,-6 6,6 -6,6", PAPER, MUTED, "w", MUTED),
}


def _marker(shape: str, cx: float, cy: float) -> str:
    outline, fill, stroke, letter, ink = _MARKERS[shape]
    points = " ".join(
        f"{_n(cx + float(dx))},{_n(cy + float(dy))}"
        for dx, dy in (pair.split(",") for pair in outline.split())
    )
    dash = "2 2" if shape == "waived" else None
    attrs = {"points": points, "fill": fill, "stroke": stroke, "stroke_dasharray": dash}
    dy = 5 if outline.startswith("0,-8 8,6") else 4
    body = _el("polygon", attrs) + _text(
        cx, cy + dy, letter, size=10, fill=ink, font_weight="bold", text_anchor="middle"
    )
    return _el("g", {"class": f"mark mark-{shape}", "stroke_width": 1.5}, body)


# ---- layout ------------------------------------------------------------------------


def _path(run: _Run) -> str:
    top = run.upper.bottom
    if run.same_row:
        lane = run.lanes[run.upper.row + 1]
        a, b = run.ports["upper"], run.ports["lower"]
        return f"M{_n(a)} {_n(top)}V{_n(lane)}H{_n(b)}V{_n(top)}"
    xs = [run.ports["upper"], *run.xs, run.ports["lower"]]
    d = f"M{_n(xs[0])} {_n(top)}"
    for i, channel in enumerate(range(run.upper.row + 1, run.lower.row + 1)):
        if channel in run.lanes:
            d += f"V{_n(run.lanes[channel])}H{_n(xs[i + 1])}"
    return d + f"V{_n(run.lower.y)}"


def _stroke(run: _Run) -> dict[str, object]:
    c = run.circuit
    dash = None
    if c.role == Circuit.Role.BONDING or c.conductors == Circuit.Conductors.EARTH:
        dash = "2 4"
    elif c.is_ac:
        dash = "10 5"
    # An open blocking finding also thickens the line.
    width = 3.5 if any(f.open_blocking for f in run.sizing.findings) else 2
    return {"stroke": INK, "stroke_width": width, "stroke_dasharray": dash, "fill": "none"}


def _title(run: _Run) -> str:
    c = run.circuit
    lines = [
        f"{c.tag} {c.name}",
        f"{c.from_device.name} → {c.to_device.name}",
        f"{size_text(c)}, {c.protection.words}",
    ]
    lines += [f"{who}: {text}" for who, text in c.colour_texts()]
    if run.sizing.error:
        lines.append(f"Not sized: {run.sizing.error}")
    for f in run.sizing.findings:
        lines.append(f"{'waived ' if f.waived else ''}{f.severity}: {f.code} {f.message}")
    return _el("title", {}, escape("\n".join(lines)))


def _linked(obj: Circuit | Device, body: str, link: Link | None) -> str:
    href = link(obj) if link else None
    return _el("a", {"href": href, "xlink:href": href}, body) if href else body


def _run_label(run: _Run, canvas_w: float) -> str:
    c = run.circuit
    mark = _mark(run.sizing.findings, run.sizing.error)
    words = [c.tag, size_text(c), protection_text(c)] + ([mark[1]] if mark else [])
    if run.same_row:  # one line on the lane, on a light ground over crossing lines
        rest, y = " · " + " · ".join(words[1:]), run.lanes[run.upper.row + 1]
        tag_w = len(c.tag) * 7.4
        width = tag_w + len(rest) * 6.6 + (22 if mark else 8)
        x = (run.ports["upper"] + run.ports["lower"]) / 2 - width / 2
        x = max(MARGIN / 2, min(x, canvas_w - MARGIN / 2 - width))  # stays on the canvas
        ground = {"x": x, "y": y - 17, "width": width, "height": 15, "rx": 3}
        out = _el("rect", {**ground, "fill": PAPER, "fill_opacity": 0.92})
        out += _marker(mark[0], x + 9, y - 9) if mark else ""
        x += 20 if mark else 4
        return out + _text(x, y - 5, c.tag, font_weight="bold") + _text(x + tag_w, y - 5, rest)
    x, top = run.ports["lower"], run.lower.y - BAND_H
    out = _marker(mark[0], x, top + 10) if mark else ""
    for i, line in enumerate(words):
        bold = "bold" if i == 0 or (i == 3 and mark and mark[0] == "blocking") else None
        out += _text(x + 9, top + 14 + i * 13, _clip(line, LABEL_CHARS), font_weight=bold)
    return out


def _box(box: _Box, link: Link | None) -> str:
    d = box.device
    # Sources have a double outline, distribution square corners, loads round ends.
    shape = {"x": box.x, "y": box.y, "width": box.w, "height": BOX_H}
    rx = {OUTSIDE: 2, SOURCES: 2}.get(box.tier, 0 if box.tier == DISTRIBUTION else 14)
    dash = "6 3" if box.tier == OUTSIDE else None
    out = _el("rect", {**shape, "rx": rx, "fill": PAPER, "stroke": INK, "stroke_dasharray": dash})
    if box.tier <= SOURCES:
        inner = {"x": box.x + 4, "y": box.y + 4, "width": box.w - 8, "height": BOX_H - 8}
        out += _el("rect", {**inner, "fill": "none", "stroke": INK, "stroke_width": 1})
    names = _wrap(d.name, int((box.w - 14) / 7.6), 2)
    for i, line in enumerate(names):
        y = box.y + (20 if len(names) == 2 else 26) + i * 15
        out += _text(box.cx, y, line, size=13, font_weight="bold", text_anchor="middle")
    if box.tier == OUTSIDE:
        kind = "External supply"  # a source by nature; its line crosses the boundary
    else:
        kind = d.get_kind_display() + (" · source" if box.tier == SOURCES else "")
    kind = _clip(kind, int((box.w - 12) / 6.2))
    out += _text(box.cx, box.y + BOX_H - 8, kind, size=11, fill=MUTED, text_anchor="middle")
    mark = _mark(box.findings, None)
    out += _marker(mark[0], box.x + box.w - 4, box.y + 4) if mark else ""
    tip = [d.name, d.get_kind_display()] + ([d.location] if d.location else [])
    if box.tier == OUTSIDE:
        volts = f"{d.supply_voltage.normalize():f} V, " if d.supply_voltage is not None else ""
        tip.append(f"Off the vehicle: {volts}protected by {d.protection_display}")
    tip += [f"{'waived ' if f.waived else ''}{f.severity}: {f.message}" for f in box.findings]
    body = _el("title", {}, escape("\n".join(tip))) + _linked(d, out, link)
    return _el("g", {"class": "device", "data_device": d.name, "stroke_width": 1.5}, body)


_KEY = [("blocking", "blocking finding"), ("warning", "warning"), ("note", "note")]
_KEY += [("waived", "waived by a lead"), ("unsized", "not sized")]
_LINES = ((None, "DC"), ("10 5", "AC"), ("2 4", "bonding / earth"))


def _legend(y: float, width: float) -> tuple[str, float]:
    out, x = _text(MARGIN, y, "Key", font_weight="bold"), MARGIN + 40.0
    for shape, words in _KEY:
        out += _marker(shape, x + 8, y - 4) + _text(x + 20, y, words)
        x += 34 + len(words) * 6.6
    x, y = MARGIN + 40.0, y + 22
    for dash, words in _LINES:
        line = {"x1": x, "y1": y - 4, "x2": x + 36, "y2": y - 4, "stroke": INK, "stroke_width": 2}
        out += _el("line", {**line, "stroke_dasharray": dash}) + _text(x + 42, y, words)
        x += 60 + len(words) * 6.6
    notes = ["Labels: tag, size × conductors in parallel, protection, worst open finding."]
    for line in notes + _wrap(CAUTION, int((width - 2 * MARGIN) / 6.4), 3):
        y += 18
        out += _text(MARGIN, y, line, fill=MUTED)
    return out, y + MARGIN


def job_diagram_svg(
    report: SystemReport, *, link: Link | None = None, title: str | None = None
) -> str:
    """The one-line diagram of a system as SVG markup (no XML declaration).

    `link(obj)` may return a URL for a circuit or a device, which then links to it.
    """
    title = title or "One-line diagram"
    head = _el("title", {}, escape(title))
    if not report.devices:
        body = head + _text(MARGIN, 40, "No devices recorded yet.")
        return _svg(body, 420, 70, f"{title}: no devices recorded yet")
    rows, runs, width, height = _layout(report)
    out = head + _text(MARGIN, MARGIN + 12, title, size=15, font_weight="bold")
    tiers: dict[int, list[list[_Box]]] = defaultdict(list)
    for row in rows:
        tiers[row[0].tier].append(row)
    inside: list[float] = []  # top and bottom of the tiers inside the vehicle
    for tier, tier_rows in sorted(tiers.items()):
        first = tier_rows[0]
        top = first[0].y - (BAND_H + 4 if any(box.tops for box in first) else 10)
        bottom = tier_rows[-1][0].bottom + 10
        fill = PAPER if tier == OUTSIDE else TIER_FILL
        band = {"x": MARGIN / 2, "y": top, "width": width - MARGIN, "rx": 6, "fill": fill}
        out += _el("rect", {**band, "height": bottom - top})
        out += _text(MARGIN, top + 22, TIER_NAMES[tier], size=13, font_weight="bold", fill=MUTED)
        if tier != OUTSIDE:
            inside += [top, bottom]
    if OUTSIDE in tiers and inside:
        out += _boundary(min(inside) - 6, max(inside) + 6, width)
    lines = labels = ""
    for run in runs:
        attrs = {"class": "circuit", "data_tag": run.circuit.tag}
        path = _title(run) + _el("path", {"d": _path(run), **_stroke(run)})
        lines += _el("g", attrs, _linked(run.circuit, path, link))
        label = _title(run) + _run_label(run, width)
        labels += _el("g", {**attrs, "class": "circuit-label"}, _linked(run.circuit, label, link))
    boxes = "".join(_box(box, link) for row in rows for box in row)
    legend, height = _legend(height + 10, width)
    summary = f"{title}: {len(report.devices)} devices, {len(runs)} circuits"
    # With links inside, a group (an image would hide them from assistive technology).
    role = "group" if link else "img"
    return _svg(out + lines + boxes + labels + legend, width, height, summary, role)


def _boundary(top: float, bottom: float, width: float) -> str:
    """The vehicle's boundary: a dashed outline round the tiers inside it, named at its top
    right, so an external supply above it reads as outside the vehicle."""
    frame = {"x": MARGIN / 4, "y": top, "width": width - MARGIN / 2, "height": bottom - top}
    out = _el("rect", {**frame, "rx": 10, "fill": "none", "stroke": INK, "stroke_width": 1.5,
                       "stroke_dasharray": "9 5", "class": "vehicle-boundary"})  # fmt: skip
    label = "Vehicle boundary"
    x = width - MARGIN - len(label) * 7.2
    ground = {"x": x - 10, "y": top - 9, "width": len(label) * 7.2 + 16, "height": 16}
    out += _el("rect", {**ground, "fill": PAPER})
    return out + _text(x, top + 4, label, font_weight="bold", fill=MUTED)


def _svg(body: str, width: float, height: float, label: str, role: str = "img") -> str:
    w, h = f"{width:.0f}", f"{height:.0f}"
    root = {"xmlns": "http://www.w3.org/2000/svg", "xmlns:xlink": "http://www.w3.org/1999/xlink"}
    root |= {"class": "one-line", "width": w, "height": h, "viewBox": f"0 0 {w} {h}"}
    root |= {"role": role, "aria-label": label, "font-family": "sans-serif"}
    return _el("svg", root, _el("rect", {"width": "100%", "height": "100%", "fill": PAPER}) + body)
