"""The time-optimal shift search, seeded with every plan it could otherwise have used.

The search minimises the simulated time to the finish over the shift rpms by a pattern
search whose trial points run together, one batch of the run integrator per round
(:func:`core.shifts.pattern.pattern_search`, :func:`core.runs.batch.batch_finish_times`), from
the quickest of its seeds: the caller's plan, shifting at the rev limit, the wheel-force
crossover and the net-acceleration plan.
Every seed is timed first, so the answer is never slower than any of them, and the one
that won (or ``"search"`` when the search improved on all of them) is reported.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.runs.batch import batch_finish_times
from core.runs.drive_model import DriveModel
from core.runs.milestones import time_at_distance
from core.runs.simulate import simulate_run
from core.shifts.pattern import pattern_search

__all__ = ["SEARCH_WON", "OptimalShifts", "search_shift_rpm"]

FloatArray = NDArray[np.float64]
SEARCH_WON = "search"
"""``OptimalShifts.won_by`` when the search found shifts quicker than every seed."""
_UNREACHED_S = 1e6
_SEARCH_STEP = 0.04  # first step of the pattern search, as a share of the rev limit
_SEARCH_MIN_STEP_RPM = 4.0
_SEARCH_ROUNDS = 10


@dataclass(frozen=True)
class OptimalShifts:
    """Shift rpms that minimise the time of a run.

    Attributes
    ----------
    shift_rpm : ndarray, shape (g - 1,)
        Best shift rpm per gear change [rpm].
    time_s : float
        Run time with them [s].
    baseline_time_s : float
        Run time with the first seed, the caller's plan [s].
    evaluations : int
        Simulated runs spent, seeds included.
    won_by : str
        Name of the seed the answer is, or ``SEARCH_WON``.
    seeds : tuple of (str, float)
        Each distinct seed and its run time [s], in the order tried.
    """

    shift_rpm: FloatArray
    time_s: float
    baseline_time_s: float
    evaluations: int
    won_by: str = "plan"
    seeds: tuple[tuple[str, float], ...] = ()


def search_shift_rpm(
    model: DriveModel,
    seeds: Sequence[tuple[str, ArrayLike]],
    *,
    start_speed_m_s: float,
    rollout_m: float,
    finish_distance_m: float | None,
    finish_speed_m_s: float | None,
    max_evaluations: int = 120,
) -> OptimalShifts:
    """Shift rpms minimising the time to the finish, never slower than any seed.

    Parameters
    ----------
    model : DriveModel
        The car.
    seeds : sequence of (str, array_like of shape (g - 1,))
        Named starting shift rpms, the caller's plan first; a seed equal to an earlier one
        (after clipping to the search bounds) is not run again.
    start_speed_m_s, rollout_m : float
        As for the run [m/s, m].
    finish_distance_m, finish_speed_m_s : float or None
        The finish: a distance from the clock start [m], or a speed [m/s].
    max_evaluations : int
        Budget of simulated runs, seeds included.

    Returns
    -------
    OptimalShifts
    """
    ratios = model.drivetrain.overall_ratios
    step = ratios[1:] / ratios[:-1]
    limit = model.rev_limit_rpm
    lower = np.minimum(
        np.maximum(model.curve.rpm_min / step, model.curve.rpm_min + 1.0), limit - 1.0
    )
    rollout = rollout_m if start_speed_m_s == 0.0 else 0.0
    cover = (finish_distance_m or 0.0) + rollout

    def time_rows(rows: FloatArray) -> FloatArray:
        times = batch_finish_times(
            model,
            rows,
            start_speed_m_s=start_speed_m_s,
            rollout_m=rollout_m,
            finish_distance_m=finish_distance_m,
            finish_speed_m_s=finish_speed_m_s,
        )
        return np.where(np.isfinite(times), times, _UNREACHED_S)

    named: list[tuple[str, FloatArray]] = []
    for name, rpm in seeds:
        x = np.clip(np.asarray(rpm, dtype=np.float64), lower, limit)
        if not any(np.array_equal(x, t[1]) for t in named):
            named.append((name, x))
    # every seed timed in one batch, as run_report times the finish
    seed_times = time_rows(np.array([x for _, x in named]))
    evaluations = len(named)
    tried = [(n, x, float(t)) for (n, x), t in zip(named, seed_times.tolist(), strict=True)]
    baseline = tried[0][2]
    won_by, x0, best_time = min(tried, key=lambda t: t[2])
    report = tuple((t[0], t[2]) for t in tried)
    first = simulate_run(
        model,
        x0,
        start_speed_m_s=start_speed_m_s,
        cover_distance_m=cover,
        cover_speed_m_s=finish_speed_m_s or 0.0,
    )
    evaluations += 1
    # only the shifts made before the finish can change its time
    finish_at = best_time + (time_at_distance(first, rollout) or 0.0)
    active = np.array(
        [k for k, s in enumerate(first.shifts) if s.time_s < finish_at], dtype=np.int64
    )
    budget = max_evaluations - evaluations
    if active.size == 0 or budget <= 0:
        return OptimalShifts(x0, best_time, baseline, evaluations, won_by, report)

    found = pattern_search(
        time_rows,
        x0,
        best_time,
        active,
        (lower, np.full(x0.size, limit)),
        step_rpm=_SEARCH_STEP * limit,
        min_step_rpm=_SEARCH_MIN_STEP_RPM,
        max_rounds=_SEARCH_ROUNDS,
        max_evaluations=budget,
    )
    evaluations += found.evaluations
    if found.time_s < best_time:
        return OptimalShifts(
            found.shift_rpm, found.time_s, baseline, evaluations, SEARCH_WON, report
        )
    return OptimalShifts(x0, best_time, baseline, evaluations, won_by, report)
