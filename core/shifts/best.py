"""Where to change gear: the shift that crosses two gears' shared speed range quickest.

Between gear i and gear i+1 the car covers the speed range the two gears share. Writing
``e_i`` for the "effort" of a gear at road speed v (tractive force for the plain criterion,
net acceleration once road load and inertia are counted), the time spent crossing that
range when shifting at speed s is, up to a constant,

    J(s) = integral from v_lo to s of dv / e_i(v)  +  integral from s to v_hi of dv / e_{i+1}(v)

so dJ/ds = 1/e_i(s) - 1/e_{i+1}(s): J is stationary where the two efforts cross, and a
minimum where gear i's effort falls below gear i+1's. This module scans every gear pair at
once on a fine grid (stall, coincident band, sign changes and falling cells found for all
pairs in array operations), refines each such crossing by bracketed root finding on the
interpolated curves (an Illinois secant to 1e-7 rpm, the tolerance ``scipy.optimize.brentq``
was given here; the tests hold the two together; :mod:`core.shifts.overtake`), adds the
ends of the range as candidates,
and keeps the candidate with the least J (a cumulative trapezoid), so curves that cross
more than once still get the quickest shift. Where the efforts coincide over a stretch, J is
flat there and the band is reported.

Everything is written in the current gear's engine speed n, which is proportional to road
speed in a gear without slip, so the argmin is the same.
"""

from __future__ import annotations

import enum
import functools
import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.shifts.overtake import REFINE_STEPS, XTOL, bracketed_crossing

__all__ = [
    "COINCIDENT_RTOL",
    "REFINE_STEPS",
    "SCAN_POINTS",
    "XTOL",
    "CellCrossings",
    "ScalarDiff",
    "ShiftChoice",
    "ShiftReason",
    "VectorEfforts",
    "best_shifts",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
VectorEfforts = Callable[[FloatArray], tuple[FloatArray, FloatArray]]
ScalarDiff = Callable[[int, float], float]
IntArray = NDArray[np.intp]
CellCrossings = Callable[[IntArray, FloatArray, FloatArray, FloatArray, FloatArray], FloatArray]

COINCIDENT_RTOL = 1e-4
SCAN_POINTS = 513
_UNIT = np.linspace(0.0, 1.0, SCAN_POINTS)
_UNIT.flags.writeable = False


class ShiftReason(enum.Enum):
    """Why a shift happens where it does."""

    CROSSOVER = "crossover"
    REV_LIMIT = "rev_limit"
    DRAG_LIMIT = "drag_limit"
    """Net-acceleration plans only: the gear stops accelerating (road load) before its rev
    limit and before the next gear overtakes it, so the shift comes where it tops out."""
    TRACTION_LIMIT = "traction_limit"
    """Net-acceleration plans only: both gears are held at the tires' grip at the shift, so
    the gear with the lighter rotating parts is the quicker and the shift comes as soon as
    it can take over; no force crossover decides it."""


@dataclass(frozen=True)
class ShiftChoice:
    """The chosen shift between two adjacent gears.

    Attributes
    ----------
    shift_rpm : float
        Engine speed in the current gear at the shift [rpm].
    reason : ShiftReason
        Crossover of the efforts, or the rev limit.
    crossings : int
        Number of distinct crossovers (current gear falling behind) in the shared range.
    coincident_rpm : tuple of float or None
        ``(low, high)`` current-gear rpm band where the two efforts coincide to within
        ``COINCIDENT_RTOL``, or None.
    below_range : bool
        True when the next gear is the stronger over the whole shared range, so the
        crossover lies below it and the shift is at the range's start.
    intersections : int
        How many times the two efforts intersect in the shared range, either way (the next
        gear overtaking, or falling back behind).
    overtake_rpm : tuple of float
        Current-gear rpm at each point where the next gear overtakes (``crossings`` of them).
    """

    shift_rpm: float
    reason: ShiftReason
    crossings: int
    coincident_rpm: tuple[float, float] | None
    below_range: bool
    intersections: int = 0
    overtake_rpm: tuple[float, ...] = ()


def _coincident_band(
    grid: FloatArray, diff: FloatArray, scale: float
) -> tuple[float, float] | None:
    close = np.abs(diff) <= COINCIDENT_RTOL * scale
    if not close.any():
        return None
    edges = np.flatnonzero(np.diff(np.concatenate(([0], close.astype(np.int8), [0]))))
    starts, stops = edges[::2], edges[1::2] - 1
    k = int(np.argmax(grid[stops] - grid[starts]))
    lo, hi = float(grid[starts[k]]), float(grid[stops[k]])
    if hi - lo < 0.02 * float(grid[-1] - grid[0]):
        return None
    return lo, hi


@dataclass(frozen=True)
class _Scan:
    """Every gear change's scan, each row cut where the current gear stops accelerating.

    ``grid`` and ``diff`` are (p, m); in a row whose current-gear effort falls to zero the
    point where it does (linear in the scan cell) replaces the first point past it, and the
    row ends there: ``last`` is the index of each row's last point (-1 for an empty range,
    0 where the gear cannot accelerate at all), ``top`` the end of each row's range [rpm].
    """

    grid: FloatArray
    diff: FloatArray
    last: NDArray[np.intp]
    top: FloatArray
    inside: NDArray[np.bool_]

    @classmethod
    def of(
        cls,
        grid: FloatArray,
        diff: FloatArray,
        e_cur: FloatArray,
        hi: FloatArray,
        valid: BoolArray,
    ) -> _Scan:
        m = grid.shape[1]
        stalled = e_cur <= 0.0
        stops = stalled.any(axis=1)
        last = np.where(stops, np.argmax(stalled, axis=1), m - 1)
        last[~valid] = -1
        top = hi.copy()
        cut = np.flatnonzero(stops & valid & (last > 0))
        if cut.size:
            grid, diff = grid.copy(), diff.copy()
            j = last[cut]
            e0, e1 = e_cur[cut, j - 1], e_cur[cut, j]
            frac = e0 / (e0 - e1)
            g0, g1 = grid[cut, j - 1], grid[cut, j]
            top[cut] = grid[cut, j] = g0 + frac * (g1 - g0)
            diff[cut, j] = diff[cut, j - 1] + frac * (diff[cut, j] - diff[cut, j - 1])
        inside = np.arange(m) <= last[:, None]
        return cls(grid, diff, last, top, inside)


def _bands(scan: _Scan, scale: FloatArray, span: FloatArray) -> dict[int, tuple[float, float]]:
    """The coincident band of each gear change that has one, by row.

    A band must be 2 % of its row's range wide: a row without enough close points to
    span that many scan cells has none and is not looked at further."""
    close = (np.abs(scan.diff) <= COINCIDENT_RTOL * scale[:, None]) & scan.inside
    rows = np.arange(scan.last.size)
    reach = (close.sum(axis=1) - 1) * (span / (SCAN_POINTS - 1)) * (1.0 + 1e-9)
    wide = reach >= 0.02 * (scan.grid[rows, scan.last] - scan.grid[:, 0])
    bands = {}
    for k in np.flatnonzero(wide & (scan.last > 0)).tolist():
        n = int(scan.last[k]) + 1
        band = _coincident_band(scan.grid[k, :n], scan.diff[k, :n], float(scale[k]))
        if band is not None:
            bands[k] = band
    return bands


def _intersection_counts(scan: _Scan, bands: dict[int, tuple[float, float]]) -> NDArray[np.intp]:
    """Sign changes of each row's ``diff``, zeros and a coincident band left out: every
    row's kept points in one flat sequence, a change counted only within a row."""
    keep = (scan.diff != 0.0) & scan.inside
    for k, (b_lo, b_hi) in bands.items():
        g = scan.grid[k]
        keep[k] &= (g < b_lo) | (g > b_hi)
    at = np.flatnonzero(keep)  # row-major: each row's kept points in order
    row = at // scan.diff.shape[1]
    rising = scan.diff.ravel()[at] > 0.0
    change = (rising[1:] != rising[:-1]) & (row[1:] == row[:-1])
    return np.bincount(row[1:][change], minlength=scan.diff.shape[0])


def _cell_roots(
    rows: IntArray, cells: tuple[FloatArray, ...], refine: CellCrossings | None
) -> FloatArray:
    """The crossing in each falling cell ``(a, b, D(a), D(b))`` [rpm]: ``b`` where
    ``D(b) = 0``, else refined by ``refine`` or linear in the cell."""
    a, b, fa, fb = cells
    with np.errstate(divide="ignore", invalid="ignore"):
        roots = np.where(fb == 0.0, b, a + fa / (fa - fb) * (b - a))
    moved = np.flatnonzero(fb != 0.0)
    if refine is not None and moved.size:
        roots[moved] = refine(rows[moved], a[moved], b[moved], fa[moved], fb[moved])
    return roots


def _falling_roots(scan: _Scan, refine: CellCrossings | None) -> tuple[IntArray, FloatArray]:
    """Each scan cell where the current gear falls behind (row-major order): its row and the
    crossing in it [rpm]."""
    g, d = scan.grid, scan.diff
    falls = (d[:, :-1] > 0.0) & (d[:, 1:] <= 0.0) & scan.inside[:, 1:] & (scan.last > 0)[:, None]
    rows, cols = np.nonzero(falls)
    cells = (g[rows, cols], g[rows, cols + 1], d[rows, cols], d[rows, cols + 1])
    return rows, _cell_roots(rows, cells, refine)


def _scalar_crossings(diff_scalar: ScalarDiff) -> CellCrossings:
    """Cell crossings refined one at a time on ``diff_scalar``."""

    def cells(
        rows: IntArray, a: FloatArray, b: FloatArray, fa: FloatArray, fb: FloatArray
    ) -> FloatArray:
        ends = zip(a.tolist(), b.tolist(), fa.tolist(), fb.tolist(), strict=True)
        return np.array(
            [
                bracketed_crossing(functools.partial(diff_scalar, k), *end)
                for k, end in zip(rows.tolist(), ends, strict=True)
            ],
            dtype=np.float64,
        )

    return cells


def _cost(
    grid: FloatArray, e_cur: FloatArray, e_next: FloatArray, scale: FloatArray
) -> FloatArray:
    """Cumulative trapezoid of the slowness ``1/e_cur - 1/e_next`` (each effort floored at
    ``1e-9 * scale``) along each row from 0, as ``cumulative_trapezoid(initial=0)``."""
    floor = 1e-9 * scale[:, None]
    slowness = np.maximum(e_cur, floor)
    np.divide(1.0, slowness, out=slowness)
    behind = np.maximum(e_next, floor)
    np.divide(1.0, behind, out=behind)
    slowness -= behind
    steps = grid[:, 1:] - grid[:, :-1]
    steps *= np.add(slowness[:, 1:], slowness[:, :-1], out=behind[:, 1:])
    steps *= 0.5
    out = np.empty_like(grid)
    out[:, 0] = 0.0
    np.cumsum(steps, axis=1, out=out[:, 1:])
    return out


@dataclass(frozen=True)
class _Found:
    """What the scan found in every row: the range's end ``top`` [rpm] and last scan index
    ``last`` (as ``_Scan``), the coincident bands, the falling crossings [rpm] and the
    count of sign changes."""

    top: list[float]
    last: list[int]
    bands: dict[int, tuple[float, float]]
    crossings: list[list[float]]
    intersections: list[int]


def _plain(
    grid: FloatArray, diff: FloatArray, ranges: tuple[BoolArray, FloatArray], scale: FloatArray
) -> bool:
    """Whether every row is a range with no zero and no NaN in ``diff`` and too few points
    close to a crossing for a band (``_bands``), for a current gear that never stalls;
    ``ranges`` are each row's validity and width [rpm]."""
    valid, span = ranges
    if not valid.all() or math.isnan(float(scale.sum())):
        return False
    close = np.abs(diff) <= COINCIDENT_RTOL * scale[:, None]
    if not close.any():
        return True
    reach = (np.count_nonzero(close, axis=1) - 1) * (span / (SCAN_POINTS - 1)) * (1.0 + 1e-9)
    wide = reach >= 0.02 * (grid[:, -1] - grid[:, 0])
    return not (wide.any() or (diff[close] == 0.0).any())


def _found_plain(
    grid: FloatArray, diff: FloatArray, hi: FloatArray, refine: CellCrossings | None
) -> _Found:
    """``_found_cut`` where every row is a valid range, the current gear never stalls and
    no point is close to a crossing (so no zero and no band): the signs alone tell."""
    p, m = diff.shape
    pos = diff > 0.0
    change = pos[:, 1:] != pos[:, :-1]
    rows, cols = np.nonzero(change & pos[:, :-1])
    crossings: list[list[float]] = [[] for _ in range(p)]
    if rows.size:
        a, b = grid[rows, cols], grid[rows, cols + 1]
        fa, fb = diff[rows, cols], diff[rows, cols + 1]
        roots = a + fa / (fa - fb) * (b - a) if refine is None else refine(rows, a, b, fa, fb)
        for k, root in zip(rows.tolist(), roots.tolist(), strict=True):
            crossings[k].append(root)
    counts = np.count_nonzero(change, axis=1).tolist()
    return _Found(hi.tolist(), [m - 1] * p, {}, crossings, counts)


def _found_cut(
    grid: FloatArray,
    diff: FloatArray,
    e_cur: FloatArray,
    ends: tuple[FloatArray, FloatArray, BoolArray],
    scale: FloatArray,
    refine: CellCrossings | None,
) -> _Found:
    """Every row's scan cut where the current gear stalls, its band, crossings and count;
    ``ends`` are each row's range end [rpm], width [rpm] and whether it is a range."""
    hi, span, valid = ends
    scan = _Scan.of(grid, diff, e_cur, hi, valid)
    bands = _bands(scan, scale, span)
    crossed = _intersection_counts(scan, bands)
    rows, roots = _falling_roots(scan, refine)
    found: list[list[float]] = [[] for _ in range(hi.size)]
    for k, root in zip(rows.tolist(), roots.tolist(), strict=True):
        band = bands.get(k)
        if band is None or not band[0] <= root <= band[1]:
            found[k].append(root)
    return _Found(scan.top.tolist(), scan.last.tolist(), bands, found, crossed.tolist())


def best_shifts(
    efforts: VectorEfforts,
    diff_scalar: ScalarDiff | None,
    rpm_low: ArrayLike,
    rpm_high: ArrayLike,
    *,
    cell_crossings: CellCrossings | None = None,
) -> tuple[ShiftChoice, ...]:
    """The quickest shift for each of p gear changes, computed together.

    Parameters
    ----------
    efforts : callable
        ``efforts(n) -> (current, next)``: for current-gear engine speeds ``n`` [rpm] of
        shape (p, m), row k belonging to gear change k, the effort (tractive force [N] or
        net acceleration [m/s^2]) of the current and of the next gear at the road speed
        each ``n`` means in the current gear; both of shape (p, m). Higher is better.
    diff_scalar : callable or None
        ``diff_scalar(k, n) -> current - next`` for one gear change and one speed, the same
        function as ``efforts`` without array overhead; each crossing is refined on it by
        bracketed root finding to ``XTOL`` [rpm]. None (for efforts too costly to call one
        point at a time, such as a converter solved by bisection) locates each crossing by
        linear interpolation in its scan cell, 1/512 of the range wide.
    rpm_low : array_like, shape (p,)
        Start of each shared range in current-gear rpm (the next gear's lowest usable speed).
    rpm_high : array_like, shape (p,)
        End of each shared range: the current gear's rev limit [rpm].
    cell_crossings : callable, optional
        ``cell_crossings(rows, a, b, fa, fb) -> n``: the crossing [rpm] in each scan cell
        ``[a, b]`` of gear change ``rows`` where ``current - next`` falls from ``fa > 0`` to
        ``fb < 0``, found to ``XTOL`` [rpm] (all arrays of one shape); used instead of
        ``diff_scalar`` when given, for efforts whose crossings can be found more cheaply
        together (:func:`core.shifts.overtake.force_crossings`).

    Returns
    -------
    tuple of ShiftChoice, length p

    Examples
    --------
    Torque falling linearly, T = 400 - 0.05 n, ratios 3 and 2: the crossover is at
    (T0/c) * G1 / (G1 + G2) = 4800 rpm.

    >>> t = lambda n: 400.0 - 0.05 * n
    >>> (c,) = best_shifts(lambda n: (3.0 * t(n), 2.0 * t(n * 2 / 3)),
    ...                    lambda k, n: 3.0 * t(n) - 2.0 * t(n * 2 / 3), [1500.0], [7000.0])
    >>> round(c.shift_rpm, 6), c.reason.value
    (4800.0, 'crossover')
    """
    lo = np.atleast_1d(np.asarray(rpm_low, dtype=np.float64))
    hi = np.atleast_1d(np.asarray(rpm_high, dtype=np.float64))
    valid = hi > lo
    span = np.where(valid, hi - lo, 1.0)
    grid = lo[:, None] + span[:, None] * _UNIT
    e_cur, e_next = efforts(grid)
    diff = e_cur - e_next
    positive = bool(e_cur.min() > 0.0)  # False with a NaN too
    peak_cur = e_cur.max(axis=1) if positive else np.max(np.abs(e_cur), axis=1)
    scale = np.maximum(peak_cur, np.max(np.abs(e_next), axis=1))
    np.maximum(scale, 1e-300, out=scale)
    cost = _cost(grid, e_cur, e_next, scale)
    refine = cell_crossings
    if refine is None and diff_scalar is not None:
        refine = _scalar_crossings(diff_scalar)
    if positive and _plain(grid, diff, (valid, span), scale):
        found = _found_plain(grid, diff, hi, refine)
    else:
        found = _found_cut(grid, diff, e_cur, (hi, span, valid), scale, refine)
    return _choose(grid, cost, lo, hi, found, (diff[:, 0] < 0.0).tolist())


def _choose(
    grid: FloatArray,
    cost: FloatArray,
    lo: FloatArray,
    hi: FloatArray,
    found: _Found,
    behind: list[bool],
) -> tuple[ShiftChoice, ...]:
    """Each gear change's quickest candidate (range start, range end, the crossings, the
    band's end), by the crossing time ``cost`` interpolated on its scan."""
    choices = []
    for k, (start, limit, top, last, n, here) in enumerate(
        zip(
            lo.tolist(),
            hi.tolist(),
            found.top,
            found.last,
            found.intersections,
            found.crossings,
            strict=True,
        )
    ):
        if last < 0:  # no shared range
            choices.append(ShiftChoice(limit, ShiftReason.REV_LIMIT, 0, None, False))
            continue
        if last == 0:  # the car cannot accelerate at the range's start
            choices.append(ShiftChoice(start, ShiftReason.DRAG_LIMIT, 0, None, False))
            continue
        band = found.bands.get(k)
        candidates = [start, top, *here]
        if band is not None:
            candidates.append(band[1])
        best = candidates[int(np.interp(candidates, grid[k], cost[k]).argmin())]
        if band is not None and band[0] <= best <= band[1]:
            best = band[1]
        below = best == start and behind[k]
        reason = ShiftReason.CROSSOVER
        if best >= top and not any(abs(r - top) <= 1e-9 * top for r in here):
            reason = ShiftReason.REV_LIMIT if top >= limit else ShiftReason.DRAG_LIMIT
        choices.append(ShiftChoice(best, reason, len(here), band, below, n, tuple(here)))
    return tuple(choices)
