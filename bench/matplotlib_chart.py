"""The charts as matplotlib drew them before the PNG writer painted them itself: kept as a
reference for the benchmarks (``bench.charts`` times its PNG beside the served one,
``bench.sheets`` its PDF beside the typeset sheet), never served.

Agg, no GUI, no pyplot; style parameters are applied inside ``drawing()``, which also
serialises renders (rcParams are process-wide).
"""

from __future__ import annotations

import io
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from typing import Any

import matplotlib

matplotlib.use("Agg")

import numpy as np
from matplotlib.axes import Axes
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.ticker import MaxNLocator

from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_layout import best_gear_envelope
from service.output.chart_page import ENVELOPE, INKS, MARKERS, PAPER

__all__ = ["chart_figure", "drawing", "matplotlib_png"]

RC: dict[str, Any] = {
    "svg.hashsalt": "gearwork",
    "svg.fonttype": "none",  # text stays text: small, searchable, selectable
    "pdf.fonttype": 42,
    # drawn in the bundled DejaVu Sans; an SVG viewer without it falls back along the list
    "font.family": "sans-serif",
    "font.sans-serif": ["DejaVu Sans", "Verdana", "Arial", "Helvetica"],
    "font.size": 8.5,
    "text.parse_math": False,  # a reference with "$" is text, not mathtext
    "axes.unicode_minus": False,
    "axes.formatter.limits": (-4, 5),  # tick labels of at most five digits, else an offset
    "axes.linewidth": 0.8,
    "axes.edgecolor": "#3a3a3a",
    "axes.labelcolor": "#1e1e1e",
    "xtick.color": "#3a3a3a",
    "ytick.color": "#3a3a3a",
    "xtick.direction": "out",
    "ytick.direction": "out",
    "path.simplify": True,
}
SIZE_IN = (7.5, 4.6)
AXES_RECT = (0.1, 0.115, 0.86, 0.735)
PNG_DPI = 120
DASHES: tuple[Any, ...] = (
    "-",
    (0, (7.0, 2.2)),
    (0, (1.6, 1.8)),
    (0, (7.0, 2.0, 1.6, 2.0)),
    (0, (3.6, 1.8)),
    (0, (10.0, 2.0, 1.6, 2.0, 1.6, 2.0)),
)
SHIFT_MARKER: dict[str, Any] = {
    "marker": "D",
    "markersize": 4.6,
    "markerfacecolor": "#111111",
    "markeredgecolor": PAPER,
    "markeredgewidth": 0.7,
}
_LOCK = threading.Lock()


@contextmanager
def drawing(overrides: dict[str, Any] | None = None) -> Iterator[None]:
    """Hold the render lock with the house style (and ``overrides``) in force; rcParams
    are process-wide, so renders take turns."""
    merged: dict[Any, Any] = {**RC, **(overrides or {})}
    with _LOCK, matplotlib.rc_context(merged):
        yield


def gear_style(gear: int) -> dict[str, Any]:
    """Line style of a gear (1 for first): ink, dash pattern and marker all differ, so the
    gears stay apart in greyscale; gears 7-12 repeat 1-6 with filled markers."""
    i = gear - 1
    ink = INKS[i % len(INKS)]
    return {
        "color": ink,
        "linestyle": DASHES[i % len(DASHES)],
        "marker": MARKERS[i % len(MARKERS)],
        "markerfacecolor": PAPER if i < len(MARKERS) else ink,
        "markeredgecolor": ink,
        "markersize": 3.6,
        "linewidth": 1.5,
    }


def _label_gear(ax: Axes, gear: int, x: float, y: float, dx: float, dy: float) -> None:
    ink = INKS[(gear - 1) % len(INKS)]
    ax.annotate(
        str(gear),
        (x, y),
        xytext=(dx, dy),
        textcoords="offset points",
        ha="center",
        va="center",
        fontsize=7,
        fontweight="bold",
        color=ink,
        bbox={"boxstyle": "circle,pad=0.22", "fc": PAPER, "ec": ink, "lw": 0.8},
        zorder=6,
    )


def _frame(ax: Axes, xlabel: str, ylabel: str) -> None:
    # few ticks: each one costs three lines and two texts to build and draw
    ax.xaxis.set_major_locator(MaxNLocator(nbins=7, steps=[1, 2, 2.5, 5, 10]))
    ax.yaxis.set_major_locator(MaxNLocator(nbins=6, steps=[1, 2, 2.5, 5, 10]))
    ax.spines["top"].set_visible(False)
    ax.spines["right"].set_visible(False)
    ax.grid(True, axis="y", color="#b9b9b9", linewidth=0.5, linestyle=(0, (1.0, 2.0)))
    ax.set_axisbelow(True)
    ax.set_xlabel(xlabel)
    ax.set_ylabel(ylabel)


def _mark_drops(
    ax: Axes, x: list[float], y: list[float], labels: list[str], label_y: float, ground: str
) -> None:
    """Points with a dotted drop to the axis and their label standing along it."""
    drop_x = np.repeat(np.asarray(x), 3)
    drop_y = np.column_stack([np.zeros(len(y)), y, np.full(len(y), np.nan)]).ravel()
    ax.plot(drop_x, drop_y, color="#555555", linewidth=0.7, linestyle=(0, (1.0, 1.6)), zorder=1)
    for xi, text in zip(x, labels, strict=True):
        ax.text(
            xi,
            label_y,
            text,
            rotation=90,
            ha="right",
            va="bottom",
            fontsize=6.5,
            color="#333333",
            zorder=4,
            bbox={"boxstyle": "square,pad=0.1", "fc": ground, "ec": "none", "alpha": 0.85},
        )


def draw_tractive_force(ax: Axes, chart: TractiveForceChart) -> None:
    """Force per gear over road speed, the best-gear envelope, shifts, road load, grip."""
    top_speed = max(float(g.speed[-1]) for g in chart.gears)
    top_force = max(float(g.force.max()) for g in chart.gears)
    if chart.traction_limit is not None and chart.traction_limit < 1.6 * top_force:
        top_force = max(top_force, chart.traction_limit)
    top_speed, top_force = max(top_speed, 1e-3), max(top_force, 1e-3)
    grid, best = best_gear_envelope(chart, top_speed)
    ax.fill_between(grid, 0.0, best, color=ENVELOPE, linewidth=0, zorder=0.5)
    if chart.road_load is not None:
        v, f = chart.road_load
        ax.plot(v, f, color="#8f8f8f", linewidth=2.8, solid_capstyle="butt", zorder=2)
        k = int(np.searchsorted(f, 0.55 * top_force)) if f[-1] > 0.55 * top_force else -1
        ax.annotate(
            "road load",
            (float(v[k]), float(f[k])),
            xytext=(-4, 4),
            textcoords="offset points",
            ha="right",
            fontsize=7,
            color="#5e5e5e",
            style="italic",
            annotation_clip=True,
        )
    if chart.traction_limit is not None and chart.traction_limit < 1.6 * top_force:
        ax.axhline(chart.traction_limit, color="#4a4a4a", linewidth=0.9, linestyle=(0, (5, 3)))
        ax.text(
            1.07 * top_speed,
            chart.traction_limit,
            "traction limit ",
            ha="right",
            va="bottom",
            fontsize=7,
            color="#4a4a4a",
            style="italic",
        )
    for n, g in enumerate(chart.gears):
        style = gear_style(g.gear)
        ax.plot(g.speed, g.force, markevery=(3 + 2 * (n % 5), 14), zorder=3, **style)
        _label_gear(ax, g.gear, float(g.speed[-1]), float(g.force[-1]), 8.0, 4.0)
    if chart.shifts:
        x = [s.speed for s in chart.shifts]
        y = [s.force_before for s in chart.shifts]
        labels = [f"{s.from_gear}-{s.to_gear} {s.rpm:.0f} rpm" for s in chart.shifts]
        _mark_drops(ax, x, y, labels, 0.015 * top_force, ENVELOPE)
        ax.plot(x, y, linestyle="none", zorder=5, **SHIFT_MARKER)
    ax.set_xlim(0.0, top_speed * 1.07)
    ax.set_ylim(0.0, top_force * 1.12)
    _frame(ax, chart.speed_label, chart.force_label)
    ax.text(
        0.995,
        0.985,
        "circled number: gear; diamond: shift point",
        transform=ax.transAxes,
        ha="right",
        va="top",
        fontsize=6.5,
        color="#555555",
    )


def draw_run(ax: Axes, chart: RunChart) -> None:
    """Road speed over time by gear, the shifts and the timed distances."""
    top_time = max(max(float(s.time[-1]) for s in chart.segments), 1e-3)
    top_speed = max(max(float(s.speed.max()) for s in chart.segments), 1e-3)
    for n, seg in enumerate(chart.segments):
        style = gear_style(seg.gear)
        ax.plot(seg.time, seg.speed, markevery=(2 + n % 4, 12), zorder=3, **style)
        mid = seg.time.size // 2
        _label_gear(ax, seg.gear, float(seg.time[mid]), float(seg.speed[mid]), -7.0, 8.0)
    if chart.milestones:
        _mark_drops(
            ax,
            [m.time for m in chart.milestones],
            [m.speed for m in chart.milestones],
            [m.label for m in chart.milestones],
            0.015 * top_speed,
            PAPER,
        )
    if chart.shifts:
        ax.plot(
            [s.time for s in chart.shifts],
            [s.speed for s in chart.shifts],
            linestyle="none",
            zorder=5,
            **SHIFT_MARKER,
        )
        for s in chart.shifts:
            ax.annotate(
                s.label,
                (s.time, s.speed),
                xytext=(5, -4),
                textcoords="offset points",
                ha="left",
                va="top",
                fontsize=6.5,
                color="#333333",
            )
    ax.set_xlim(0.0, top_time * 1.03)
    ax.set_ylim(0.0, top_speed * 1.12)
    _frame(ax, chart.time_label, chart.speed_label)


def draw_chart(ax: Axes, chart: TractiveForceChart | RunChart) -> None:
    """Draw either chart into an existing axes (the PDF page places its own)."""
    if isinstance(chart, TractiveForceChart):
        draw_tractive_force(ax, chart)
    else:
        draw_run(ax, chart)


def chart_figure(chart: TractiveForceChart | RunChart) -> Figure:
    """A stand-alone figure: title block, the chart, a footer. Call inside ``drawing()``."""
    fig = Figure(figsize=SIZE_IN, dpi=100, facecolor=PAPER)
    FigureCanvasAgg(fig)
    fig.text(0.1, 0.955, chart.title, fontsize=12, fontweight="bold", color="#14213d")
    fig.text(0.1, 0.905, chart.subtitle, fontsize=7.5, color="#4d4d4d")
    fig.text(0.99, 0.012, chart.footer, ha="right", fontsize=6.5, color="#6b6b6b")
    ax = fig.add_axes(AXES_RECT)
    draw_chart(ax, chart)
    return fig


def matplotlib_png(chart: TractiveForceChart | RunChart) -> bytes:
    """The chart as the served PNG was made before: a matplotlib figure through Agg."""
    out = io.BytesIO()
    with drawing():
        chart_figure(chart).savefig(
            out,
            format="png",
            dpi=PNG_DPI,
            metadata={"Software": None},
            pil_kwargs={"compress_level": 3},
        )
    return out.getvalue()
