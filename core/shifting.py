"""Where to change gear: the shift that crosses two gears' shared speed range quickest.

Between gear i and gear i+1 the car covers the speed range the two gears share. Writing
``e_i`` for the "effort" of a gear at road speed v (tractive force for the plain criterion,
net acceleration once road load and inertia are counted), the time spent crossing that
range when shifting at speed s is, up to a constant,

    J(s) = integral from v_lo to s of dv / e_i(v)  +  integral from s to v_hi of dv / e_{i+1}(v)

so dJ/ds = 1/e_i(s) - 1/e_{i+1}(s): J is stationary where the two efforts cross. This module
finds every crossing by root finding on the interpolated curves (``scipy.optimize.brentq``),
adds the ends of the range as candidates, and keeps the candidate with the least J, so a
curve pair that crosses more than once still gets the quickest shift. Where the efforts
coincide over a stretch, J is flat there and the module reports the band.

Everything is written in the current gear's engine speed n, which is proportional to road
speed in a gear without slip, so the argmin is the same.
"""

from __future__ import annotations

import enum
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.integrate import cumulative_trapezoid
from scipy.optimize import brentq

__all__ = ["COINCIDENT_RTOL", "ShiftChoice", "ShiftReason", "best_shift_rpm"]

FloatArray = NDArray[np.float64]
Effort = Callable[[FloatArray], FloatArray]

COINCIDENT_RTOL = 1e-4
_SCAN_POINTS = 257
_INTEGRATION_POINTS = 2049


class ShiftReason(enum.Enum):
    """Why a shift happens where it does."""

    CROSSOVER = "crossover"
    REV_LIMIT = "rev_limit"


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
        Number of distinct crossovers found in the shared range.
    coincident_rpm : tuple of float or None
        ``(low, high)`` current-gear rpm band where the two efforts coincide to within
        ``COINCIDENT_RTOL``, or None.
    below_range : bool
        True when the next gear is the stronger over the whole shared range, so the
        crossover lies below it and the shift is at the range's start.
    """

    shift_rpm: float
    reason: ShiftReason
    crossings: int
    coincident_rpm: tuple[float, float] | None
    below_range: bool


def _coincident_band(
    grid: FloatArray, diff: FloatArray, scale: float
) -> tuple[float, float] | None:
    close = np.abs(diff) <= COINCIDENT_RTOL * scale
    if not close.any():
        return None
    # longest run of consecutive close points
    edges = np.flatnonzero(np.diff(np.concatenate(([0], close.astype(np.int8), [0]))))
    starts, stops = edges[::2], edges[1::2] - 1
    k = int(np.argmax(grid[stops] - grid[starts]))
    lo, hi = float(grid[starts[k]]), float(grid[stops[k]])
    if hi - lo < 0.02 * float(grid[-1] - grid[0]):
        return None
    return lo, hi


def best_shift_rpm(
    effort_current: Effort,
    effort_next: Effort,
    rpm_low: float,
    rpm_high: float,
    *,
    knots: FloatArray | None = None,
) -> ShiftChoice:
    """The quickest shift from one gear to the next over their shared range.

    Parameters
    ----------
    effort_current, effort_next : callable
        Vectorised functions of the current gear's engine speed [rpm], shape (m,) to (m,),
        giving each gear's effort (tractive force [N] or net acceleration [m/s^2]) at the
        road speed that engine speed means in the current gear. Higher is better.
    rpm_low : float
        Start of the shared range in current-gear rpm (the next gear's lowest usable speed).
    rpm_high : float
        End of the shared range: the current gear's rev limit [rpm].
    knots : ndarray, optional
        Engine speeds where the curves have kinks or samples, added to the scan grid.

    Returns
    -------
    ShiftChoice

    Examples
    --------
    Torque falling linearly, T = 400 - 0.05 n, ratios 3 and 2: the crossover is at
    (T0/c) * G1 / (G1 + G2) = 4800 rpm.

    >>> t = lambda n: 400.0 - 0.05 * n
    >>> c = best_shift_rpm(lambda n: 3.0 * t(n), lambda n: 2.0 * t(n * 2 / 3), 1500.0, 7000.0)
    >>> round(c.shift_rpm, 6), c.reason.value
    (4800.0, 'crossover')
    """
    if not rpm_high > rpm_low:
        return ShiftChoice(rpm_high, ShiftReason.REV_LIMIT, 0, None, False)
    grid = np.linspace(rpm_low, rpm_high, _SCAN_POINTS)
    if knots is not None:
        inside = knots[(knots > rpm_low) & (knots < rpm_high)]
        grid = np.union1d(grid, inside)

    def diff_fn(n: FloatArray) -> FloatArray:
        return effort_current(n) - effort_next(n)

    e_cur, e_next = effort_current(grid), effort_next(grid)
    diff = e_cur - e_next
    scale = float(max(np.max(np.abs(e_cur)), np.max(np.abs(e_next)), 1e-300))
    band = _coincident_band(grid, diff, scale)

    roots: list[float] = []
    changes = np.flatnonzero(diff[:-1] * diff[1:] < 0.0)
    for j in changes.tolist():
        root = brentq(
            lambda x: float(diff_fn(np.array([x]))[0]), grid[j], grid[j + 1], xtol=1e-9,
            rtol=1e-12,
        )
        roots.append(float(root))
    roots.extend(grid[diff == 0.0].tolist())
    # a crossover is a change from the current gear ahead to the next gear ahead
    crossovers = sorted(
        r
        for r in roots
        if _falls_through(diff_fn, r, rpm_low, rpm_high)
        and (band is None or not band[0] <= r <= band[1])
    )

    candidates = np.unique(np.array([rpm_low, rpm_high, *crossovers]))
    if band is not None:
        candidates = np.union1d(candidates, [band[1]])
    fine = np.union1d(np.linspace(rpm_low, rpm_high, _INTEGRATION_POINTS), candidates)
    floor = 1e-9 * scale
    slowness = 1.0 / np.maximum(effort_current(fine), floor) - 1.0 / np.maximum(
        effort_next(fine), floor
    )
    cost = cumulative_trapezoid(slowness, fine, initial=0.0)
    cost_at = np.interp(candidates, fine, cost)
    best = float(candidates[int(np.argmin(cost_at))])
    if band is not None and band[0] <= best <= band[1]:
        best = band[1]
    below = best == rpm_low and bool(diff[0] < 0.0)
    reason = ShiftReason.REV_LIMIT
    if best < rpm_high or any(abs(r - rpm_high) <= 1e-9 * rpm_high for r in crossovers):
        reason = ShiftReason.CROSSOVER
    return ShiftChoice(best, reason, len(crossovers), band, below)


def _falls_through(diff_fn: Callable[[FloatArray], FloatArray], root: float, lo: float,
                   hi: float) -> bool:
    h = max(1e-6 * (hi - lo), 1e-9)
    before = float(diff_fn(np.array([max(root - h, lo)]))[0])
    after = float(diff_fn(np.array([min(root + h, hi)]))[0])
    return before >= 0.0 >= after and before != after
