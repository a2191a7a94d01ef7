"""Where to change gear: the shift that crosses two gears' shared speed range quickest.

Between gear i and gear i+1 the car covers the speed range the two gears share. Writing
``e_i`` for the "effort" of a gear at road speed v (tractive force for the plain criterion,
net acceleration once road load and inertia are counted), the time spent crossing that
range when shifting at speed s is, up to a constant,

    J(s) = integral from v_lo to s of dv / e_i(v)  +  integral from s to v_hi of dv / e_{i+1}(v)

so dJ/ds = 1/e_i(s) - 1/e_{i+1}(s): J is stationary where the two efforts cross, and a
minimum where gear i's effort falls below gear i+1's. This module scans every gear pair at
once on a fine grid (stall, coincident band, sign changes and falling cells found for all
pairs in array operations, :mod:`core.shifts.scan`), refines each such crossing by
bracketed root finding on the interpolated curves (an Illinois secant to 1e-7 rpm, the
tolerance ``scipy.optimize.brentq`` was given here; the tests hold the two together;
:mod:`core.shifts.overtake`), adds the ends of the range as candidates, and keeps the
candidate with the least J (a cumulative trapezoid), so curves that cross more than once
still get the quickest shift. Where the efforts coincide over a stretch, J is
flat there and the band is reported.

Everything is written in the current gear's engine speed n, which is proportional to road
speed in a gear without slip, so the argmin is the same.
"""

from __future__ import annotations

import enum
import functools
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.shifts.overtake import REFINE_STEPS, XTOL, bracketed_crossing
from core.shifts.scan import (
    COINCIDENT_RTOL,
    SCAN_POINTS,
    UNIT_SCAN,
    CellCrossings,
    ScanFound,
    found_cut,
    found_plain,
    is_plain,
)

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
    grid = lo[:, None] + span[:, None] * UNIT_SCAN
    e_cur, e_next = efforts(grid)
    diff = e_cur - e_next
    positive = bool(e_cur.min(initial=np.inf) > 0.0)  # False with a NaN too
    peak_cur = e_cur.max(axis=1) if positive else np.abs(e_cur).max(axis=1)
    scale = np.maximum(peak_cur, np.abs(e_next).max(axis=1))
    np.maximum(scale, 1e-300, out=scale)
    cost = _cost(grid, e_cur, e_next, scale)
    refine = cell_crossings
    if refine is None and diff_scalar is not None:
        refine = _scalar_crossings(diff_scalar)
    if positive and is_plain(grid, diff, (valid, span), scale):
        found = found_plain(grid, diff, hi, refine)
    else:
        found = found_cut(grid, diff, e_cur, (hi, span, valid), scale, refine)
    return _choose(grid, cost, lo, hi, found, (diff[:, 0] < 0.0).tolist())


def _choose(
    grid: FloatArray,
    cost: FloatArray,
    lo: FloatArray,
    hi: FloatArray,
    found: ScanFound,
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
