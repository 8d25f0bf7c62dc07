"""The torque-movement chart: for each conductor end read at both passes, how far the
retorque reading sits from the first-install reading, as a share of its spec, so the
reader sees at a glance which connections loosened.

One fixed-size SVG whatever the number of ends (a 600-end job still fits one page): ends
in schedule order along the x axis, the change in % of spec up the y axis, the spec's
tolerance band shaded. Ends found loose at retorque are drawn as a cross with the word
"loose" (a shape and a word, never colour alone); the first few carry their label, and
when more were found loose the chart says how many and that the table marks each one
(hundreds of overlapping labels could not be read, and each cost the renderer a text
run). The largest other movers are labelled too. Black on white with grey, so it prints
on any printer.
"""

from __future__ import annotations

from html import escape

WIDTH, HEIGHT = 680.0, 300.0
LEFT, RIGHT, TOP, BOTTOM = 56.0, 16.0, 34.0, 46.0
LABELLED_MOVERS = 6
LABELLED_LOOSE = 8
INK, MUTED, BAND = "#111111", "#555555", "#e4e4e4"


def _n(value: float) -> str:
    return f"{value:.1f}".rstrip("0").rstrip(".")


def _t(x: float, y: float, words: str, *, size: int = 10, anchor: str = "start", **extra) -> str:
    attrs = "".join(f' {k.replace("_", "-")}="{v}"' for k, v in extra.items())
    return (
        f'<text x="{_n(x)}" y="{_n(y)}" font-size="{size}" text-anchor="{anchor}"{attrs}>'
        f"{escape(words)}</text>"
    )


def movement_chart_svg(torque_log: list[dict], *, tolerance_pct: float = 10.0) -> str:
    """The chart as inline SVG markup, from record_data's "torque_log" rows."""
    points = [
        (row, row["moved_pct"], bool(row["retorque"] and row["retorque"]["found_loose"]))
        for row in torque_log
        if row["moved_pct"] is not None or (row["retorque"] and row["retorque"]["found_loose"])
    ]
    head = '<svg xmlns="http://www.w3.org/2000/svg" class="movement-chart"'
    head += f' width="{_n(WIDTH)}" height="{_n(HEIGHT)}" viewBox="0 0 {_n(WIDTH)} {_n(HEIGHT)}"'
    head += ' role="img" font-family="DejaVu Sans, sans-serif"'
    if not points:
        label = "No connection was read at both first install and retorque yet."
        return (
            head.replace(f'height="{_n(HEIGHT)}"', 'height="40"').replace(
                f"0 0 {_n(WIDTH)} {_n(HEIGHT)}", f"0 0 {_n(WIDTH)} 40"
            )
            + f' aria-label="{escape(label)}">'
            + _t(4, 24, label, size=11)
            + "</svg>"
        )
    values = [abs(p[1]) for p in points if p[1] is not None]
    span = max([tolerance_pct * 2, *values]) * 1.15
    plot_w, plot_h = WIDTH - LEFT - RIGHT, HEIGHT - TOP - BOTTOM
    mid = TOP + plot_h / 2

    def y_of(pct: float) -> float:
        return mid - (pct / span) * (plot_h / 2)

    def x_of(i: int) -> float:
        return LEFT + (i + 0.5) * plot_w / len(points)

    loose = sum(1 for p in points if p[2])
    summary = (
        f"Change from first install to retorque for {len(points)} conductor ends; "
        f"{loose} found loose."
    )
    out = [head + f' aria-label="{escape(summary)}">', f"<title>{escape(summary)}</title>"]
    out.append(f'<rect width="{_n(WIDTH)}" height="{_n(HEIGHT)}" fill="#ffffff"/>')
    band_top, band_bottom = y_of(tolerance_pct), y_of(-tolerance_pct)
    out.append(
        f'<rect x="{_n(LEFT)}" y="{_n(band_top)}" width="{_n(plot_w)}"'
        f' height="{_n(band_bottom - band_top)}" fill="{BAND}"/>'
    )
    out.append(
        f'<line x1="{_n(LEFT)}" y1="{_n(mid)}" x2="{_n(LEFT + plot_w)}" y2="{_n(mid)}"'
        f' stroke="{MUTED}" stroke-width="0.8"/>'
    )
    out.append(
        f'<rect x="{_n(LEFT)}" y="{_n(TOP)}" width="{_n(plot_w)}" height="{_n(plot_h)}"'
        f' fill="none" stroke="{INK}" stroke-width="0.8"/>'
    )
    for pct in (span / 1.15, tolerance_pct, 0.0, -tolerance_pct, -span / 1.15):
        out.append(_t(LEFT - 4, y_of(pct) + 3, f"{pct:+.0f} %", size=8, anchor="end"))
    out.append(_t(LEFT, TOP - 18, "Change at retorque, % of spec", size=10, font_weight="bold"))
    out.append(
        _t(LEFT, TOP - 6, f"Grey band: within ±{tolerance_pct:g} % of the first reading", size=8)
    )
    out.append(_t(LEFT, HEIGHT - 26, "Conductor ends in schedule order (circuit tag, end)", size=8))
    key = "× loose = found loose at retorque (turned before the click)"
    if loose > LABELLED_LOOSE:
        key += (
            f"; {loose} found loose, the first {LABELLED_LOOSE} labelled, all marked ✖ in the table"
        )
    out.append(_t(LEFT, HEIGHT - 12, key, size=8))
    labelled_loose = 0
    movers = sorted(
        (i for i, p in enumerate(points) if not p[2] and p[1] is not None),
        key=lambda i: -abs(points[i][1]),
    )[:LABELLED_MOVERS]
    movers = [i for i in movers if abs(points[i][1]) > tolerance_pct / 2]
    bar_w = max(0.6, min(8.0, plot_w / len(points) * 0.7))
    for i, (row, pct, is_loose) in enumerate(points):
        x = x_of(i)
        value = pct if pct is not None else 0.0
        y = y_of(max(-span, min(span, value)))
        if is_loose:
            s = 5.0
            out.append(
                f'<path d="M{_n(x - s)} {_n(y - s)}L{_n(x + s)} {_n(y + s)}'
                f'M{_n(x - s)} {_n(y + s)}L{_n(x + s)} {_n(y - s)}" stroke="{INK}"'
                ' stroke-width="2"/>'
            )
            if labelled_loose < LABELLED_LOOSE:
                labelled_loose += 1
                label = f"{row['termination']} loose"
                out.append(_t(x + 6, y - 6, label, size=8, font_weight="bold"))
            continue
        top, height = (y, mid - y) if value >= 0 else (mid, y - mid)
        out.append(
            f'<rect x="{_n(x - bar_w / 2)}" y="{_n(top)}" width="{_n(bar_w)}"'
            f' height="{_n(max(height, 0.6))}" fill="{INK}"/>'
        )
        if i in movers:
            out.append(_t(x + 4, y - 3, f"{row['termination']} {value:+.0f} %", size=8))
    out.append("</svg>")
    return "".join(out)
