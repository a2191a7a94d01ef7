"""A bounded pattern search over shift rpms whose trial points are timed in batches.

Each round moves every active shift rpm one step down and one step up from the best point
so far, one coordinate at a time, and also tries the point that takes every coordinate's
better move at once (Jacobi style: the shifts act on different gears, so their effects on
the finish time nearly add up). All trial points of a round are timed together by one
call of the batched integrator (:func:`core.runs.batch.batch_finish_times`), which costs
about two single runs for a dozen points. The best trial point becomes the new centre if
it is quicker; otherwise the step halves. The search stops when the step falls below
``min_step_rpm``, after ``max_rounds`` rounds or before passing ``max_evaluations`` runs,
and never returns a point slower than its start.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = ["PatternResult", "pattern_search"]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]
TimeRows = Callable[[FloatArray], FloatArray]
"""Finish time [s] of each row of shift rpms, shape (k, g - 1) -> (k,); NaN not reached."""


@dataclass(frozen=True)
class PatternResult:
    """Outcome of :func:`pattern_search`.

    Attributes
    ----------
    shift_rpm : ndarray, shape (g - 1,)
        Quickest shift rpms found [rpm].
    time_s : float
        Their finish time [s].
    evaluations : int
        Runs timed (rows of every batch).
    rounds : int
        Batches timed.
    """

    shift_rpm: FloatArray
    time_s: float
    evaluations: int
    rounds: int


def pattern_search(
    time_rows: TimeRows,
    x0: FloatArray,
    time0: float,
    active: IntArray,
    bounds: tuple[FloatArray, FloatArray],
    *,
    step_rpm: float,
    min_step_rpm: float = 1.0,
    max_rounds: int = 12,
    max_evaluations: int = 1000,
) -> PatternResult:
    """Minimise the finish time over the active shift rpms.

    Parameters
    ----------
    time_rows : callable
        Times many rows of shift rpms at once.
    x0 : ndarray, shape (g - 1,)
        Starting shift rpms [rpm], inside the bounds.
    time0 : float
        Finish time at ``x0`` [s].
    active : ndarray of int
        Indices of the shift rpms searched; the others stay at ``x0``.
    bounds : tuple of ndarray, shape (g - 1,) each
        Lowest and highest shift rpm of each gear change [rpm].
    step_rpm : float
        First step [rpm], > 0.
    min_step_rpm : float
        Step below which the search stops [rpm].
    max_rounds : int
        Most batches timed.
    max_evaluations : int
        Most runs timed in all; a round that would pass it is not run.

    Returns
    -------
    PatternResult
    """
    lower, upper = bounds
    x, best = x0.copy(), float(time0)
    step, combined = float(step_rpm), None
    evaluations = rounds = 0
    while rounds < max_rounds and step >= min_step_rpm and active.size:
        trials = []
        for i in active.tolist():
            for sign in (-1.0, 1.0):
                y = x.copy()
                y[i] = np.clip(x[i] + sign * step, lower[i], upper[i])
                trials.append(y)
        if combined is not None:
            trials.append(combined)
        if evaluations + len(trials) > max_evaluations:
            break
        rows = np.array(trials)
        times = np.asarray(time_rows(rows), dtype=np.float64)
        times = np.where(np.isfinite(times), times, np.inf)
        evaluations += rows.shape[0]
        rounds += 1
        # each coordinate's better move, all taken at once, for the next round
        moves = x.copy()
        for j, i in enumerate(active.tolist()):
            pair = times[2 * j : 2 * j + 2]
            if float(pair.min()) < best:
                moves[i] = rows[2 * j + int(np.argmin(pair)), i]
        k = int(np.argmin(times))
        if times[k] < best:
            x, best = rows[k].copy(), float(times[k])
            combined = None if np.array_equal(moves, x) else moves
        else:
            step *= 0.5
            combined = None
    return PatternResult(x, best, evaluations, rounds)
