"""Standing-start runs of one car with many final drive ratios, integrated together and
timed like a strip.

:func:`batch_runs` follows :func:`core.simulate.simulate_run` for every candidate final drive
at once: in each gear every still-running candidate gets a 241-point speed grid, a row of
one (c, 241) array, whose net acceleration comes from one call of
:func:`core.batchdrive.batch_acceleration`; time and distance follow by the trapezoid rule
along the rows. A row is cut where its engine reaches the shift rpm or its acceleration
falls to ``MIN_ACCELERATION`` and padded to the common width with copies of its new last
point, which add nothing to the integrals. All candidates start from rest in first gear and
change gear together, so the loop runs once per gear, not once per candidate.

The traces are not kept: :class:`core.batchtiming.TraceProbes` reads each block as it is
made, for the strip timing :func:`core.runreport.run_report` gives (the clock starts after
the rollout, traps average the last 66 ft).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.batchdrive import (
    batch_acceleration,
    candidate_masses,
    checked_final_drives,
    overall_ratios,
    take_rows,
)
from core.batchtiming import (
    BatchTimedDistance,
    BatchTimedSpeed,
    TraceProbes,
    probe_distances,
    probe_speeds,
    timed_distances,
    timed_speeds,
)
from core.curves import RPM_TO_RAD_S
from core.errors import SimulationError
from core.milestones import FOOT_M
from core.simulate import (
    MAX_SPEED_M_S,
    MIN_ACCELERATION,
    POINTS_PER_GEAR,
    DriveModel,
    checked_shift_rpm,
)
from core.vehicle import Coupling

__all__ = ["BatchRuns", "batch_runs"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]


@dataclass(frozen=True)
class BatchRuns:
    """Timed standing-start runs of one car, one row per final drive ratio.

    Attributes
    ----------
    final_drive_ratio : ndarray, shape (c,)
        Candidate final drive ratios [-].
    distances : tuple of BatchTimedDistance
        The distances asked for, in order.
    speeds : tuple of BatchTimedSpeed
        The speed intervals asked for, in order.
    moved : ndarray of bool, shape (c,)
        False where the car cannot move off (road load exceeds the drive at rest); such a
        candidate's timings are NaN.
    held_speed_m_s : ndarray, shape (c,)
        Speed the car settled at (drag or rev limiter), NaN where it did not [m/s].
    held_by : tuple of str or None, length c
        ``"drag"`` or ``"rev_limit"`` where the car settled.
    shift_rpm : ndarray, shape (g - 1,)
        Shift rpm of each gear change [rpm].
    shift_time_s, shift_speed_m_s : ndarray, shape (c, g - 1)
        When and how fast each upshift began [s, m/s]; NaN for shifts not made.
    rpm_before, rpm_after : ndarray, shape (c, g - 1)
        Engine speed as each shift began and gearbox input speed once the next gear took
        up the drive [rpm]; NaN for shifts not made.
    gears_left_at_once : ndarray of int, shape (c,)
        Gears entered above their own shift speed, and so left at once.
    """

    final_drive_ratio: FloatArray
    distances: tuple[BatchTimedDistance, ...]
    speeds: tuple[BatchTimedSpeed, ...]
    moved: BoolArray
    held_speed_m_s: FloatArray
    held_by: tuple[str | None, ...]
    shift_rpm: FloatArray
    shift_time_s: FloatArray
    shift_speed_m_s: FloatArray
    rpm_before: FloatArray
    rpm_after: FloatArray
    gears_left_at_once: IntArray

    def distance(self, name: str) -> BatchTimedDistance:
        """The timed distance called ``name``."""
        for d in self.distances:
            if d.name == name:
                return d
        raise KeyError(name)

    def speed(self, name: str) -> BatchTimedSpeed:
        """The timed speed interval called ``name``."""
        for s in self.speeds:
            if s.name == name:
                return s
        raise KeyError(name)


def _cut(arrays: list[FloatArray], at: IntArray, rows: BoolArray, ends: list[FloatArray]) -> None:
    """In rows ``rows`` set column ``at`` and every later one to the end value: the row's
    new last point and its padding."""
    cols = np.arange(arrays[0].shape[1])
    mask = rows[:, None] & (cols[None, :] >= at[:, None])
    for arr, end in zip(arrays, ends, strict=True):
        np.copyto(arr, np.broadcast_to(end[:, None], arr.shape), where=mask)


def _with_launch_lock(
    model: DriveModel, grid: FloatArray, ratio: FloatArray
) -> tuple[FloatArray, IntArray]:
    """Each row with the speed where the slipping clutch locks added, as ``np.union1d``
    does; rows without it get a copy of their last point. Returns the grid and the number
    of real points of each row."""
    points = grid.shape[1]
    v_lock = model.launch_rpm * RPM_TO_RAD_S * model.tire.rolling_radius_m / ratio
    inside = (grid[:, 0] < v_lock) & (v_lock < grid[:, -1])
    inside &= ~np.any(grid == v_lock[:, None], axis=1)
    pos = np.where(inside, np.sum(grid < v_lock[:, None], axis=1), points)
    cols = np.arange(points + 1)[None, :]
    src = np.clip(np.where(cols < pos[:, None], cols, cols - 1), 0, points - 1)
    out = np.take_along_axis(grid, src, axis=1)
    out[np.flatnonzero(inside), pos[inside]] = v_lock[inside]
    return out, np.where(inside, points + 1, points).astype(np.int64)


def _cumulative_trapezoid(y: FloatArray, step: FloatArray) -> FloatArray:
    """``scipy.integrate.cumulative_trapezoid(y, x, axis=1, initial=0)`` with the steps of
    ``x`` given: the same sums in the same order."""
    out = np.zeros(y.shape)
    np.cumsum(step * (y[:, 1:] + y[:, :-1]) / 2.0, axis=1, out=out[:, 1:])
    return out


@dataclass(frozen=True)
class _Segment:
    """One gear of the still-running candidates: the grid and its outcome per row."""

    grid: FloatArray
    rpm: FloatArray
    time_s: FloatArray
    distance_m: FloatArray
    stuck: BoolArray  # no acceleration on entry: held at the entry speed (or cannot move)
    stop: BoolArray  # acceleration fell to the floor within the gear: held there
    v_top: FloatArray


def _segment(
    model: DriveModel,
    g: int,
    v_in: FloatArray,
    v_top: FloatArray,
    ratio: FloatArray,
    masses: tuple[FloatArray, FloatArray],
    shift: float | None,
    start: tuple[FloatArray, FloatArray],
) -> _Segment:
    """Integrate gear index ``g`` for the rows given, as one pass of ``simulate_run``."""
    launching = g == 0
    grid = np.linspace(v_in, np.minimum(v_top, MAX_SPEED_M_S), POINTS_PER_GEAR, axis=-1)
    valid = np.full(v_in.size, POINTS_PER_GEAR, dtype=np.int64)
    if launching and model.launch.coupling is Coupling.CLUTCH:
        grid, valid = _with_launch_lock(model, grid, ratio)
    a, rpm = batch_acceleration(model, g, grid, ratio, masses, launching)
    v_top = v_top.copy()
    if shift is not None:
        # leave the gear when the engine reaches the shift rpm
        due = rpm >= shift * (1.0 - 1e-9)
        k = np.argmax(due, axis=1)
        cut = due.any(axis=1) & (k > 0) & (k < valid - 1)
        if cut.any():
            km = np.maximum(k - 1, 0)
            r0, r1 = take_rows(rpm, km), take_rows(rpm, k)
            frac = np.where(cut, (shift - r0) / np.where(cut, r1 - r0, 1.0), 0.0)
            v_cut = take_rows(grid, km) + frac * (take_rows(grid, k) - take_rows(grid, km))
            a_cut = take_rows(a, km) + frac * (take_rows(a, k) - take_rows(a, km))
            v_top = np.where(cut, v_cut, v_top)
            _cut([grid, a, rpm], k, cut, [v_cut, a_cut, np.full(v_in.size, shift)])
    weak = a < MIN_ACCELERATION
    kw = np.argmax(weak, axis=1)
    stuck = weak.any(axis=1) & (kw == 0)
    stop = weak.any(axis=1) & (kw > 0)
    if stop.any():
        # speed where the acceleration falls to the floor, by linear interpolation
        km = np.maximum(kw - 1, 0)
        a0, a1 = take_rows(a, km), take_rows(a, kw)
        frac = np.where(stop, (a0 - MIN_ACCELERATION) / np.where(stop, a0 - a1, 1.0), 0.0)
        v_stop = take_rows(grid, km) + frac * (take_rows(grid, kw) - take_rows(grid, km))
        n_stop = take_rows(rpm, km) + frac * (take_rows(rpm, kw) - take_rows(rpm, km))
        keep = np.sum(grid < v_stop[:, None], axis=1)
        floor = np.full(v_in.size, MIN_ACCELERATION)
        _cut([grid, a, rpm], keep, stop, [v_stop, floor, n_stop])
    inv = 1.0 / (np.where(stuck[:, None], 1.0, a) if stuck.any() else a)
    step = np.diff(grid, axis=1)
    t = start[0][:, None] + _cumulative_trapezoid(inv, step)
    x = start[1][:, None] + _cumulative_trapezoid(grid * inv, step)
    return _Segment(grid, rpm, t, x, stuck, stop, v_top)


def batch_runs(
    model: DriveModel,
    final_drive_ratio: ArrayLike,
    shift_rpm: ArrayLike,
    *,
    distances: Sequence[tuple[str, float, bool]],
    speeds: Sequence[tuple[str, float, float]] = (),
    rollout_m: float = FOOT_M,
) -> BatchRuns:
    """Standing-start runs with each final drive ratio, integrated together and timed.

    Parameters
    ----------
    model : DriveModel
        The car; its final drive ratio is replaced by each candidate.
    final_drive_ratio : array_like, shape (c,)
        Candidate final drive ratios [-], each finite and in (0, 50].
    shift_rpm : array_like, shape (g - 1,)
        Engine speed at which to leave each gear [rpm], the same for every candidate, above
        the curve's first point and at most the rev limit.
    distances : sequence of (str, float, bool)
        Name, distance from where the clock starts [m] and whether to time a trap speed,
        as :data:`core.milestones.STANDARD_DISTANCES`.
    speeds : sequence of (str, float, float)
        Name, start and end speed [m/s], as :data:`core.milestones.STANDARD_SPEEDS`.
    rollout_m : float
        Distance rolled before the clock starts [m].

    Returns
    -------
    BatchRuns
        Row c equals :func:`core.runreport.run_report` of the car with final drive
        ``final_drive_ratio[c]`` to rounding; a candidate that cannot move off is flagged
        in ``moved`` instead of raising. Each run goes on past the longest distance (plus
        rollout) and up to the highest speed, if the car gets there.

    Raises
    ------
    DrivetrainError
        When a ratio is not finite or outside (0, 50].
    SimulationError
        When the shift rpm list does not fit the gears, or a distance, speed or the rollout
        is negative or not finite.
    """
    f = checked_final_drives(final_drive_ratio)
    shifts = checked_shift_rpm(model, shift_rpm)
    lengths = [rollout_m] + [d for _, d, _ in distances]
    rates = [v for _, a, b in speeds for v in (a, b)]
    for name, values in (("distances", lengths), ("speeds", rates)):
        if not all(math.isfinite(v) and v >= 0.0 for v in values):
            raise SimulationError(f"`{name}` must be finite and >= 0", parameter=name)
    gears, count, r = model.drivetrain.gear_count, f.size, model.tire.rolling_radius_m
    cover_distance_m = max(lengths[1:], default=0.0) + rollout_m
    target_v = min(max(rates, default=0.0), MAX_SPEED_M_S)
    probes = TraceProbes(count, probe_distances(rollout_m, distances), probe_speeds(speeds))
    overall = overall_ratios(model, f)
    mass, decoupled = candidate_masses(model, f)
    shift_speed = np.append(shifts, model.rev_limit_rpm) * RPM_TO_RAD_S * r / overall
    ts = model.launch.shift_time_s
    active, moved = np.ones(count, dtype=np.bool_), np.ones(count, dtype=np.bool_)
    held = np.full(count, np.nan)
    held_by: list[str | None] = [None] * count
    events = {k: np.full((count, gears - 1), np.nan) for k in ("t", "v", "n0", "n1")}
    left_at_once = np.zeros(count, dtype=np.int64)
    v_in = np.zeros(count)
    last_t, last_x = probes.last[0], probes.last[2]

    def settle(rows: IntArray, speeds: FloatArray, how: list[str]) -> None:
        held[rows] = speeds
        for c, h in zip(rows.tolist(), how, strict=True):
            held_by[c] = h

    for g in range(gears):
        idx = np.flatnonzero(active)
        if idx.size == 0:
            break
        vin = v_in[idx]
        v_top = shift_speed[idx, g]
        # a gear entered above its own shift speed is left at once
        skip = vin >= np.minimum(v_top, MAX_SPEED_M_S) if g < gears - 1 else vin < 0.0
        left_at_once[idx[skip]] += 1
        v_out = vin.copy()
        n_out = vin * overall[idx, g] / (r * RPM_TO_RAD_S)
        shifting = skip.copy()
        s = np.flatnonzero(~skip)
        if s.size:
            rows = idx[s]
            seg = _segment(
                model,
                g,
                vin[s],
                v_top[s],
                overall[rows, g],
                (mass[rows, g], decoupled[rows]),
                float(shifts[g]) if g < gears - 1 else None,
                (last_t[rows], last_x[rows]),
            )
            if g == 0:
                moved[rows[seg.stuck]] = False
            else:
                settle(rows[seg.stuck], vin[s][seg.stuck], ["drag"] * int(seg.stuck.sum()))
            go = ~seg.stuck
            probes.add(rows[go], seg.time_s[go], seg.grid[go], seg.distance_m[go])
            end_v, end_x = seg.grid[:, -1], seg.distance_m[:, -1]
            limit = end_v >= seg.v_top * (1 - 1e-6)
            how = ["rev_limit" if lim else "drag" for lim in limit[seg.stop].tolist()]
            settle(rows[seg.stop], end_v[seg.stop], how)
            done = seg.stuck | seg.stop
            tops = ~done & ((g == gears - 1) | (end_v >= MAX_SPEED_M_S))
            settle(rows[tops], end_v[tops], ["rev_limit"] * int(tops.sum()))
            finished = ~done & ~tops & (end_x >= cover_distance_m) & (end_v >= target_v)
            active[rows[done | tops | finished]] = False
            v_out[s], n_out[s] = end_v, seg.rpm[:, -1]
            shifting[s] = ~(done | tops | finished)
        if not shifting.any():
            continue
        # the shift: no drive for shift_time_s, slowing at the road-load deceleration
        rows, vo = idx[shifting], v_out[shifting]
        t0, x0 = last_t[rows], last_x[rows]
        decel = model.vehicle.road_load.force_n(vo) / model.vehicle.mass_kg
        v_after = np.maximum(vo - decel * ts, 0.0)
        n_after = v_after * overall[rows, g + 1] / (r * RPM_TO_RAD_S)
        events["t"][rows, g] = t0
        events["v"][rows, g] = vo
        events["n0"][rows, g] = n_out[shifting]
        events["n1"][rows, g] = np.maximum(n_after, 0.0)
        if ts > 0.0:
            x_after = x0 + 0.5 * (vo + v_after) * ts
            probes.add(rows, (t0 + ts)[:, None], v_after[:, None], x_after[:, None])
        v_in[rows] = v_after

    hold = np.flatnonzero(np.isfinite(held) & (last_x < cover_distance_m))
    if hold.size:
        # hold the settled speed for the rest of the distance asked for
        extra_t = (cover_distance_m - last_x[hold]) / np.maximum(held[hold], 1e-9)
        end = np.full((hold.size, 1), cover_distance_m)
        probes.add(hold, (last_t[hold] + extra_t)[:, None], held[hold][:, None], end)
    return BatchRuns(
        final_drive_ratio=f,
        distances=timed_distances(probes, distances, moved),
        speeds=timed_speeds(probes, speeds, moved),
        moved=moved,
        held_speed_m_s=held,
        held_by=tuple(held_by),
        shift_rpm=shifts,
        shift_time_s=events["t"],
        shift_speed_m_s=events["v"],
        rpm_before=events["n0"],
        rpm_after=events["n1"],
        gears_left_at_once=left_at_once,
    )
