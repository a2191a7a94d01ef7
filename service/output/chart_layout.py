"""The page of a chart laid out as drawing items, shared by the SVG and the PNG writers.

A chart record (``service.output.chart_data``) is laid out once here: the scales and their
"nice step" ticks, and every line, fill, marker and label of the page
(``service.output.chart_page``) with its ink, width and dash pattern. The writers only
translate items: ``service.output.svg_chart`` into SVG elements, ``service.output.png_chart``
into pixels, so both pictures show the same layout, inks, dashes, markers, labels and ticks.

Ticks follow the "nice step" rule (1, 2, 2.5, 5 times a power of ten, at most seven intervals
on x and six on y), the rule of matplotlib's ``MaxNLocator`` with those steps.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np
from numpy.typing import NDArray

from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_page import (
    AX_H,
    AX_W,
    AX_X,
    AX_Y,
    CHAR_EM,
    ENVELOPE,
    HEIGHT_PT,
    INKS,
    LINE_WIDTH,
    MARKER_SIZE,
    PAPER,
    WIDTH_PT,
    Circle,
    Frame,
    Item,
    Line,
    LineGroup,
    Marker,
    Polygon,
    Polyline,
    Rect,
    Stroke,
    Text,
    gear_look,
)

__all__ = ["best_gear_envelope", "chart_items", "nice_ticks"]

FloatArray = NDArray[np.float64]


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
    """Data-to-page mapping and the growing list of items."""

    def __init__(self, x_max: float, y_max: float) -> None:
        self.x_max, self.y_max = x_max, y_max
        self.items: list[Item] = []

    def px(self, x: float) -> float:
        return AX_X + x / self.x_max * AX_W

    def py(self, y: float) -> float:
        return AX_Y - y / self.y_max * AX_H

    def pxs(self, x: FloatArray) -> FloatArray:
        return AX_X + x / self.x_max * AX_W

    def pys(self, y: FloatArray) -> FloatArray:
        return AX_Y - y / self.y_max * AX_H

    def add(self, item: Item) -> None:
        self.items.append(item)


def _gear_line(
    c: _Canvas, gear: int, x: FloatArray, y: FloatArray, start: int, every: int
) -> None:
    look = gear_look(gear)
    stroke = Stroke(look.ink, LINE_WIDTH, tuple(d * LINE_WIDTH for d in look.dash))
    px, py = c.pxs(x), c.pys(y)
    c.add(Polyline(px, py, stroke, round_join=True))
    face = look.ink if look.filled else PAPER
    edge = Stroke(look.ink, 1.0)
    for k in range(start, x.size, every):
        c.add(Marker(look.marker, float(px[k]), float(py[k]), MARKER_SIZE, face, edge))


def _gear_badge(c: _Canvas, gear: int, x: float, y: float, dx: float, dy: float) -> None:
    ink = INKS[(gear - 1) % len(INKS)]
    cx, cy = c.px(x) + dx, c.py(y) - dy
    c.add(Circle(cx, cy, 6.2 if gear > 9 else 5.4, PAPER, Stroke(ink, 0.8)))
    c.add(Text(cx, cy + 2.5, str(gear), 7.0, ink, anchor="middle", bold=True))


def _drops(
    c: _Canvas, x: Iterable[float], y: Iterable[float], labels: Iterable[str], ground: str
) -> None:
    label_y = c.py(0.015 * c.y_max)
    dots = Stroke("#555555", 0.7, (0.7, 1.12))
    for xi, yi, text in zip(x, y, labels, strict=True):
        px, py = c.px(xi), c.py(yi)
        c.add(Line(px, AX_Y, px, py, dots))
        size = 6.5
        w = len(text) * CHAR_EM * size + 1.3
        # the label stands along the drop, its right edge (bottom when rotated) on the axis
        c.add(Rect(px - size * 1.05, label_y - w, size * 1.05 + 0.65, w, ground, 0.85))
        c.add(Text(px - 1.5, label_y - 0.65, text, size, "#333333", rotated=True))


def _grid(c: _Canvas, yticks: list[float]) -> None:
    lines = tuple((AX_X, c.py(t), AX_X + AX_W, c.py(t)) for t in yticks[1:])
    c.add(LineGroup(lines, Stroke("#b9b9b9", 0.5, (0.5, 1.0))))


def _frame(c: _Canvas, xlabel: str, ylabel: str, xticks: list[float], yticks: list[float]) -> None:
    ticks = []
    for t in xticks:
        px = c.px(t)
        ticks.append((px, AX_Y, px, AX_Y + 3.5))
        c.add(Text(px, AX_Y + 13.0, _label(t, xticks), 8.5, "#3a3a3a", anchor="middle"))
    for t in yticks:
        py = c.py(t)
        ticks.append((AX_X, py, AX_X - 3.5, py))
        c.add(Text(AX_X - 6.0, py + 3.0, _label(t, yticks), 8.5, "#3a3a3a", anchor="end"))
    c.add(Frame(AX_X, AX_Y - AX_H, AX_Y, AX_X + AX_W, tuple(ticks), Stroke("#3a3a3a", 0.8)))
    c.add(Text(AX_X + AX_W / 2, AX_Y + 25.0, xlabel, 8.5, "#1e1e1e", anchor="middle"))
    widest = max(len(_label(t, yticks)) for t in yticks)
    lx = AX_X - 10.0 - widest * CHAR_EM * 8.5
    c.add(Text(lx, AX_Y - AX_H / 2, ylabel, 8.5, "#1e1e1e", anchor="middle", rotated=True))


def best_gear_envelope(
    chart: TractiveForceChart, top_speed: float
) -> tuple[FloatArray, FloatArray]:
    """The most force any gear gives [caller's units] over 161 speeds from rest to
    ``top_speed`` (0 where no gear reaches)."""
    grid = np.linspace(0.0, top_speed, 161)
    each = np.stack(
        [np.interp(grid, g.speed, g.force, left=np.nan, right=np.nan) for g in chart.gears]
    )
    defined = ~np.isnan(each).all(axis=0)
    best = np.where(defined, np.nanmax(np.where(np.isnan(each), -np.inf, each), axis=0), 0.0)
    return grid, np.maximum(best, 0.0)


def _road_load(c: _Canvas, road_load: tuple[FloatArray, FloatArray], top_force: float) -> None:
    v, f = road_load
    c.add(Polyline(c.pxs(v), c.pys(f), Stroke("#8f8f8f", 2.8)))
    k = int(np.searchsorted(f, 0.55 * top_force)) if f[-1] > 0.55 * top_force else -1
    if float(v[k]) <= c.x_max and float(f[k]) <= c.y_max:
        px, py = c.px(float(v[k])), c.py(float(f[k]))
        c.add(Text(px - 4.0, py - 4.0, "road load", 7.0, "#5e5e5e", anchor="end", italic=True))


def _tractive_force(chart: TractiveForceChart) -> _Canvas:
    top_speed = max(float(g.speed[-1]) for g in chart.gears)
    top_force = max(float(g.force.max()) for g in chart.gears)
    grip = chart.traction_limit
    if grip is not None and grip < 1.6 * top_force:
        top_force = max(top_force, grip)
    top_speed, top_force = max(top_speed, 1e-3), max(top_force, 1e-3)
    c = _Canvas(top_speed * 1.07, top_force * 1.12)
    xticks, yticks = nice_ticks(c.x_max, 7), nice_ticks(c.y_max, 6)
    _grid(c, yticks)
    grid, best = best_gear_envelope(chart, top_speed)
    outline = np.concatenate([grid, grid[::-1]]), np.concatenate([best, np.zeros_like(best)])
    c.add(Polygon(c.pxs(outline[0]), c.pys(outline[1]), ENVELOPE))
    if chart.road_load is not None:
        _road_load(c, chart.road_load, top_force)
    if grip is not None and grip < 1.6 * top_force:
        py = c.py(grip)
        c.add(Line(AX_X, py, AX_X + AX_W, py, Stroke("#4a4a4a", 0.9, (4.5, 2.7))))
        c.add(Text(AX_X + AX_W, py - 2.0, "traction limit ", 7.0, "#4a4a4a", "end", italic=True))
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
            c.add(Marker("D", c.px(xi), c.py(yi), 4.6, "#111111", Stroke(PAPER, 0.7)))
    _frame(c, chart.speed_label, chart.force_label, xticks, yticks)
    note = "circled number: gear; diamond: shift point"
    c.add(Text(AX_X + 0.995 * AX_W, AX_Y - 0.985 * AX_H + 6.0, note, 6.5, "#555555", "end"))
    return c


def _run(chart: RunChart) -> _Canvas:
    top_time = max(max(float(s.time[-1]) for s in chart.segments), 1e-3)
    top_speed = max(max(float(s.speed.max()) for s in chart.segments), 1e-3)
    c = _Canvas(top_time * 1.03, top_speed * 1.12)
    xticks, yticks = nice_ticks(c.x_max, 7), nice_ticks(c.y_max, 6)
    _grid(c, yticks)
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
        px, py = c.px(s.time), c.py(s.speed)
        c.add(Marker("D", px, py, 4.6, "#111111", Stroke(PAPER, 0.7)))
        c.add(Text(px + 5.0, py + 4.0 + 6.0, s.label, 6.5, "#333333"))
    _frame(c, chart.time_label, chart.speed_label, xticks, yticks)
    return c


def chart_items(chart: TractiveForceChart | RunChart) -> list[Item]:
    """Every item of the chart's page in drawing order: the title block, then the plot
    (grid, fills, lines, markers, labels, axes) and the footer."""
    c = _tractive_force(chart) if isinstance(chart, TractiveForceChart) else _run(chart)
    return [
        Text(AX_X, HEIGHT_PT * 0.045, chart.title, 12.0, "#14213d", bold=True),
        Text(AX_X, HEIGHT_PT * 0.095, chart.subtitle, 7.5, "#4d4d4d"),
        Text(WIDTH_PT * 0.99, HEIGHT_PT * 0.988, chart.footer, 6.5, "#6b6b6b", anchor="end"),
        *c.items,
    ]
