"""The track answers' x-y charts drawn as PDF vector paths, from the same records and with
the same ticks, inks, dashes and pieces of line as their SVG (``svg_chart_track``)."""

from __future__ import annotations

import numpy as np

from service.output.chart_data_track import PlotChart, PlotSeries, clip_polyline
from service.output.chart_page import INKS
from service.output.pdf_chart import Box, draw_frame
from service.output.pdf_ink import Ink
from service.output.pdf_layout import latin, text_width
from service.output.svg_chart_track import free_spot, range_ticks, tick_text

__all__ = ["draw_track_chart"]

# dash and gap [mm] per series, as the force chart's gears: solid, long dash, dots, ...
_DASHES = ((0.0, 0.0), (2.5, 0.8), (0.55, 0.65), (1.6, 0.7), (1.2, 0.65), (3.6, 0.8))
_MARK_SIDES = (12, 4, 3, 4, 3, 5)
_MARK_TURN = (0.0, 45.0, 90.0, 0.0, -90.0, 90.0)  # degrees


def _rgb(ink: str) -> tuple[int, int, int]:
    return int(ink[1:3], 16), int(ink[3:5], 16), int(ink[5:7], 16)


class _Axes:
    """Data -> page mapping of the plot box [mm]."""

    def __init__(self, box: Box, chart: PlotChart) -> None:
        self.box = box
        (self.x0, self.x1), (self.y0, self.y1) = chart.x_range, chart.y_range

    def x(self, value: float) -> float:
        return self.box.x + (value - self.x0) / (self.x1 - self.x0) * self.box.w

    def y(self, value: float) -> float:
        return self.box.y + self.box.h * (1.0 - (value - self.y0) / (self.y1 - self.y0))

    def points(self, xs: np.ndarray, ys: np.ndarray) -> list[tuple[float, float]]:
        return [(self.x(a), self.y(b)) for a, b in zip(xs.tolist(), ys.tolist(), strict=True)]


def _frame(pdf: Ink, ax: _Axes, chart: PlotChart) -> None:
    yt, xt = range_ticks(ax.y0, ax.y1, 6), range_ticks(ax.x0, ax.x1, 7)
    yticks = [(ax.y(v), tick_text(v, yt), v > ax.y0) for v in yt]
    xticks = [(ax.x(v), tick_text(v, xt)) for v in xt]
    draw_frame(pdf, ax.box, yticks, xticks, latin(chart.x_label), latin(chart.y_label))


def _bands(pdf: Ink, ax: _Axes, chart: PlotChart) -> None:
    if chart.level is None:
        return
    top = ax.y(min(chart.level, ax.y1))
    for i, s in enumerate(chart.series):
        if s.band is None:
            continue
        a, b = (ax.x(min(max(v, ax.x0), ax.x1)) for v in s.band)
        r, g, bl = _rgb(INKS[i % len(INKS)])
        # the SVG's 13 % ink over white paper, as an opaque tint
        pdf.set_fill_color(*(round(255 - 0.13 * (255 - c)) for c in (r, g, bl)))
        pdf.rect(a, top, max(b - a, 0.3), ax.box.y + ax.box.h - top, style="F")


def _level(pdf: Ink, ax: _Axes, chart: PlotChart) -> None:
    if chart.level is None or not ax.y0 < chart.level < ax.y1:
        return
    y = ax.y(chart.level)
    pdf.set_draw_color(74, 74, 74)
    pdf.set_line_width(0.3)
    pdf.set_dash_pattern(1.8, 1.0)
    pdf.line(ax.box.x, y, ax.box.x + ax.box.w, y)
    pdf.set_dash_pattern()
    pdf.set_font("helvetica", "I", 6.5)
    pdf.set_text_color(80, 80, 80)
    text = latin(chart.level_label)
    pdf.text(ax.box.x + ax.box.w - 0.8 - text_width(pdf, text), y - 0.9, text)


def _mark(pdf: Ink, x: float, y: float, i: int, size: float) -> None:
    k = i % len(_MARK_SIDES)
    turn = np.radians(_MARK_TURN[k])
    angles = turn + np.linspace(0.0, 2 * np.pi, _MARK_SIDES[k], endpoint=False)
    xs, ys = (x + size * np.cos(angles)).tolist(), (y - size * np.sin(angles)).tolist()
    pdf.polygon(list(zip(xs, ys, strict=True)), style="DF")


def _series(pdf: Ink, ax: _Axes, chart: PlotChart, i: int, s: PlotSeries) -> None:
    ink = _rgb(INKS[i % len(INKS)])
    pdf.set_draw_color(*ink)
    dash, gap = _DASHES[i % len(_DASHES)]
    pdf.set_line_width(0.2)
    pdf.set_fill_color(255, 255, 255)
    for x, y in zip(s.mark_x.tolist(), s.mark_y.tolist(), strict=True):
        if ax.x0 <= x <= ax.x1 and ax.y0 <= y <= ax.y1:
            _mark(pdf, ax.x(x), ax.y(y), i, 0.6)
    pdf.set_line_width(0.5)
    if dash:
        pdf.set_dash_pattern(dash, gap)
    for xs, ys in clip_polyline(s.x, s.y, chart.x_range, chart.y_range):
        pdf.polyline(ax.points(xs, ys), style="D")
    pdf.set_dash_pattern()
    if s.best is not None:
        px, py, r = ax.x(s.best[0]), ax.y(s.best[1]), 1.3
        pdf.set_draw_color(255, 255, 255)
        pdf.set_fill_color(17, 17, 17)
        pdf.polygon([(px, py - r), (px + r, py), (px, py + r), (px - r, py)], style="DF")


def _tags(pdf: Ink, ax: _Axes, chart: PlotChart) -> None:
    box = ax.box
    pdf.set_font("helvetica", "B", 6.5)
    pdf.set_line_width(0.25)
    placed: list[tuple[float, float, float, float]] = []
    for i, s in enumerate(chart.series):
        ink = _rgb(INKS[i % len(INKS)])
        pieces = clip_polyline(s.x, s.y, chart.x_range, chart.y_range)
        x, y = box.x, box.y
        if pieces:
            xs, ys = pieces[-1] if chart.tag_at_end else pieces[0]
            k = -1 if chart.tag_at_end else 0
            x, y = ax.x(float(xs[k])), ax.y(float(ys[k]))
        text = latin(s.label)
        w = text_width(pdf, text) + 2.0
        x, y = (x + 1.0, y - 5.0) if chart.tag_at_end else (x - w - 1.0, y + 0.8)
        x = min(max(x, box.x + 0.8), box.x + box.w - w)
        y = min(max(y, box.y + 0.8), box.y + box.h - 4.5)
        y = free_spot(placed, x, y, w, 3.5)
        pdf.set_draw_color(*ink)
        pdf.set_fill_color(255, 255, 255)
        pdf.rect(x, y, w, 3.5, style="DF")
        pdf.set_text_color(*ink)
        pdf.text(x + 1.0, y + 2.6, text)


def draw_track_chart(pdf: Ink, box: Box, chart: PlotChart) -> None:
    """Draw the chart's plot (axes, bands, lines, marks, tags) inside ``box``."""
    ax = _Axes(box, chart)
    _bands(pdf, ax, chart)
    _frame(pdf, ax, chart)
    _level(pdf, ax, chart)
    for i, s in enumerate(chart.series):
        _series(pdf, ax, chart, i, s)
    _tags(pdf, ax, chart)
    pdf.set_font("helvetica", "", 6.2)
    pdf.set_text_color(85, 85, 85)
    key = latin(chart.key)
    pdf.text(box.x + box.w - text_width(pdf, key), box.y - 1.6, key)
    pdf.set_dash_pattern()
    pdf.set_text_color(22, 22, 22)
    pdf.set_draw_color(0, 0, 0)
