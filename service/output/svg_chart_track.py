"""The track answers' x-y charts written straight to SVG, in the look of
``service.output.svg_chart`` (page, axes box, inks, dashes, markers, type).

Axes need not start at zero (shift rpm does not); ticks follow the same 1-2-2.5-5 rule from
the first multiple of the step at or above the axis start. The same chart gives the same
bytes.
"""

from __future__ import annotations

import math

import numpy as np

from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_data_track import PlotChart, PlotSeries, clip_polyline
from service.output.chart_page import (
    AX_H,
    AX_W,
    AX_X,
    AX_Y,
    CHAR_EM,
    DASHES,
    HEIGHT_PT,
    INKS,
    LINE_WIDTH,
    MARKER_SIZE,
    MARKERS,
    PAPER,
    WIDTH_PT,
)
from service.output.png_chart import svg_markup
from service.output.svg_chart import FONT, _marker, _n, _text

__all__ = ["free_spot", "range_ticks", "sheet_svg", "tick_text", "track_svg"]

SheetChart = TractiveForceChart | RunChart | PlotChart


def range_ticks(lo: float, hi: float, intervals: int) -> list[float]:
    """Ticks inside ``[lo, hi]`` at the smallest 1, 2, 2.5, 5 or 10 times a power of ten
    that covers the span in at most ``intervals`` steps.

    >>> range_ticks(3430.0, 6590.0, 7)
    [3500.0, 4000.0, 4500.0, 5000.0, 5500.0, 6000.0, 6500.0]
    >>> range_ticks(0.0, 0.1, 6)
    [0.0, 0.02, 0.04, 0.06, 0.08, 0.1]
    """
    raw = (hi - lo) / intervals
    power = 10.0 ** math.floor(math.log10(raw))
    step = next(m * power for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * power >= raw * (1 - 1e-9))
    first = math.ceil(lo / step - 1e-9)
    last = math.floor(hi / step + 1e-9)
    return [round(k * step, 10) for k in range(first, last + 1)]


def tick_text(value: float, ticks: list[float]) -> str:
    """A tick label with the decimals its step needs.

    >>> tick_text(0.04, [0.0, 0.02, 0.04]), tick_text(4500.0, [4000.0, 4500.0])
    ('0.04', '4500')
    """
    step = ticks[1] - ticks[0] if len(ticks) > 1 else 1.0
    decimals = 0
    while decimals < 6 and abs(round(step, decimals) - step) > 1e-9 * step:
        decimals += 1
    return f"{value:.{decimals}f}"


class _Page:
    """Data-to-page mapping of the plot box and the growing list of SVG elements."""

    def __init__(self, chart: PlotChart) -> None:
        (self.x0, self.x1), (self.y0, self.y1) = chart.x_range, chart.y_range
        self.parts: list[str] = []

    def px(self, x: float) -> float:
        return AX_X + (x - self.x0) / (self.x1 - self.x0) * AX_W

    def py(self, y: float) -> float:
        return AX_Y - (y - self.y0) / (self.y1 - self.y0) * AX_H

    def points(self, x: np.ndarray, y: np.ndarray) -> str:
        return " ".join(
            f"{_n(self.px(a))},{_n(self.py(b))}"
            for a, b in zip(x.tolist(), y.tolist(), strict=True)
        )


def _frame(page: _Page, chart: PlotChart) -> None:
    xt = range_ticks(page.x0, page.x1, 7)
    yt = range_ticks(page.y0, page.y1, 6)
    grid = "".join(
        f'<line x1="{_n(AX_X)}" y1="{_n(page.py(t))}" x2="{_n(AX_X + AX_W)}" '
        f'y2="{_n(page.py(t))}"/>'
        for t in yt
        if t > page.y0
    )
    page.parts.append(
        f'<g stroke="#b9b9b9" stroke-width="0.5" stroke-dasharray="0.5,1">{grid}</g>'
    )
    ticks = []
    for t in xt:
        x = page.px(t)
        ticks.append(f'<line x1="{_n(x)}" y1="{_n(AX_Y)}" x2="{_n(x)}" y2="{_n(AX_Y + 3.5)}"/>')
        page.parts.append(_text(x, AX_Y + 13.0, tick_text(t, xt), 8.5, "#3a3a3a", anchor="middle"))
    for t in yt:
        y = page.py(t)
        ticks.append(f'<line x1="{_n(AX_X)}" y1="{_n(y)}" x2="{_n(AX_X - 3.5)}" y2="{_n(y)}"/>')
        page.parts.append(
            _text(AX_X - 6.0, y + 3.0, tick_text(t, yt), 8.5, "#3a3a3a", anchor="end")
        )
    page.parts.append(
        f'<path d="M{_n(AX_X)},{_n(AX_Y - AX_H)} V{_n(AX_Y)} H{_n(AX_X + AX_W)}" fill="none" '
        'stroke="#3a3a3a" stroke-width="0.8"/><g stroke="#3a3a3a" stroke-width="0.8">'
        + "".join(ticks)
        + "</g>"
    )
    page.parts.append(
        _text(AX_X + AX_W / 2, AX_Y + 25.0, chart.x_label, 8.5, "#1e1e1e", anchor="middle")
    )
    widest = max(len(tick_text(t, yt)) for t in yt)
    lx = AX_X - 10.0 - widest * CHAR_EM * 8.5
    page.parts.append(
        _text(lx, AX_Y - AX_H / 2, chart.y_label, 8.5, "#1e1e1e", anchor="middle", rotate=True)
    )


def _bands(page: _Page, chart: PlotChart) -> None:
    if chart.level is None:
        return
    top = page.py(min(chart.level, page.y1))
    for i, s in enumerate(chart.series):
        if s.band is None:
            continue
        a, b = (page.px(min(max(v, page.x0), page.x1)) for v in s.band)
        ink = INKS[i % len(INKS)]
        page.parts.append(
            f'<rect x="{_n(a)}" y="{_n(top)}" width="{_n(max(b - a, 0.8))}" '
            f'height="{_n(AX_Y - top)}" fill="{ink}" fill-opacity="0.13"/>'
        )


def _series(page: _Page, chart: PlotChart, i: int, s: PlotSeries) -> None:
    ink, dash = INKS[i % len(INKS)], DASHES[i % len(DASHES)]
    dash_attr = f' stroke-dasharray="{",".join(_n(d * LINE_WIDTH) for d in dash)}"' if dash else ""
    kind = MARKERS[i % len(MARKERS)]
    for x, y in zip(s.mark_x.tolist(), s.mark_y.tolist(), strict=True):
        if page.x0 <= x <= page.x1 and page.y0 <= y <= page.y1:
            page.parts.append(
                _marker(kind, page.px(x), page.py(y), MARKER_SIZE * 0.8, PAPER, ink, 0.7)
            )
    for x, y in clip_polyline(s.x, s.y, chart.x_range, chart.y_range):
        page.parts.append(
            f'<polyline points="{page.points(x, y)}" fill="none" stroke="{ink}" '
            f'stroke-width="{_n(LINE_WIDTH)}" stroke-linejoin="round"{dash_attr}/>'
        )
    if s.best is not None:
        bx, by = page.px(s.best[0]), page.py(s.best[1])
        page.parts.append(_marker("D", bx, by, 5.2, "#111111", PAPER, 0.7))


def _tag_at(page: _Page, chart: PlotChart, s: PlotSeries) -> tuple[float, float]:
    """Where a series' tag points: the first visible point of its line (or the last)."""
    pieces = clip_polyline(s.x, s.y, chart.x_range, chart.y_range)
    if not pieces:
        return page.px(page.x0), page.py(page.y1)
    x, y = pieces[-1] if chart.tag_at_end else pieces[0]
    k = -1 if chart.tag_at_end else 0
    return page.px(float(x[k])), page.py(float(y[k]))


def free_spot(
    placed: list[tuple[float, float, float, float]], x: float, y: float, w: float, h: float
) -> float:
    """``y`` moved up (page units grow down) until the box clears every placed box.

    >>> free_spot([(0.0, 10.0, 20.0, 10.0)], 5.0, 12.0, 10.0, 10.0)
    -1.0
    """
    moved = True
    while moved:
        moved = False
        for px, py, pw, ph in placed:
            if x < px + pw and px < x + w and y < py + ph and py < y + h:
                y, moved = py - h - 1.0, True
    placed.append((x, y, w, h))
    return y


def _tags(page: _Page, chart: PlotChart) -> None:
    placed: list[tuple[float, float, float, float]] = []
    for i, s in enumerate(chart.series):
        ink = INKS[i % len(INKS)]
        x, y = _tag_at(page, chart, s)
        w = len(s.label) * CHAR_EM * 7.0 + 5.0
        x, y = (x + 3.0, y - 14.0) if chart.tag_at_end else (x - w - 3.0, y + 2.0)
        x = min(max(x, AX_X + 2.0), AX_X + AX_W - w)
        y = min(max(y, AX_Y - AX_H + 2.0), AX_Y - 12.0)
        y = free_spot(placed, x, y, w, 10.0)
        page.parts.append(
            f'<rect x="{_n(x)}" y="{_n(y)}" width="{_n(w)}" height="10" rx="2.5" '
            f'fill="{PAPER}" stroke="{ink}" stroke-width="0.8"/>'
        )
        page.parts.append(
            _text(x + w / 2, y + 7.4, s.label, 7.0, ink, anchor="middle", weight="bold")
        )


def _level(page: _Page, chart: PlotChart) -> None:
    if chart.level is None or not page.y0 < chart.level < page.y1:
        return
    y = page.py(chart.level)
    page.parts.append(
        f'<line x1="{_n(AX_X)}" y1="{_n(y)}" x2="{_n(AX_X + AX_W)}" y2="{_n(y)}" '
        'stroke="#4a4a4a" stroke-width="0.9" stroke-dasharray="4.5,2.7"/>'
    )
    page.parts.append(
        _text(
            AX_X + AX_W - 2.0,
            y - 2.5,
            chart.level_label,
            7.0,
            "#4a4a4a",
            anchor="end",
            italic=True,
        )
    )


def track_svg(chart: PlotChart) -> str:
    """The chart as an ``<svg>`` element to inline in HTML (no XML prolog)."""
    page = _Page(chart)
    _frame(page, chart)
    _bands(page, chart)
    _level(page, chart)
    for i, s in enumerate(chart.series):
        _series(page, chart, i, s)
    _tags(page, chart)
    page.parts.append(
        _text(AX_X + AX_W, AX_Y - AX_H - 5.0, chart.key, 6.5, "#555555", anchor="end")
    )
    titles = [
        _text(AX_X, HEIGHT_PT * 0.045, chart.title, 12.0, "#14213d", weight="bold"),
        _text(AX_X, HEIGHT_PT * 0.095, chart.subtitle, 7.5, "#4d4d4d"),
        _text(WIDTH_PT * 0.99, HEIGHT_PT * 0.988, chart.footer, 6.5, "#6b6b6b", anchor="end"),
    ]
    return (
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_n(WIDTH_PT)}pt" '
        f'height="{_n(HEIGHT_PT)}pt" viewBox="0 0 {_n(WIDTH_PT)} {_n(HEIGHT_PT)}" '
        f'font-family="{FONT}">\n<rect width="100%" height="100%" fill="{PAPER}"/>\n'
        + "\n".join([*titles, *page.parts])
        + "\n</svg>\n"
    )


def sheet_svg(chart: SheetChart) -> str:
    """Any sheet's chart as an inline ``<svg>`` element."""
    return track_svg(chart) if isinstance(chart, PlotChart) else svg_markup(chart)
