"""Layout of the one-line diagram: which tier and row each device sits in, where each box
goes, and the orthogonal route of each circuit. Drawing is in circuits.diagram."""

from __future__ import annotations

from collections import defaultdict
from dataclasses import dataclass, field

from circuits.models import Circuit, Device
from circuits.system import CircuitSizing, SystemFinding, SystemReport

K = Device.Kind
SOURCE_KINDS = {K.BATTERY, K.ALTERNATOR, K.SHORE_INLET}
DISTRIBUTION_KINDS = {
    *(K.BUSBAR, K.PROTECTION, K.DC_PANEL, K.AC_PANEL),
    *(K.INVERTER_CHARGER, K.CHARGE_CONTROLLER, K.DC_DC_CHARGER),
}
# Tier 0 holds external supplies (a pedestal, a generator, a building socket): they sit
# off the vehicle, drawn above and outside its boundary.
TIER_NAMES = ("Outside the vehicle", "Sources", "Distribution", "Loads")
OUTSIDE, SOURCES, DISTRIBUTION, LOADS = range(4)
_KIND_RANK = {kind: i for i, kind in enumerate(K.values)}

# Geometry, in SVG user units (px at 100 %).
MARGIN = 20
LEFT = 132  # column holding the tier names
BOX_H = 56
BOX_MIN_W = 156
GAP = 48  # least space between two boxes of a row; lines passing a row run through it
TRACK = 8  # spacing of lines sharing one gap
LABEL_W = 116  # room for one label beside a line entering a device from above
LABEL_CHARS = 15
PORT_PITCH = 14  # least spacing of lines leaving a device's bottom edge
LANE = 10
LABEL_LANE = 24  # a lane carrying its own label needs room for the text above it
BAND_H = 62  # four label lines above a row that receives circuits from above
MAX_ROW_W = 1480
LEGEND_W = 600


def tier_of(device: Device) -> int:
    if device.is_external:
        return OUTSIDE
    if device.is_source or device.kind in SOURCE_KINDS:
        return SOURCES
    return DISTRIBUTION if device.kind in DISTRIBUTION_KINDS else LOADS


@dataclass(eq=False)
class _Box:
    device: Device
    tier: int
    findings: list[SystemFinding] = field(default_factory=list)
    row: int = 0
    x: float = 0.0
    y: float = 0.0
    w: float = BOX_MIN_W
    tops: list[_Run] = field(default_factory=list)  # runs entering from above
    bottoms: list[_Run] = field(default_factory=list)  # runs leaving the bottom edge

    @property
    def cx(self) -> float:
        return self.x + self.w / 2

    @property
    def bottom(self) -> float:
        return self.y + BOX_H


@dataclass(eq=False)
class _Run:
    sizing: CircuitSizing
    upper: _Box
    lower: _Box
    gutters: list[tuple[int, int, int]] = field(default_factory=list)  # (row, gap, track)
    xs: list[float] = field(default_factory=list)  # x of each vertical stretch, top down
    ports: dict[str, float] = field(default_factory=dict)  # "upper"/"lower" -> x
    lanes: dict[int, float] = field(default_factory=dict)  # channel (row below) -> y

    @property
    def circuit(self) -> Circuit:
        return self.sizing.circuit

    @property
    def same_row(self) -> bool:
        return self.upper.row == self.lower.row


# ---- text --------------------------------------------------------------------------


def _order_tiers(boxes: list[_Box], neighbours: dict[_Box, list[_Box]]) -> list[list[_Box]]:
    """Each tier left to right in an order that keeps lines short: by kind and name first,
    then a few passes sorting each tier by the mean position of each device's neighbours."""
    tiers: list[list[_Box]] = [[] for _ in TIER_NAMES]
    for box in sorted(boxes, key=lambda b: (_KIND_RANK.get(b.device.kind, 99), b.device.name)):
        tiers[box.tier].append(box)

    def pos(box: _Box) -> float:
        return tiers[box.tier].index(box) / max(len(tiers[box.tier]) - 1, 1)

    for t in (DISTRIBUTION, LOADS, SOURCES, OUTSIDE, DISTRIBUTION, LOADS):
        now = {box: pos(box) for box in tiers[t]}
        near = {b: [now[n] if n.tier == t else pos(n) for n in neighbours[b]] for b in tiers[t]}
        tiers[t].sort(key=lambda b: (sum(near[b]) / len(near[b])) if near[b] else now[b])
    return tiers


def _wrap_rows(tiers: list[list[_Box]]) -> list[list[_Box]]:
    """One row each for external supplies, sources and distribution (wrapping the middle
    tier would send most lines through it); loads wrap onto more rows once wider than the
    rest of the drawing."""
    limit = max([MAX_ROW_W] + [sum(b.w + GAP for b in tier) - GAP for tier in tiers[:LOADS]])
    rows: list[list[_Box]] = []
    for t, tier in enumerate(tiers):
        row: list[_Box] = []
        for box in tier:
            if t == LOADS and row and sum(b.w + GAP for b in row) + box.w > limit:
                rows.append(row)
                row = []
            row.append(box)
        if row:
            rows.append(row)
    for i, row in enumerate(rows):
        for box in row:
            box.row = i
    return rows


def _place_x(rows: list[list[_Box]], gaps: dict[tuple[int, int], float]) -> float:
    """Set each box's x (rows centred on the widest); return the widest row's width."""
    widths = [
        sum(b.w for b in row) + sum(gaps.get((r, i), GAP) for i in range(len(row) - 1))
        for r, row in enumerate(rows)
    ]
    for r, row in enumerate(rows):
        x = LEFT + (max(widths) - widths[r]) / 2
        for i, box in enumerate(row):
            box.x = x
            x += box.w + gaps.get((r, i), GAP)
    return max(widths)


def _gap_edges(boxes: list[_Box]) -> list[float]:
    """x of the way past each box of a row: left end, between each two boxes, right end."""
    between = [(b.x + b.w + boxes[i + 1].x) / 2 for i, b in enumerate(boxes[:-1])]
    return [boxes[0].x - GAP / 2, *between, boxes[-1].x + boxes[-1].w + GAP / 2]


def _choose_gutters(rows: list[list[_Box]], runs: list[_Run]) -> dict[tuple[int, int], int]:
    """A run passing a whole row goes through the way past nearest its target; returns
    how many runs share each way."""
    counts: dict[tuple[int, int], int] = defaultdict(int)
    for run in runs:
        for r in range(run.upper.row + 1, run.lower.row):
            edges = _gap_edges(rows[r])
            gap = min(range(len(edges)), key=lambda i: (abs(edges[i] - run.lower.cx), i))
            run.gutters.append((r, gap, counts[(r, gap)]))
            counts[(r, gap)] += 1
    return counts


def _gutter_xs(rows: list[list[_Box]], run: _Run, counts: dict[tuple[int, int], int]) -> None:
    run.xs = []
    for r, gap, track in run.gutters:
        edges = _gap_edges(rows[r])
        if gap == 0:
            run.xs.append(edges[0] - track * TRACK)
        elif gap == len(edges) - 1:
            run.xs.append(edges[-1] + track * TRACK)
        else:
            run.xs.append(edges[gap] + (track - (counts[(r, gap)] - 1) / 2) * TRACK)


def _width(tops: int, bottoms: int) -> float:
    return max(BOX_MIN_W, tops * LABEL_W + 24, (bottoms + 1) * PORT_PITCH)


def _assign_ports(boxes: list[_Box]) -> None:
    """Lines meet a device's edge in the order of where they head, so they do not cross
    at the device; lines from above are a label's width apart."""
    for box in boxes:
        box.tops.sort(key=lambda run: ((run.xs or [run.upper.cx])[-1], run.circuit.tag))
        start = box.x + (box.w - len(box.tops) * LABEL_W) / 2
        for i, run in enumerate(box.tops):
            run.ports["lower"] = start + i * LABEL_W + 10
    for box in boxes:

        def heading(run: _Run, box: _Box = box) -> float:
            if run.same_row:
                return (run.lower if run.upper is box else run.upper).cx
            return (run.xs or [run.ports["lower"]])[0]

        box.bottoms.sort(key=lambda run: (heading(run), run.circuit.tag))
        for i, run in enumerate(box.bottoms):
            end = "upper" if run.upper is box else "lower"
            run.ports[end] = box.x + (i + 1) * box.w / (len(box.bottoms) + 1)


def _layout(report: SystemReport) -> tuple[list[list[_Box]], list[_Run], float, float]:
    """Rows of placed boxes, routed runs, and the drawing's width and height."""
    boxes = {d.pk: _Box(device=d, tier=tier_of(d)) for d in report.devices}
    for box in boxes.values():
        box.findings = [f for f in report.system_findings if f.subject == box.device.name]
    neighbours: dict[_Box, list[_Box]] = defaultdict(list)
    pairs = []
    for sizing in report.circuits:
        a = boxes.get(sizing.circuit.from_device_id)
        b = boxes.get(sizing.circuit.to_device_id)
        if a is not None and b is not None and a is not b:
            pairs.append((sizing, a, b))
            neighbours[a].append(b)
            neighbours[b].append(a)
    tiers = _order_tiers(list(boxes.values()), neighbours)
    # Widths follow how many lines meet each edge, which needs the rows, which need the
    # widths: estimate from the tiers first, then measure once the rows are known.
    edges: dict[tuple[_Box, str], int] = defaultdict(int)
    for _, a, b in pairs:
        upper, lower = (a, b) if a.tier <= b.tier else (b, a)
        edges[upper, "bottom"] += 1
        edges[lower, "bottom" if a.tier == b.tier else "top"] += 1
    for box in boxes.values():
        box.w = _width(edges[box, "top"], edges[box, "bottom"])
    rows = _wrap_rows(tiers)
    runs: list[_Run] = []
    for sizing, a, b in pairs:
        upper, lower = (a, b) if a.row <= b.row else (b, a)
        run = _Run(sizing=sizing, upper=upper, lower=lower)
        runs.append(run)
        upper.bottoms.append(run)
        (lower.bottoms if run.same_row else lower.tops).append(run)
    for box in boxes.values():
        box.w = _width(len(box.tops), len(box.bottoms))
    _place_x(rows, {})
    counts = _choose_gutters(rows, runs)
    # Widen a gap between two boxes to fit the lines going through it.
    inner = _place_x(
        rows, {(r, g - 1): max(GAP, (n + 1) * TRACK + 32) for (r, g), n in counts.items()}
    )
    for run in runs:
        _gutter_xs(rows, run, counts)
    _assign_ports(list(boxes.values()))
    height = _place_y(rows, runs)
    right = max([LEFT + inner] + [x for run in runs for x in run.xs])
    return rows, runs, max(right + GAP / 2 + MARGIN, LEGEND_W), height


def _place_y(rows: list[list[_Box]], runs: list[_Run]) -> float:
    """Stack the rows and the channels between them; give each run a lane in each channel
    it crosses sideways. Returns the y where the drawing ends."""
    dips: dict[int, list[_Run]] = defaultdict(list)
    segments: dict[int, list[tuple[_Run, float, float]]] = defaultdict(list)
    for run in runs:
        if run.same_row:
            dips[run.upper.row + 1].append(run)
            continue
        xs = [run.ports["upper"], *run.xs, run.ports["lower"]]
        for i, channel in enumerate(range(run.upper.row + 1, run.lower.row + 1)):
            if abs(xs[i] - xs[i + 1]) >= 0.5:
                segments[channel].append((run, xs[i], xs[i + 1]))
    y = MARGIN + 28.0
    for r in range(len(rows) + 1):
        if r > 0:
            y = rows[r - 1][0].bottom + 12
        # Narrow dips nearest the row, so wider ones nest around them.
        for run in sorted(dips[r], key=lambda u: (_span(u), u.circuit.tag)):
            y += LABEL_LANE
            run.lanes[r] = y
        # Lines heading right take the upper lanes, farthest target first, then lines
        # heading left, farthest-left first: lines from one device never cross each other.
        right = [s for s in segments[r] if s[2] > s[1]]
        left = [s for s in segments[r] if s[2] < s[1]]
        right.sort(key=lambda s: (-s[2], s[0].circuit.tag))
        left.sort(key=lambda s: (s[2], s[0].circuit.tag))
        for run, _, _ in right + left:
            y += LANE
            run.lanes[r] = y
        if r == len(rows):
            break
        y += (14 if r > 0 else 0) + (BAND_H if any(box.tops for box in rows[r]) else 0)
        for box in rows[r]:
            box.y = y
    return y + 16


def _span(run: _Run) -> float:
    return abs(run.ports["upper"] - run.ports["lower"])


# ---- drawing -----------------------------------------------------------------------
