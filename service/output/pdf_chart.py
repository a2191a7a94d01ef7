"""The charts of a PDF sheet drawn as PDF vector paths, straight from the chart records.

A PDF page's lines, fills and text are PDF operators already, so the chart records are
drawn here in a few hundred path segments, in the same inks, dash patterns, markers and labels
as the SVG and PNG charts. Tick positions follow the same "nice step" rule as theirs
(``service.output.chart_layout.nice_ticks``), so the pictures share their scales.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np

from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_layout import nice_ticks
from service.output.chart_page import ENVELOPE, INKS
from service.output.pdf_ink import Ink
from service.output.pdf_layout import text_width

__all__ = ["Box", "draw_frame", "draw_pdf_chart"]

# dash and gap [mm] per gear: solid, long dash, dots, dash, short dash, very long dash
_DASHES = ((0.0, 0.0), (2.5, 0.8), (0.55, 0.65), (1.6, 0.7), (1.2, 0.65), (3.6, 0.8))
_MARKER_SIDES = (12, 4, 3, 4, 3, 5)  # circle, square, triangle, diamond, triangle, pentagon
_MARKER_TURN = (0.0, 45.0, 90.0, 0.0, -90.0, 90.0)  # degrees
_GREY = (85, 85, 85)


@dataclass(frozen=True)
class Box:
    """A rectangle on the page [mm], from its top-left corner."""

    x: float
    y: float
    w: float
    h: float


def _rgb(ink: str) -> tuple[int, int, int]:
    return int(ink[1:3], 16), int(ink[3:5], 16), int(ink[5:7], 16)


class _Axes:
    """Data -> page mapping of one plot area."""

    def __init__(self, box: Box, xmax: float, ymax: float) -> None:
        self.box, self.xmax, self.ymax = box, xmax, ymax

    def x(self, value: float | np.ndarray) -> np.ndarray:
        return self.box.x + np.asarray(value, dtype=float) / self.xmax * self.box.w

    def y(self, value: float | np.ndarray) -> np.ndarray:
        return self.box.y + self.box.h * (1.0 - np.asarray(value, dtype=float) / self.ymax)

    def points(self, xs: np.ndarray, ys: np.ndarray) -> list[tuple[float, float]]:
        px, py = self.x(xs), self.y(np.clip(ys, 0.0, self.ymax))
        return list(zip(px.tolist(), py.tolist(), strict=True))


def _tick_text(value: float) -> str:
    return f"{value:.0f}" if abs(value - round(value)) < 1e-9 else f"{value:g}"


def _frame(pdf: Ink, ax: _Axes, xlabel: str, ylabel: str) -> None:
    yticks = [(float(ax.y(v)), _tick_text(v), v > 0) for v in nice_ticks(ax.ymax / 1.0, 6)]
    xticks = [(float(ax.x(v)), _tick_text(v)) for v in nice_ticks(ax.xmax, 7)]
    draw_frame(pdf, ax.box, yticks, xticks, xlabel, ylabel)


def draw_frame(
    pdf: Ink,
    box: Box,
    yticks: list[tuple[float, str, bool]],
    xticks: list[tuple[float, str]],
    xlabel: str,
    ylabel: str,
) -> None:
    """Axes, ticks, grid lines and labels of a chart in ``box``.

    ``yticks`` holds (page y, text, draw a grid line) and ``xticks`` (page x, text).
    """
    pdf.set_font("helvetica", "", 7)
    pdf.set_dash_pattern()
    for y, text, grid in yticks:
        if grid:
            pdf.set_draw_color(185, 185, 185)
            pdf.set_line_width(0.15)
            pdf.set_dash_pattern(0.3, 0.7)
            pdf.line(box.x, y, box.x + box.w, y)
            pdf.set_dash_pattern()
        pdf.set_draw_color(58, 58, 58)
        pdf.set_line_width(0.25)
        pdf.line(box.x - 1.2, y, box.x, y)
        pdf.set_text_color(58, 58, 58)
        pdf.text(box.x - 1.8 - text_width(pdf, text), y + 0.9, text)
    for x, text in xticks:
        pdf.line(x, box.y + box.h, x, box.y + box.h + 1.2)
        pdf.text(x - text_width(pdf, text) / 2, box.y + box.h + 4.0, text)
    pdf.set_draw_color(58, 58, 58)
    pdf.set_line_width(0.28)
    pdf.line(box.x, box.y, box.x, box.y + box.h)
    pdf.line(box.x, box.y + box.h, box.x + box.w, box.y + box.h)
    pdf.set_font("helvetica", "", 7.5)
    pdf.set_text_color(30, 30, 30)
    pdf.text(box.x + box.w / 2 - text_width(pdf, xlabel) / 2, box.y + box.h + 8.0, xlabel)
    with pdf.rotation(90, box.x - 11.0, box.y + box.h / 2):
        pdf.text(box.x - 11.0 - text_width(pdf, ylabel) / 2, box.y + box.h / 2, ylabel)


def _marker(pdf: Ink, x: float, y: float, gear: int, size: float = 0.75) -> None:
    i = (gear - 1) % len(_MARKER_SIDES)
    sides, turn = _MARKER_SIDES[i], np.radians(_MARKER_TURN[i])
    angles = turn + np.linspace(0.0, 2 * np.pi, sides, endpoint=False)
    xs, ys = (x + size * np.cos(angles)).tolist(), (y - size * np.sin(angles)).tolist()
    pts = list(zip(xs, ys, strict=True))
    pdf.polygon(pts, style="DF")


def _gear_line(pdf: Ink, ax: _Axes, gear: int, xs: np.ndarray, ys: np.ndarray, start: int) -> None:
    i = gear - 1
    ink = _rgb(INKS[i % len(INKS)])
    pdf.set_draw_color(*ink)
    pdf.set_line_width(0.5)
    dash, gap = _DASHES[i % len(_DASHES)]
    if dash:
        pdf.set_dash_pattern(dash, gap)
    pts = ax.points(xs, ys)
    pdf.polyline(pts, style="D")
    pdf.set_dash_pattern()
    pdf.set_line_width(0.25)
    pdf.set_fill_color(*(ink if i >= len(_MARKER_SIDES) else (255, 255, 255)))
    for px, py in pts[start::14]:
        _marker(pdf, px, py, gear)


def _gear_label(pdf: Ink, x: float, y: float, gear: int) -> None:
    ink = _rgb(INKS[(gear - 1) % len(INKS)])
    pdf.set_draw_color(*ink)
    pdf.set_fill_color(255, 255, 255)
    pdf.set_line_width(0.25)
    pdf.set_dash_pattern()
    angles = np.linspace(0.0, 2 * np.pi, 16, endpoint=False)
    r = 1.7
    ring = zip((x + r * np.cos(angles)).tolist(), (y + r * np.sin(angles)).tolist(), strict=True)
    pdf.polygon(list(ring), style="DF")
    pdf.set_font("helvetica", "B", 6.5)
    pdf.set_text_color(*ink)
    text = str(gear)
    pdf.text(x - text_width(pdf, text) / 2, y + 0.8, text)


def _drops(
    pdf: Ink,
    ax: _Axes,
    points: tuple[Sequence[float], Sequence[float]],
    labels: Sequence[str],
    ground: tuple[int, int, int],
) -> None:
    """Dotted drops from points to the axis, each with its label standing along it."""
    xs, ys = points
    base = ax.box.y + ax.box.h
    pdf.set_draw_color(*_GREY)
    pdf.set_line_width(0.2)
    pdf.set_dash_pattern(0.3, 0.55)
    for x, y in zip(xs, ys, strict=True):
        pdf.line(float(ax.x(x)), float(ax.y(y)), float(ax.x(x)), base)
    pdf.set_dash_pattern()
    pdf.set_font("helvetica", "", 6)
    pdf.set_text_color(51, 51, 51)
    pdf.set_fill_color(*ground)
    for x, text in zip(xs, labels, strict=True):
        px = float(ax.x(x)) - 0.6
        with pdf.rotation(90, px, base - 0.8):
            pdf.rect(px - 0.3, base - 3.0, text_width(pdf, text) + 0.6, 2.6, style="F")
            pdf.text(px, base - 0.8, text)


def _diamonds(pdf: Ink, ax: _Axes, xs: Sequence[float], ys: Sequence[float]) -> None:
    pdf.set_draw_color(255, 255, 255)
    pdf.set_fill_color(17, 17, 17)
    pdf.set_line_width(0.2)
    for x, y in zip(xs, ys, strict=True):
        px, py = float(ax.x(x)), float(ax.y(y))
        r = 1.15
        pdf.polygon([(px, py - r), (px + r, py), (px, py + r), (px - r, py)], style="DF")


def _envelope(chart: TractiveForceChart, top_speed: float) -> tuple[np.ndarray, np.ndarray]:
    grid = np.linspace(0.0, top_speed, 161)
    each = np.stack(
        [np.interp(grid, g.speed, g.force, left=-np.inf, right=-np.inf) for g in chart.gears]
    )
    best = each.max(axis=0)
    return grid, np.where(np.isfinite(best), np.maximum(best, 0.0), 0.0)


def _note(pdf: Ink, box: Box, text: str) -> None:
    pdf.set_font("helvetica", "", 6.2)
    pdf.set_text_color(85, 85, 85)
    pdf.text(box.x + box.w - text_width(pdf, text), box.y + 2.0, text)


def _italic(pdf: Ink, x: float, y: float, text: str, right: bool = True) -> None:
    pdf.set_font("helvetica", "I", 6.5)
    pdf.set_text_color(80, 80, 80)
    pdf.text(x - (text_width(pdf, text) if right else 0.0), y, text)


def _tractive_force(pdf: Ink, box: Box, chart: TractiveForceChart) -> None:
    top_speed = max(max(float(g.speed[-1]) for g in chart.gears), 1e-3)
    top_force = max(max(float(g.force.max()) for g in chart.gears), 1e-3)
    grip = chart.traction_limit
    if grip is not None and grip < 1.6 * top_force:
        top_force = max(top_force, grip)
    ax = _Axes(box, top_speed * 1.07, top_force * 1.12)
    grid, best = _envelope(chart, top_speed)
    pdf.set_fill_color(*_rgb(ENVELOPE))
    outline = [*ax.points(grid, best), *ax.points(grid[::-1], np.zeros(grid.size))]
    pdf.polygon(outline, style="F")
    _frame(pdf, ax, chart.speed_label, chart.force_label)
    if chart.road_load is not None:
        v, f = chart.road_load
        pdf.set_draw_color(143, 143, 143)
        pdf.set_line_width(0.95)
        pdf.polyline(ax.points(v, f), style="D")
        k = int(np.searchsorted(f, 0.55 * top_force)) if f[-1] > 0.55 * top_force else -1
        _italic(pdf, float(ax.x(v[k])) - 1.2, float(ax.y(min(f[k], ax.ymax))) - 1.2, "road load")
    if grip is not None and grip < 1.6 * top_force:
        y = float(ax.y(grip))
        pdf.set_draw_color(74, 74, 74)
        pdf.set_line_width(0.3)
        pdf.set_dash_pattern(1.8, 1.0)
        pdf.line(box.x, y, box.x + box.w, y)
        pdf.set_dash_pattern()
        _italic(pdf, box.x + box.w, y - 0.8, "traction limit")
    for n, g in enumerate(chart.gears):
        _gear_line(pdf, ax, g.gear, g.speed, g.force, 3 + 2 * (n % 5))
    if chart.shifts:
        xs = [s.speed for s in chart.shifts]
        ys = [s.force_before for s in chart.shifts]
        labels = [f"{s.from_gear}-{s.to_gear} {s.rpm:.0f} rpm" for s in chart.shifts]
        _drops(pdf, ax, (xs, ys), labels, _rgb(ENVELOPE))
        _diamonds(pdf, ax, xs, ys)
    for g in chart.gears:
        x, y = float(ax.x(g.speed[-1])) + 2.8, float(ax.y(min(g.force[-1], ax.ymax))) - 1.4
        _gear_label(pdf, x, y, g.gear)
    _note(pdf, box, "circled number: gear; diamond: shift point")


def _run(pdf: Ink, box: Box, chart: RunChart) -> None:
    top_time = max(max(float(s.time[-1]) for s in chart.segments), 1e-3)
    top_speed = max(max(float(s.speed.max()) for s in chart.segments), 1e-3)
    ax = _Axes(box, top_time * 1.03, top_speed * 1.12)
    _frame(pdf, ax, chart.time_label, chart.speed_label)
    if chart.milestones:
        ms = chart.milestones
        points = ([m.time for m in ms], [m.speed for m in ms])
        _drops(pdf, ax, points, [m.label for m in ms], (255, 255, 255))
    for n, seg in enumerate(chart.segments):
        _gear_line(pdf, ax, seg.gear, seg.time, seg.speed, 2 + n % 4)
    if chart.shifts:
        _diamonds(pdf, ax, [s.time for s in chart.shifts], [s.speed for s in chart.shifts])
        pdf.set_font("helvetica", "", 6)
        pdf.set_text_color(51, 51, 51)
        for s in chart.shifts:
            pdf.text(float(ax.x(s.time)) + 1.8, float(ax.y(s.speed)) + 2.6, s.label)
    for seg in chart.segments:
        mid = seg.time.size // 2
        x, y = float(ax.x(seg.time[mid])) - 2.5, float(ax.y(seg.speed[mid])) - 2.8
        _gear_label(pdf, x, y, seg.gear)


def draw_pdf_chart(pdf: Ink, box: Box, chart: TractiveForceChart | RunChart) -> None:
    """Draw the chart's plot (axes, curves, marks) inside ``box`` on the current page."""
    if isinstance(chart, TractiveForceChart):
        _tractive_force(pdf, box, chart)
    else:
        _run(pdf, box, chart)
    pdf.set_dash_pattern()
    pdf.set_text_color(22, 22, 22)
    pdf.set_draw_color(0, 0, 0)
