"""Server-rendered SVG charts (no JavaScript): one row per group, a bar or a point for
the figure and a line for its interval, drawn by templates/insights/_chart.html from the
geometry made here. Each chart has a <title> and a <desc> naming what it shows, and its
numbers are in the table beside it."""

from __future__ import annotations

import math
from dataclasses import dataclass, field

WIDTH = 640
LABEL_W = 210  # room for the group's name on the left
RIGHT = 16
ROW_H = 34
TOP = 28
BOTTOM = 30
MAX_ROWS = 25  # a chart stays readable; the table beside it has every row


@dataclass(frozen=True)
class ChartRow:
    label: str
    value: float | None
    low: float | None = None
    high: float | None = None
    note: str = ""  # "n = 12", shown after the label
    flagged: bool = False  # drawn with a second shape, never colour alone


@dataclass
class Chart:
    title: str
    desc: str
    unit: str
    lo: float
    hi: float
    bars: bool  # bars from zero (rates) or points (deviations about zero)
    rows: list[ChartRow]
    shown: list[dict] = field(default_factory=list)
    ticks: list[dict] = field(default_factory=list)
    left_out: int = 0

    @property
    def height(self) -> int:
        return TOP + ROW_H * max(1, len(self.shown)) + BOTTOM

    @property
    def width(self) -> int:
        return WIDTH

    @property
    def plot_left(self) -> int:
        return LABEL_W

    @property
    def plot_right(self) -> int:
        return WIDTH - RIGHT

    @property
    def axis_y(self) -> int:
        return self.height - BOTTOM

    @property
    def zero_x(self) -> float:
        return self.x(0.0)

    def x(self, value: float) -> float:
        span = self.hi - self.lo or 1.0
        clamped = min(max(value, self.lo), self.hi)
        return round(LABEL_W + (clamped - self.lo) / span * (self.plot_right - LABEL_W), 1)


def _nice_step(span: float) -> float:
    raw = span / 5 or 1.0
    power = 10 ** math.floor(math.log10(raw))
    for step in (1, 2, 2.5, 5, 10):
        if raw <= step * power:
            return step * power
    return 10 * power


def _fmt(value: float) -> str:
    return f"{value:g}"


def chart(
    rows: list[ChartRow],
    *,
    title: str,
    desc: str,
    unit: str,
    bars: bool,
    lo: float | None = None,
    hi: float | None = None,
) -> Chart:
    """Lay out `rows` on a common scale: from `lo` to `hi` when given (0 to 100 for a
    rate), else wide enough for every value and interval, with zero in view."""
    shown_rows = rows[:MAX_ROWS]
    values = [
        v
        for r in shown_rows
        for v in (r.value, r.low, r.high)
        if v is not None and math.isfinite(v)
    ]
    low = lo if lo is not None else min([0.0, *values])
    high = hi if hi is not None else max([0.0, *values])
    if high - low < 1e-9:
        low, high = low - 1, high + 1
    step = _nice_step(high - low)
    if lo is None:
        low = math.floor(low / step) * step
    if hi is None:
        high = math.ceil(high / step) * step
    result = Chart(title, desc, unit, low, high, bars, rows, left_out=len(rows) - len(shown_rows))
    tick = low
    while tick <= high + step / 1000:
        result.ticks.append({"x": result.x(tick), "label": f"{_fmt(round(tick, 6))}{unit}"})
        tick += step
    for index, row in enumerate(shown_rows):
        y = TOP + ROW_H * index + ROW_H / 2
        entry = {"row": row, "y": y, "label_y": y + 5, "has_value": row.value is not None}
        if row.value is not None:
            x = result.x(row.value)
            entry.update(
                x=x,
                bar_x=min(x, result.zero_x),
                bar_w=round(abs(x - result.zero_x), 1),
                bar_y=y - 9,
            )
        if row.low is not None and row.high is not None:
            entry.update(low_x=result.x(row.low), high_x=result.x(row.high))
        result.shown.append(entry)
    return result
