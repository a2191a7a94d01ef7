"""Strip timing of many runs at once, read from their traces as they are made.

:func:`core.runs.batch.batch_runs` produces each gear of every candidate's run as a block of
trace points, non-decreasing in time, distance and speed within the block. Rather than keep
the traces, :class:`TraceProbes` reads each block as it comes: for each distance to time,
the last point at or before it and the first point past it, between which
the acceleration is taken as constant; for each speed, the first point at or above it and
the point before, between which ``1/a`` is taken linear in speed as the integrator takes it.
:func:`timed_distances` and :func:`timed_speeds` then time distances and speed intervals the
way a strip does. This is the one strip timer: :mod:`core.runs.milestones` reads a single
run through it as a batch of one.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from typing import Literal

import numpy as np
from numpy.typing import NDArray

from core.units import FOOT_M

__all__ = [
    "TRAP_WINDOW_M",
    "BatchTimedDistance",
    "BatchTimedSpeed",
    "TraceProbes",
    "probe_distances",
    "probe_speeds",
    "timed_distances",
    "timed_speeds",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]
_DIRECT_COUNT = 100_000  # pairs times points up to which counting beats bisection
_ONE_ROW = np.zeros(1, dtype=np.int64)

TRAP_WINDOW_M = 66.0 * FOOT_M
"""A trap speed is the average over the last 66 ft before the line [m] (common practice)."""


@dataclass(frozen=True)
class BatchTimedDistance:
    """Elapsed time over a distance, one value per candidate, NaN where not reached.

    Attributes
    ----------
    name : str
        Label, e.g. ``"1/4 mile"``.
    distance_m : float
        Distance from where the clock starts [m].
    elapsed_s : ndarray, shape (c,)
        Elapsed time [s].
    speed_m_s : ndarray, shape (c,)
        Speed crossing the line [m/s].
    trap_speed_m_s : ndarray, shape (c,)
        Average over the last 66 ft [m/s], NaN where not timed.
    """

    name: str
    distance_m: float
    elapsed_s: FloatArray
    speed_m_s: FloatArray
    trap_speed_m_s: FloatArray


@dataclass(frozen=True)
class BatchTimedSpeed:
    """Elapsed time between two speeds, one value per candidate, NaN where not reached.

    Attributes
    ----------
    name : str
        Label, e.g. ``"0-60 mph"``.
    from_m_s, to_m_s : float
        Speeds [m/s].
    elapsed_s : ndarray, shape (c,)
        From first reaching ``from_m_s`` (first motion for 0) [s].
    less_rollout_s : ndarray, shape (c,)
        From rest: ``elapsed_s`` less the time to roll out [s]; NaN otherwise.
    """

    name: str
    from_m_s: float
    to_m_s: float
    elapsed_s: FloatArray
    less_rollout_s: FloatArray


def _count(values: FloatArray, rows: IntArray, limits: FloatArray, *, at_most: bool) -> IntArray:
    """Per pair p, how many of ``values[rows[p]]`` (a non-decreasing row) are at most
    ``limits[p]`` (``at_most``), or below it: by a search of the one row, counted directly
    for few pairs, else by a bisection on every pair at once."""
    if values.shape[0] == 1:  # one row: every pair reads it
        side: Literal["left", "right"] = "right" if at_most else "left"
        return np.searchsorted(values[0], limits, side=side).astype(np.int64)
    if rows.size * values.shape[1] <= _DIRECT_COUNT:
        picked = values[rows]
        inside = picked <= limits[:, None] if at_most else picked < limits[:, None]
        direct: IntArray = np.count_nonzero(inside, axis=1)
        return direct.astype(np.int64)
    lo = np.zeros(rows.size, dtype=np.int64)
    hi = np.full(rows.size, values.shape[1], dtype=np.int64)
    while rows.size and bool(np.any(lo < hi)):
        mid = (lo + hi) // 2
        value = values[rows, np.minimum(mid, values.shape[1] - 1)]
        past = value > limits if at_most else value >= limits
        hi = np.where(past, mid, hi)
        lo = np.where(past, lo, np.minimum(mid + 1, hi))
    return lo


class TraceProbes:
    """Many traces read block by block as they are made.

    For each probe distance it keeps the last point at or before it and the first point
    past it, once a block passes it (until then the trace's last point stands for the
    former); for each probe speed, the first point at or above it and the point before.
    A block that passes no new probe costs little more than noting its last point.
    Every block handed to :meth:`add` must be non-decreasing in distance along its rows (in
    speed too, unless it says otherwise), and follow the row's earlier blocks in time (the
    gear segments, shift points and final hold of :func:`core.runs.batch.batch_runs` are).
    Every trace starts at the origin.

    Parameters
    ----------
    count : int
        Number of traces (rows).
    distances : ndarray, shape (d,)
        Probe distances from the start of motion [m], >= 0.
    speeds : ndarray, shape (s,)
        Probe speeds [m/s].
    """

    def __init__(self, count: int, distances: FloatArray, speeds: FloatArray) -> None:
        nd, ns = distances.size, speeds.size
        self.d, self.s = distances, speeds
        # every trace starts at rest at the origin, at or before every distance
        # each list holds views of one array: t, v, x (le, last); t, v (gt); t, v, a (hit, pre)
        self.le = list(np.zeros((3, count, nd)))
        self.gt = list(np.full((2, count, nd), np.nan))
        self.gt_found = np.zeros((count, nd), dtype=np.bool_)
        self.hit = list(np.full((3, count, ns), np.nan))
        self.pre = list(np.full((3, count, ns), np.nan))
        self.found = np.zeros((count, ns), dtype=np.bool_)
        self.last = list(np.zeros((3, count)))
        self.last_a = np.zeros(count)
        self.started = np.zeros(count, dtype=np.bool_)
        # time and speed of each trace's first point
        self.first_t, self.first_v = np.full((2, count), np.nan)
        self._passing: tuple[FloatArray, FloatArray] | None = None  # read once all is added

    def add(
        self,
        rows: IntArray,
        t: FloatArray,
        v: FloatArray,
        x: FloatArray,
        a: FloatArray,
        *,
        speed_falls: bool = False,
    ) -> None:
        """Read the next block of some traces.

        Parameters
        ----------
        rows : ndarray of int, shape (r,)
            The traces the block belongs to, each once.
        t, v, x, a : ndarray, shape (r, w)
            Time [s], speed [m/s], distance [m] and acceleration [m/s^2] of the block's
            points.
        speed_falls : bool
            True where speed may fall along a row (several gears and shifts read as one
            block): the speed probes then read the running highest speed, whose first
            reach of a speed is the trace's. False promises speed never falls.
        """
        cols = (t, v, x)
        self._passing = None
        new = ~self.started[rows]
        if new.any():
            self.first_t[rows[new]] = t[new, 0]
            self.first_v[rows[new]] = v[new, 0]
        if self.d.size:
            self._add_distances(rows, cols)
        if self.s.size:
            highest = np.maximum.accumulate(v, axis=1) if speed_falls else v
            self._add_speeds(rows, (t, v, a), highest)
        for last, col in zip(self.last, cols, strict=True):
            last[rows] = col[:, -1]
        self.last_a[rows] = a[:, -1]
        self.started[rows] = True

    def add_trace(self, t: FloatArray, v: FloatArray, x: FloatArray, a: FloatArray) -> None:
        """Read the whole trace of a batch of one at once.

        Parameters
        ----------
        t, v, x, a : ndarray, shape (n,)
            Time [s], speed [m/s], distance [m] and acceleration [m/s^2] of every point in
            time order, distance never falling (speed may fall).
        """
        self.add(_ONE_ROW, t[None, :], v[None, :], x[None, :], a[None, :], speed_falls=True)

    def _add_distances(self, rows: IntArray, cols: tuple[FloatArray, ...]) -> None:
        """The distances that ``cols`` (t, v, x) passes, not passed before: the point at
        or before each (the trace's previous point where the block starts past it) and
        the first point past it. A distance never passed is read at the trace's last
        point (:meth:`passing`)."""
        x = cols[2]
        ri, ji = np.nonzero((x[:, -1:] > self.d[None, :]) & ~self.gt_found[rows])
        if ri.size == 0:
            return
        k = _count(x, ri, self.d[ji], at_most=True)  # the first point past the distance
        c = rows[ri]
        inside = k > 0
        every = bool(inside.all())
        for le, col, last in zip(self.le, cols, self.last, strict=True):
            le[c, ji] = col[ri, k - 1] if every else np.where(inside, col[ri, k - 1], last[c])
        for gt, col in zip(self.gt, cols[:2], strict=True):
            gt[c, ji] = col[ri, k]
        self.gt_found[c, ji] = True

    def _add_speeds(
        self, rows: IntArray, cols: tuple[FloatArray, ...], highest: FloatArray
    ) -> None:
        """The speeds that ``cols`` (t, v, a) first reaches: the first point at or above
        each and the point before (the trace's previous point where the block starts at
        or above it). ``highest`` is the running highest speed along each row."""
        ri, ji = np.nonzero(~self.found[rows] & (highest[:, -1:] >= self.s[None, :]))
        if ri.size == 0:
            return
        k = _count(highest, ri, self.s[ji], at_most=False)
        c = rows[ri]
        inside = k > 0
        lasts = (self.last[0], self.last[1], self.last_a)
        for hit, pre, col, last in zip(self.hit, self.pre, cols, lasts, strict=True):
            hit[c, ji] = col[ri, k]
            pre[c, ji] = np.where(inside, col[ri, k - 1], last[c])
        # the trace's very first point already reaches the speed
        first = ~inside & ~self.started[c]
        self.pre[0][c[first], ji[first]] = np.nan
        self.found[c, ji] = True

    def passing(self) -> tuple[FloatArray, FloatArray]:
        """Time [s] and speed [m/s] of each trace passing each probe distance, shape (c, d),
        NaN where a trace does not get there, with the acceleration constant between the
        points either side."""
        if self._passing is None:
            self._passing = self._passed()
        return self._passing

    def _passed(self) -> tuple[FloatArray, FloatArray]:
        d = self.d[None, :]
        found = self.gt_found
        every = bool(found.all())  # every trace passed every distance: nothing to fill in
        if every:
            (t0, v0, x0), (t1, v1) = self.le, self.gt
        else:
            t0, v0, x0 = (
                np.where(found, le, last[:, None])
                for le, last in zip(self.le, self.last, strict=True)
            )
            t1 = np.where(found, self.gt[0], t0)
            v1 = np.where(found, self.gt[1], v0)
        dx = d - x0
        span = t1 - t0
        flat = (t1 <= t0) | (dx <= 0.0)
        if not every:
            flat |= ~found
        a = (v1 - v0) / np.where(flat, 1.0, span)
        root = np.sqrt(np.maximum(v0 * v0 + 2.0 * a * dx, 0.0))
        moving = ~flat & (v0 + root > 0.0)
        tau = np.where(moving, 2.0 * dx / np.where(moving, v0 + root, 1.0), 0.0)
        tau = np.minimum(tau, np.where(flat, 0.0, span))
        if every:
            return t0 + tau, v0 + a * tau
        reach = found | (d <= self.last[2][:, None] * (1 + 1e-12))
        return np.where(reach, t0 + tau, np.nan), np.where(reach, v0 + a * tau, np.nan)

    def reaching(self) -> FloatArray:
        """Time [s] at which each trace first reaches each probe speed, shape (c, s), NaN
        where it does not."""
        s = self.s[None, :]
        t1, v1, a1 = self.hit
        t0, v0, a0 = self.pre
        first = self.found & np.isnan(t0)
        later = self.found & ~first
        dv = np.where(later, v1 - v0, 1.0)
        ds = s - v0
        frac = np.where(later, ds / dv, 0.0)
        # 1/a linear in speed between two accelerating points, as the integrator takes it
        curved = later & (a0 > 0.0) & (a1 > 0.0) & (t1 > t0)
        i0 = 1.0 / np.where(curved, a0, 1.0)
        i1 = 1.0 / np.where(curved, a1, 1.0)
        shape = (ds * i0 + (i1 - i0) * ds * ds / (2.0 * dv)) / (0.5 * dv * (i0 + i1))
        frac = np.where(curved, shape, frac)
        time = np.where(later, t0 + frac * (t1 - t0), t1)
        return np.where(self.found, time, np.nan)


def _trapped(distance_m: float, trap: bool) -> bool:
    return trap and distance_m > TRAP_WINDOW_M


def timed_distances(
    probes: TraceProbes, distances: Sequence[tuple[str, float, bool]], moved: BoolArray
) -> tuple[BatchTimedDistance, ...]:
    """Time distances the way a strip does, for every trace.

    Parameters
    ----------
    probes : TraceProbes
        Probes at :func:`probe_distances` of the same rollout and distances.
    distances : sequence of (str, float, bool)
        Name, distance from where the clock starts [m] and whether to time a trap.
    moved : ndarray of bool, shape (c,)
        False for traces that never started; their timings are NaN.

    Returns
    -------
    tuple of BatchTimedDistance
    """
    nan = np.full(moved.shape, np.nan)
    passing_t, passing_v = probes.passing()
    start = passing_t[:, 0]
    out, entry_j = [], 1 + len(distances)
    for j, (name, d, trap) in enumerate(distances, start=1):
        end, speed = passing_t[:, j], passing_v[:, j]
        elapsed = np.where(moved, end - start, np.nan)
        trap_speed = nan
        if _trapped(d, trap):
            entry = passing_t[:, entry_j]
            entry_j += 1
            timed = moved & np.isfinite(entry) & np.isfinite(end) & (end > entry)
            gap = np.where(timed, end - entry, 1.0)
            trap_speed = np.where(timed, TRAP_WINDOW_M / gap, np.nan)
        speed = np.where(np.isfinite(elapsed), speed, np.nan)
        out.append(BatchTimedDistance(name, d, elapsed, speed, trap_speed))
    return tuple(out)


def timed_speeds(
    probes: TraceProbes, speeds: Sequence[tuple[str, float, float]], moved: BoolArray
) -> tuple[BatchTimedSpeed, ...]:
    """Time speed intervals, first reach of each speed, for every trace.

    An interval is timed from the first reach of its start speed (from the first point
    for a start speed of 0), and not at all on a trace whose first point is already above
    its start speed; on traces from rest, an interval from 0 is also given less the time to
    roll out.

    Parameters
    ----------
    probes : TraceProbes
        Probes at :func:`probe_speeds` of the same intervals, and at the rollout first.
    speeds : sequence of (str, float, float)
        Name, start and end speed [m/s].
    moved : ndarray of bool, shape (c,)
        False for traces that never started; their timings are NaN.

    Returns
    -------
    tuple of BatchTimedSpeed
    """
    if not speeds:
        return ()
    rolled = probes.passing()[0][:, 0]
    reaching = probes.reaching()
    out = []
    for j, (name, a, b) in enumerate(speeds):
        begun = moved & (probes.first_v <= a + 1e-9)
        start = probes.first_t if a <= 0.0 else reaching[:, 2 * j]
        end = reaching[:, 2 * j + 1]
        elapsed = np.where(begun, end - start, np.nan)
        from_rest = begun & (probes.first_v == 0.0) & (a == 0.0)
        less = np.where(from_rest, end - rolled, np.nan)
        out.append(BatchTimedSpeed(name, a, b, elapsed, less))
    return tuple(out)


def probe_distances(rollout_m: float, distances: Sequence[tuple[str, float, bool]]) -> FloatArray:
    """The distances from the start of motion [m] that :func:`timed_distances` reads, in
    its order: the rollout, each distance past it, then each trap's entry."""
    probe = [rollout_m] + [rollout_m + d for _, d, _ in distances]
    probe += [rollout_m + d - TRAP_WINDOW_M for _, d, trap in distances if _trapped(d, trap)]
    return np.array(probe, dtype=np.float64)


def probe_speeds(speeds: Sequence[tuple[str, float, float]]) -> FloatArray:
    """The speeds [m/s] that :func:`timed_speeds` reads, in its order: start and end of
    each interval."""
    return np.array([v for _, a, b in speeds for v in (a, b)], dtype=np.float64)
