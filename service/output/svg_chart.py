"""Charts written straight to SVG: the same look as ``service.output.png_chart`` at a fraction of
matplotlib's cost (a chart is a few dozen elements; building a matplotlib figure for them
cost 30-50x the calculation it draws).

The page is the matplotlib figure's (7.5 x 4.6 in, the same axes box, inks, dash patterns,
markers and type sizes), text stays text in DejaVu Sans with fallbacks, coordinates are
rounded to 0.01 pt and nothing depends on the clock, so the same chart always gives the
same bytes. Ticks follow the "nice step" rule (1, 2, 2.5, 5 times a power of ten, at most
seven intervals on x and six on y).
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence
from html import escape

import numpy as np
from numpy.typing import NDArray

from service.output.chart_data import RunChart, TractiveForceChart, force_envelope

__all__ = ["nice_ticks", "svg_chart"]

FloatArray = NDArray[np.float64]

WIDTH_PT, HEIGHT_PT = 540.0, 331.2  # 7.5 x 4.6 in
# the axes box: left 0.1, bottom 0.115, 0.86 wide, 0.735 high (of the page, from its foot)
AX_X, AX_Y, AX_W, AX_H = 0.1 * WIDTH_PT, 0.885 * HEIGHT_PT, 0.86 * WIDTH_PT, 0.735 * HEIGHT_PT
FONT = "'DejaVu Sans', Verdana, Arial, Helvetica, sans-serif"
PAPER = "#ffffff"
ENVELOPE = "#ece6dc"
INKS = ("#14213d", "#9a3b1b", "#23645a", "#5c3470", "#5f5514", "#2f4f86")
DASHES: tuple[tuple[float, ...], ...] = (
    (),
    (7.0, 2.2),
    (1.6, 1.8),
    (7.0, 2.0, 1.6, 2.0),
    (3.6, 1.8),
    (10.0, 2.0, 1.6, 2.0, 1.6, 2.0),
)
MARKERS = ("o", "s", "^", "D", "v", "P")
LINE_WIDTH = 1.5
MARKER_SIZE = 3.6
_PAIR = "{:.2f},{:.2f}"
CHAR_EM = 0.58  # mean advance of DejaVu Sans digits and letters [em], for label boxes


def _n(x: float) -> str:
    """A coordinate: rounded to 0.01 and without a needless ".0"."""
    text = f"{x:.2f}".rstrip("0").rstrip(".")
    return "0" if text == "-0" else text


def nice_ticks(top: float, intervals: int) -> list[float]:
    """Ticks from 0 to at most ``top``: the smallest step of 1, 2, 2.5, 5 or 10 times a
    power of ten that covers ``[0, top]`` in at most ``intervals`` steps.

    >>> nice_ticks(53.0, 7)
    [0.0, 10.0, 20.0, 30.0, 40.0, 50.0]
    >>> nice_ticks(2.2, 6)
    [0.0, 0.5, 1.0, 1.5, 2.0]
    """
    raw = top / intervals
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * power >= raw * (1 - 1e-9))
    count = math.floor(top / step + 1e-9)
    return [round(i * step, 10) for i in range(count + 1)]


def _label(value: float, ticks: Sequence[float]) -> str:
    step = ticks[1] - ticks[0] if len(ticks) > 1 else 1.0
    decimals = 0 if float(step).is_integer() else max(0, -math.floor(math.log10(step)) + 1)
    if decimals and round(step * 10**decimals - 10 * round(step * 10 ** (decimals - 1))) == 0:
        decimals -= 1
    return f"{value:.{decimals}f}"


class _Canvas:
    """Data-to-page mapping and the growing list of SVG elements."""

    def __init__(self, x_max: float, y_max: float) -> None:
        self.x_max, self.y_max = x_max, y_max
        self.parts: list[str] = []

    def px(self, x: FloatArray | float) -> FloatArray | float:
        return (
            AX_X + np.asarray(x) / self.x_max * AX_W
            if isinstance(x, np.ndarray)
            else (AX_X + x / self.x_max * AX_W)
        )

    def py(self, y: FloatArray | float) -> FloatArray | float:
        return (
            AX_Y - np.asarray(y) / self.y_max * AX_H
            if isinstance(y, np.ndarray)
            else (AX_Y - y / self.y_max * AX_H)
        )

    def points(self, x: FloatArray, y: FloatArray) -> str:
        """``x,y`` pairs on the page to 0.01 pt, one format call per point (the bulk of
        the document: a chart has about a thousand)."""
        xs = (AX_X + x / self.x_max * AX_W).tolist()
        ys = (AX_Y - y / self.y_max * AX_H).tolist()
        return " ".join(map(_PAIR.format, xs, ys))

    def add(self, part: str) -> None:
        self.parts.append(part)


def _text(
    x: float,
    y: float,
    text: str,
    size: float,
    fill: str,
    *,
    anchor: str = "start",
    weight: str = "",
    italic: bool = False,
    rotate: bool = False,
    baseline: str = "",
) -> str:
    attrs = [f'x="{_n(x)}"', f'y="{_n(y)}"', f'font-size="{_n(size)}"', f'fill="{fill}"']
    if anchor != "start":
        attrs.append(f'text-anchor="{anchor}"')
    if weight:
        attrs.append(f'font-weight="{weight}"')
    if italic:
        attrs.append('font-style="italic"')
    if baseline:
        attrs.append(f'dominant-baseline="{baseline}"')
    if rotate:
        attrs.append(f'transform="rotate(-90 {_n(x)} {_n(y)})"')
    return f"<text {' '.join(attrs)}>{escape(text)}</text>"


def _marker(kind: str, x: float, y: float, size: float, fill: str, edge: str, lw: float) -> str:
    r = size / 2.0
    style = f'fill="{fill}" stroke="{edge}" stroke-width="{_n(lw)}"'
    if kind == "o":
        return f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(r)}" {style}/>'
    if kind == "s":
        h = 0.8 * r
        return (
            f'<rect x="{_n(x - h)}" y="{_n(y - h)}" width="{_n(2 * h)}" height="{_n(2 * h)}" '
            f"{style}/>"
        )
    shapes = {
        "^": [(0.0, -r), (r, r), (-r, r)],
        "v": [(0.0, r), (r, -r), (-r, -r)],
        "D": [(0.0, -r * 1.15), (r * 1.15, 0.0), (0.0, r * 1.15), (-r * 1.15, 0.0)],
    }
    if kind == "P":
        a, b = r / 3.0, r
        pts = [(-a, -b), (a, -b), (a, -a), (b, -a), (b, a), (a, a), (a, b), (-a, b)]
        pts += [(-a, a), (-b, a), (-b, -a), (-a, -a)]
    else:
        pts = shapes[kind]
    text = " ".join(f"{_n(x + dx)},{_n(y + dy)}" for dx, dy in pts)
    return f'<polygon points="{text}" {style}/>'


def _gear_line(
    c: _Canvas, gear: int, x: FloatArray, y: FloatArray, start: int, every: int
) -> None:
    i = gear - 1
    ink = INKS[i % len(INKS)]
    dash = DASHES[i % len(DASHES)]
    dash_attr = f' stroke-dasharray="{",".join(_n(d * LINE_WIDTH) for d in dash)}"' if dash else ""
    c.add(
        f'<polyline points="{c.points(x, y)}" fill="none" stroke="{ink}" '
        f'stroke-width="{_n(LINE_WIDTH)}" stroke-linejoin="round"{dash_attr} '
        'clip-path="url(#plot)"/>'
    )
    face = PAPER if i < len(MARKERS) else ink
    kind = MARKERS[i % len(MARKERS)]
    for k in range(start, x.size, every):
        c.add(
            _marker(
                kind,
                float(c.px(float(x[k]))),
                float(c.py(float(y[k]))),
                MARKER_SIZE,
                face,
                ink,
                1.0,
            )
        )


def _gear_badge(c: _Canvas, gear: int, x: float, y: float, dx: float, dy: float) -> None:
    ink = INKS[(gear - 1) % len(INKS)]
    cx, cy = float(c.px(x)) + dx, float(c.py(y)) - dy
    c.add(
        f'<circle cx="{_n(cx)}" cy="{_n(cy)}" r="{_n(6.2 if gear > 9 else 5.4)}" '
        f'fill="{PAPER}" stroke="{ink}" stroke-width="0.8"/>'
    )
    c.add(_text(cx, cy + 2.5, str(gear), 7.0, ink, anchor="middle", weight="bold"))


def _drops(
    c: _Canvas, x: Iterable[float], y: Iterable[float], labels: Iterable[str], ground: str
) -> None:
    label_y = float(c.py(0.015 * c.y_max))
    for xi, yi, text in zip(x, y, labels, strict=True):
        px, py = float(c.px(xi)), float(c.py(yi))
        c.add(
            f'<line x1="{_n(px)}" y1="{_n(AX_Y)}" x2="{_n(px)}" y2="{_n(py)}" stroke="#555555" '
            'stroke-width="0.7" stroke-dasharray="0.7,1.12"/>'
        )
        size = 6.5
        w = len(text) * CHAR_EM * size + 1.3
        # the label stands along the drop, its right edge (bottom when rotated) on the axis
        bx, by = px - size * 1.05, label_y - w
        c.add(
            f'<rect x="{_n(bx)}" y="{_n(by)}" width="{_n(size * 1.05 + 0.65)}" height="{_n(w)}" '
            f'fill="{ground}" fill-opacity="0.85"/>'
        )
        c.add(_text(px - 1.5, label_y - 0.65, text, size, "#333333", rotate=True))


def _frame(c: _Canvas, xlabel: str, ylabel: str, xticks: list[float], yticks: list[float]) -> None:
    grid = []
    for t in yticks[1:]:
        py = float(c.py(t))
        grid.append(f'<line x1="{_n(AX_X)}" y1="{_n(py)}" x2="{_n(AX_X + AX_W)}" y2="{_n(py)}"/>')
    c.parts.insert(
        0,
        '<g stroke="#b9b9b9" stroke-width="0.5" stroke-dasharray="0.5,1">'
        + "".join(grid)
        + "</g>",
    )
    axes = (
        f'<path d="M{_n(AX_X)},{_n(AX_Y - AX_H)} V{_n(AX_Y)} H{_n(AX_X + AX_W)}" fill="none" '
        'stroke="#3a3a3a" stroke-width="0.8"/>'
    )
    ticks = []
    for t in xticks:
        px = float(c.px(t))
        ticks.append(f'<line x1="{_n(px)}" y1="{_n(AX_Y)}" x2="{_n(px)}" y2="{_n(AX_Y + 3.5)}"/>')
        c.add(_text(px, AX_Y + 13.0, _label(t, xticks), 8.5, "#3a3a3a", anchor="middle"))
    for t in yticks:
        py = float(c.py(t))
        ticks.append(f'<line x1="{_n(AX_X)}" y1="{_n(py)}" x2="{_n(AX_X - 3.5)}" y2="{_n(py)}"/>')
        c.add(_text(AX_X - 6.0, py + 3.0, _label(t, yticks), 8.5, "#3a3a3a", anchor="end"))
    c.add(axes + '<g stroke="#3a3a3a" stroke-width="0.8">' + "".join(ticks) + "</g>")
    c.add(_text(AX_X + AX_W / 2, AX_Y + 25.0, xlabel, 8.5, "#1e1e1e", anchor="middle"))
    widest = max(len(_label(t, yticks)) for t in yticks)
    lx = AX_X - 10.0 - widest * CHAR_EM * 8.5
    c.add(_text(lx, AX_Y - AX_H / 2, ylabel, 8.5, "#1e1e1e", anchor="middle", rotate=True))


def _tractive_force(chart: TractiveForceChart) -> _Canvas:
    top_speed = max(float(g.speed[-1]) for g in chart.gears)
    top_force = max(float(g.force.max()) for g in chart.gears)
    grip = chart.traction_limit
    if grip is not None and grip < 1.6 * top_force:
        top_force = max(top_force, grip)
    top_speed, top_force = max(top_speed, 1e-3), max(top_force, 1e-3)
    c = _Canvas(top_speed * 1.07, top_force * 1.12)
    grid, best = force_envelope(chart, top_speed)
    outline = np.concatenate([grid, grid[::-1]]), np.concatenate([best, np.zeros_like(best)])
    c.add(f'<polygon points="{c.points(*outline)}" fill="{ENVELOPE}" clip-path="url(#plot)"/>')
    if chart.road_load is not None:
        v, f = chart.road_load
        c.add(
            f'<polyline points="{c.points(v, f)}" fill="none" stroke="#8f8f8f" '
            'stroke-width="2.8" clip-path="url(#plot)"/>'
        )
        k = int(np.searchsorted(f, 0.55 * top_force)) if f[-1] > 0.55 * top_force else -1
        if float(v[k]) <= c.x_max and float(f[k]) <= c.y_max:
            px, py = float(c.px(float(v[k]))), float(c.py(float(f[k])))
            c.add(
                _text(px - 4.0, py - 4.0, "road load", 7.0, "#5e5e5e", anchor="end", italic=True)
            )
    if grip is not None and grip < 1.6 * top_force:
        py = float(c.py(grip))
        c.add(
            f'<line x1="{_n(AX_X)}" y1="{_n(py)}" x2="{_n(AX_X + AX_W)}" y2="{_n(py)}" '
            'stroke="#4a4a4a" stroke-width="0.9" stroke-dasharray="4.5,2.7"/>'
        )
        c.add(
            _text(
                AX_X + AX_W, py - 2.0, "traction limit ", 7.0, "#4a4a4a", anchor="end", italic=True
            )
        )
    for n, g in enumerate(chart.gears):
        _gear_line(c, g.gear, g.speed, g.force, 3 + 2 * (n % 5), 14)
    for g in chart.gears:  # the badges over every line
        _gear_badge(c, g.gear, float(g.speed[-1]), float(g.force[-1]), 8.0, 4.0)
    if chart.shifts:
        x = [s.speed for s in chart.shifts]
        y = [s.force_before for s in chart.shifts]
        labels = [f"{s.from_gear}-{s.to_gear} {s.rpm:.0f} rpm" for s in chart.shifts]
        _drops(c, x, y, labels, ENVELOPE)
        for xi, yi in zip(x, y, strict=True):
            c.add(_marker("D", float(c.px(xi)), float(c.py(yi)), 4.6, "#111111", PAPER, 0.7))
    _frame(c, chart.speed_label, chart.force_label, nice_ticks(c.x_max, 7), nice_ticks(c.y_max, 6))
    c.add(
        _text(
            AX_X + 0.995 * AX_W,
            AX_Y - 0.985 * AX_H + 6.0,
            "circled number: gear; diamond: shift point",
            6.5,
            "#555555",
            anchor="end",
        )
    )
    return c


def _run(chart: RunChart) -> _Canvas:
    top_time = max(max(float(s.time[-1]) for s in chart.segments), 1e-3)
    top_speed = max(max(float(s.speed.max()) for s in chart.segments), 1e-3)
    c = _Canvas(top_time * 1.03, top_speed * 1.12)
    for n, seg in enumerate(chart.segments):
        _gear_line(c, seg.gear, seg.time, seg.speed, 2 + n % 4, 12)
    for seg in chart.segments:
        mid = seg.time.size // 2
        _gear_badge(c, seg.gear, float(seg.time[mid]), float(seg.speed[mid]), -7.0, 8.0)
    if chart.milestones:
        _drops(
            c,
            [m.time for m in chart.milestones],
            [m.speed for m in chart.milestones],
            [m.label for m in chart.milestones],
            PAPER,
        )
    for s in chart.shifts:
        px, py = float(c.px(s.time)), float(c.py(s.speed))
        c.add(_marker("D", px, py, 4.6, "#111111", PAPER, 0.7))
        c.add(_text(px + 5.0, py + 4.0 + 6.0, s.label, 6.5, "#333333"))
    _frame(c, chart.time_label, chart.speed_label, nice_ticks(c.x_max, 7), nice_ticks(c.y_max, 6))
    return c


def svg_chart(chart: TractiveForceChart | RunChart) -> bytes:
    """The chart as a stand-alone SVG document (UTF-8), the same bytes for the same chart."""
    c = _tractive_force(chart) if isinstance(chart, TractiveForceChart) else _run(chart)
    head = (
        '<?xml version="1.0" encoding="utf-8" standalone="no"?>\n'
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_n(WIDTH_PT)}pt" '
        f'height="{_n(HEIGHT_PT)}pt" viewBox="0 0 {_n(WIDTH_PT)} {_n(HEIGHT_PT)}" '
        f'font-family="{FONT}">\n'
        f'<defs><clipPath id="plot"><rect x="{_n(AX_X)}" y="{_n(AX_Y - AX_H)}" '
        f'width="{_n(AX_W)}" height="{_n(AX_H)}"/></clipPath></defs>\n'
        f'<rect width="100%" height="100%" fill="{PAPER}"/>\n'
    )
    titles = [
        _text(AX_X, HEIGHT_PT * 0.045, chart.title, 12.0, "#14213d", weight="bold"),
        _text(AX_X, HEIGHT_PT * 0.095, chart.subtitle, 7.5, "#4d4d4d"),
        _text(WIDTH_PT * 0.99, HEIGHT_PT * 0.988, chart.footer, 6.5, "#6b6b6b", anchor="end"),
    ]
    body = "\n".join([*titles, *c.parts])
    return (head + body + "\n</svg>\n").encode("utf-8")
