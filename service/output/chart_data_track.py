"""What the charts of the track answers show, in the caller's units: a coast-down's logged
speed against its fitted trace, and each gear change's time lost against its shift rpm.

Both are one kind of record, an x-y plot (``PlotChart``) of a few series, each a line,
marks (logged samples) and optionally a window band; the drawing (``svg_chart_track``,
``pdf_chart_track``) never converts a unit. Lines are clipped to the plot box here, in
data units, so the SVG and the PDF draw the same pieces.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import NDArray

from core.car.coast_down_trace import coast_down_trace
from service.output.chart_data import FOOTER
from service.schemas.coastdown import CoastDownRequest
from service.units import Quantity, UnitSystem, from_si, to_si

__all__ = [
    "PlotChart",
    "PlotSeries",
    "clip_polyline",
    "coast_down_chart",
    "shift_window_chart",
]

FloatArray = NDArray[np.float64]
TRACE_POINTS = 121
MOST_MARKS = 45  # logged samples drawn per run: enough to see the scatter, few to draw


@dataclass(frozen=True)
class PlotSeries:
    """One series: a line, marks, an optional window band and best point.

    Attributes
    ----------
    label : str
        Short tag drawn beside the line (``"1 out"``, ``"2-3"``).
    x, y : ndarray
        The line, in data units (may be empty).
    mark_x, mark_y : ndarray
        Points drawn as marks (logged samples), in data units (may be empty).
    band : tuple of (float, float) or None
        An x span shaded under the chart's level (a shift window).
    best : tuple of (float, float) or None
        A point marked with a diamond (the best shift rpm).
    """

    label: str
    x: FloatArray
    y: FloatArray
    mark_x: FloatArray = field(default_factory=lambda: np.zeros(0))
    mark_y: FloatArray = field(default_factory=lambda: np.zeros(0))
    band: tuple[float, float] | None = None
    best: tuple[float, float] | None = None


@dataclass(frozen=True)
class PlotChart:
    """An x-y chart of a few series over fixed axis ranges.

    ``level`` draws a dashed horizontal line with ``level_label`` (a tolerance); ``key``
    is a one-line legend set at the top right of the plot; each series' tag stands by the
    first visible point of its line, or by the last with ``tag_at_end``.
    """

    title: str
    subtitle: str
    x_label: str
    y_label: str
    x_range: tuple[float, float]
    y_range: tuple[float, float]
    series: tuple[PlotSeries, ...]
    key: str
    level: float | None = None
    level_label: str = ""
    tag_at_end: bool = False
    footer: str = FOOTER


def _subtitle(reference: str | None, *parts: str) -> str:
    head = [f"ref {reference}"] if reference else []
    return " | ".join(head + [p for p in parts if p])


def clip_polyline(
    x: FloatArray, y: FloatArray, x_range: tuple[float, float], y_range: tuple[float, float]
) -> list[tuple[FloatArray, FloatArray]]:
    """The visible pieces of a polyline inside the box (Liang-Barsky, segment by segment).

    >>> pieces = clip_polyline(np.array([0.0, 2.0]), np.array([0.0, 2.0]), (0, 1), (0, 1))
    >>> [p.tolist() for p in pieces[0]]
    [[0.0, 1.0], [0.0, 1.0]]
    """
    (x0, x1), (y0, y1) = x_range, y_range
    pieces: list[tuple[list[float], list[float]]] = []
    open_piece = False
    for k in range(len(x) - 1):
        ax, ay, bx, by = float(x[k]), float(y[k]), float(x[k + 1]), float(y[k + 1])
        dx, dy = bx - ax, by - ay
        lo, hi = 0.0, 1.0
        for p, q in ((-dx, ax - x0), (dx, x1 - ax), (-dy, ay - y0), (dy, y1 - ay)):
            if p == 0.0:
                if q < 0.0:
                    lo, hi = 1.0, 0.0
            elif p < 0.0:
                lo = max(lo, q / p)
            else:
                hi = min(hi, q / p)
        if lo > hi:
            open_piece = False
            continue
        start = (ax + lo * dx, ay + lo * dy)
        end = (ax + hi * dx, ay + hi * dy)
        if not (open_piece and lo == 0.0):
            pieces.append(([start[0]], [start[1]]))
        pieces[-1][0].append(end[0])
        pieces[-1][1].append(end[1])
        open_piece = hi == 1.0
    return [(np.array(px), np.array(py)) for px, py in pieces]


def _nice_top(value: float) -> float:
    """``value`` rounded up to 1, 2, 2.5 or 5 times a power of ten."""
    power = 10.0 ** np.floor(np.log10(value))
    return float(next(m * power for m in (1.0, 2.0, 2.5, 5.0, 10.0) if m * power >= value))


def coast_down_chart(body: CoastDownRequest, doc: dict[str, Any]) -> PlotChart:
    """Each run's logged speed over time and the trace of its own fitted road load."""
    units: UnitSystem = body.units
    lab = doc["units"]
    mass_kg = to_si(doc["equivalent_mass"], Quantity.MASS, units)
    series = []
    for k, (run, fitted) in enumerate(zip(body.runs, doc["runs"], strict=True)):
        t = np.asarray(run.time, np.float64)
        v = np.asarray(run.speed, np.float64)
        f0, f1, f2 = fitted["coast_down"]
        coefficients = (
            to_si(f0, Quantity.FORCE, units),
            to_si(f1, Quantity.FORCE_PER_SPEED, units),
            to_si(f2, Quantity.FORCE_PER_SPEED_SQUARED, units),
        )
        trace = coast_down_trace(
            t, to_si(v, Quantity.SPEED, units), coefficients, mass_kg, TRACE_POINTS
        )
        every = max(1, -(-t.size // MOST_MARKS))
        series.append(
            PlotSeries(
                f"{k + 1} {fitted['direction']}",
                trace.time_s - t[0],
                from_si(trace.speed_m_s, Quantity.SPEED, units),
                (t - t[0])[::every],
                v[::every],
            )
        )
    longest = max(float(s.x[-1]) for s in series)
    fastest = max(float(max(s.y.max(), s.mark_y.max())) for s in series)
    return PlotChart(
        title="Coast-down: logged speed and the fitted road load",
        subtitle=_subtitle(
            doc.get("reference"),
            f"{len(series)} run{'s' if len(series) > 1 else ''}",
            f"equivalent mass {doc['equivalent_mass']:,.0f} {lab['mass']}",
            f"residual {doc['residual_rms']:.2f} {lab['speed']} RMS",
        ),
        x_label="Time from the first sample of the run [s]",
        y_label=f"Road speed [{lab['speed']}]",
        x_range=(0.0, max(longest, 1e-3) * 1.03),
        y_range=(0.0, max(fastest, 1e-3) * 1.12),
        series=tuple(series),
        key="marks: logged speed; line: the run's fitted road load, integrated",
        tag_at_end=True,
    )


def shift_window_chart(doc: dict[str, Any]) -> PlotChart | None:
    """Time lost to the finish against shift rpm, one line per gear change reached before
    the finish, each window shaded under the tolerance; None when the finish comes before
    the first change."""
    tolerance = float(doc["tolerance"])
    reached = [w for w in doc["windows"] if w["reached"]]
    # the y axis reaches ten tolerances (at least 0.05 s) or the largest loss if smaller:
    # the windows stay readable and the steep sides run off the top
    largest = max(
        (x for w in reached for x in w["loss"] if x is not None), default=10.0 * tolerance
    )
    top = _nice_top(max(min(largest, max(10.0 * tolerance, 0.05)), 2.0 * tolerance))
    series = []
    lowest, highest = np.inf, 0.0
    for w in reached:
        rpm = np.array([r for r, x in zip(w["rpm"], w["loss"], strict=True) if x is not None])
        loss = np.array([x for x in w["loss"] if x is not None])
        if rpm.size == 0:
            continue
        inside = np.flatnonzero(loss <= top)
        k = int(inside[0]) if inside.size else 0
        if k > 0:  # where the line comes in over the top
            share = (loss[k - 1] - top) / (loss[k - 1] - loss[k])
            lowest = min(lowest, float(rpm[k - 1] + share * (rpm[k] - rpm[k - 1])))
        else:
            lowest = min(lowest, float(rpm[0]))
        highest = max(highest, float(rpm[-1]))
        series.append(
            PlotSeries(
                f"{w['from_gear']}-{w['to_gear']}",
                rpm,
                loss,
                rpm,
                loss,
                band=(float(w["low_rpm"]), float(w["high_rpm"])),
                best=(float(w["best_rpm"]), 0.0),
            )
        )
    if not series:
        return None
    span = max(highest - lowest, 100.0)
    return PlotChart(
        title="Shift window: time lost against shift rpm",
        subtitle=_subtitle(
            doc.get("reference"),
            f"finish {doc['finish']}",
            f"best time {doc['best_time']:.3f} s",
            "other shifts at their best",
        ),
        x_label="Shift rpm of the gear change [rpm]",
        y_label="Time lost to the finish [s]",
        x_range=(lowest - 0.04 * span, highest + 0.03 * span),
        y_range=(0.0, top),
        series=tuple(series),
        key="shaded: window within the tolerance; diamond: best rpm",
        level=tolerance,
        level_label=f"tolerance {tolerance:g} s",
    )
