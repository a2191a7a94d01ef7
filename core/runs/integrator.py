"""The one integrator of acceleration runs: any number of runs of one car at once.

Each row c is a run of the same engine, converter, tires and road load behind its own
overall ratios (a final drive candidate, or just the car as it is). In each gear the net
acceleration is a function of speed alone (quasi-static engine, converter and road load),

    a_g(v) = (min(F_g(v), F_traction) - R(v)) / m_g

(Gillespie ch. 2), so time and distance are integrals over speed, ``t = int dv / a`` and
``x = int v dv / a``. Every still-running row gets a grid of ``POINTS_PER_GEAR`` speeds in
the gear, one row of a (c, n) array whose net acceleration comes from one call of
:func:`core.choice.batch_drive.batch_drive` (:class:`core.runs.row_drive.RowCar`); the
integrals follow by the trapezoid rule along the rows. The loop runs once per gear, not
once per row or per time step; many rows go through it ``ROW_BLOCK`` at a time, so that a
block's arrays stay in the processor's cache and the cost grows linearly with the rows.

Where a gear cannot reach its shift speed the acceleration falls to zero at a speed
``v*`` (the drag-limited speed of that gear, found by a bracketed root finder on the force
balance). The run then keeps integrating towards it: with ``d = v* - v`` and
``q = a/d`` (smooth, tending to ``-a'(v*)``), ``dt = dv/(q d)`` is integrated exactly in
``d`` on each interval with ``1/q`` taken linear (product integration), over a grid that
closes in on ``v*`` geometrically down to ``d = TAIL_END * v*``, hours of driving away.
Past that point the speed equals ``v*`` to a part per million and is carried on at it.
A car that reaches the rev limit in top gear is held there (acceleration zero).

A shift takes ``shift_time_s`` with no drive, during which the car slows at the road-load
deceleration of the shift speed. The integrator hands its results to a sink block by
block: :func:`core.runs.simulate.simulate_run` keeps them as a trace (a batch of one), and
:func:`core.runs.batch.batch_runs` reads them as strip timers.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray

from core.car.vehicle import Coupling
from core.engine.curves import RPM_TO_RAD_S
from core.runs.row_drive import (
    POINTS_PER_GEAR,
    TAIL_END,
    TAIL_POINTS,
    RowCar,
    approach,
    drag_limited_speed,
)
from core.runs.run_blocks import GearBlock, RunEnds, RunSink, RunStart, ShiftBlock

if TYPE_CHECKING:
    from core.runs.drive_model import DriveModel

__all__ = [
    "MAX_SPEED_M_S",
    "POINTS_PER_GEAR",
    "ROW_BLOCK",
    "TAIL_END",
    "TAIL_POINTS",
    "integrate_runs",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]
MAX_SPEED_M_S = 150.0  # [m/s], no run integrates beyond this
ROW_BLOCK = 128  # rows integrated together: a block's (rows, points) arrays stay in cache
_EVEN = np.linspace(0.0, 1.0, POINTS_PER_GEAR)


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


def _cut(arrays: list[FloatArray], at: IntArray, rows: BoolArray, ends: list[FloatArray]) -> None:
    """In rows ``rows`` set column ``at`` and every later one to the end value: the row's
    new last point and its padding."""
    cols = np.arange(arrays[0].shape[1])
    mask = rows[:, None] & (cols[None, :] >= at[:, None])
    for arr, end in zip(arrays, ends, strict=True):
        np.copyto(arr, np.broadcast_to(end[:, None], arr.shape), where=mask)


def _pick(values: FloatArray, index: IntArray) -> FloatArray:
    """``values[r, index[r]]`` for every row r, shape (r,)."""
    picked: FloatArray = values[np.arange(index.size), index]
    return picked


def _cumulative(y: FloatArray, step: FloatArray, start: FloatArray) -> FloatArray:
    """Cumulative trapezoid along rows with the steps given, from each row's start."""
    out = np.empty(y.shape)
    out[:, 0] = 0.0
    area = y[:, 1:] + y[:, :-1]
    area *= step
    area /= 2.0
    np.cumsum(area, axis=1, out=out[:, 1:])
    out += start[:, None]
    return out


class _State:
    """Per-row progress of the runs."""

    def __init__(self, count: int, gears: int, start: RunStart) -> None:
        self.v = np.full(count, start.speed_m_s)
        self.t = np.zeros(count)
        self.x = np.zeros(count)
        self.n = np.zeros(count)  # engine speed [rpm]
        self.gear = np.full(count, start.gear, dtype=np.int64)
        self.active = np.ones(count, dtype=np.bool_)
        self.moved = np.ones(count, dtype=np.bool_)
        self.settled = np.full(count, np.nan)
        self.settled_by: list[str | None] = [None] * count
        self.stalled = np.full(count, -1, dtype=np.int64)
        self.left_at_once = np.zeros((count, gears), dtype=np.bool_)

    def settle(self, rows: IntArray, speeds: FloatArray, how: str) -> None:
        self.settled[rows] = speeds
        for c in rows.tolist():
            self.settled_by[c] = how


def _gear(
    car: RowCar,
    g: int,
    rows: IntArray,
    shift_speed: FloatArray,
    shift_rpm: FloatArray | None,
    state: _State,
    sink: RunSink,
    launching: bool,
) -> BoolArray:
    """Drive rows through gear index ``g``; returns which rows go on to shift."""
    model = car.model
    v_in, v_top = state.v[rows], np.minimum(shift_speed, MAX_SPEED_M_S)
    grid = v_in[:, None] + (v_top - v_in)[:, None] * _EVEN
    grid[:, -1] = v_top
    valid = np.full(rows.size, POINTS_PER_GEAR, dtype=np.int64)
    if launching and model.launch.coupling is Coupling.CLUTCH:
        grid, valid = _with_launch_lock(model, grid, car.ratio[rows, g])
    a, rpm, limited = car.net(g, rows, grid, launching)
    v_end = v_top.copy()
    if shift_rpm is not None:
        # leave the gear when the engine reaches the shift rpm: with a slipping converter
        # that comes before the coupled speed of the shift rpm
        due = rpm >= shift_rpm[:, None] * (1.0 - 1e-9)
        k = np.argmax(due, axis=1)
        cut = due.any(axis=1) & (k > 0) & (k < valid - 1)
        if cut.any():
            km = np.maximum(k - 1, 0)
            r0, r1 = _pick(rpm, km), _pick(rpm, k)
            frac = np.where(cut, (shift_rpm - r0) / np.where(cut, r1 - r0, 1.0), 0.0)
            v_cut = _pick(grid, km) + frac * (_pick(grid, k) - _pick(grid, km))
            a_cut = _pick(a, km) + frac * (_pick(a, k) - _pick(a, km))
            v_end = np.where(cut, v_cut, v_end)
            ends = [v_cut, a_cut, shift_rpm]
            _cut([grid, a, rpm], k, cut, ends)
            after = cut[:, None] & (np.arange(grid.shape[1])[None, :] >= k[:, None])
            limited = np.where(after, limited[np.arange(k.size), km][:, None], limited)
    weak = a <= 0.0
    kw = np.argmax(weak, axis=1)
    stuck = weak.any(axis=1) & (kw == 0)
    drag = weak.any(axis=1) & (kw > 0)
    if stuck.any():
        # no acceleration where the gear is entered: the car cannot move off (before any
        # motion), or this gear cannot pull it after a shift and the run ends here
        first = stuck & (state.t[rows] == 0.0)
        state.moved[rows[first]] = False
        state.stalled[rows[stuck & ~first]] = g
        state.active[rows[stuck]] = False
    go: BoolArray = ~stuck & ~drag
    if go.any():
        # every row going on (the usual case) reads the arrays as they are, uncopied
        on = slice(None) if go.all() else go
        v, a_on = grid[on], a[on]
        moving = rows[on]
        step = np.diff(v, axis=1)
        inv = 1.0 / a_on
        t = _cumulative(inv, step, state.t[moving])
        inv *= v
        x = _cumulative(inv, step, state.x[moving])
        sink.gear(GearBlock(moving, g, t, v, x, rpm[on], a_on, limited[on]))
        state.t[moving], state.x[moving], state.v[moving] = t[:, -1], x[:, -1], v_end[on]
        state.n[moving] = rpm[on][:, -1]
    if drag.any():
        d_rows = rows[drag]
        km = np.maximum(kw - 1, 0)[drag]
        lo, hi = _pick(grid[drag], km), _pick(grid[drag], kw[drag])
        v_star = drag_limited_speed(car, g, d_rows, lo, hi, launching)
        block = approach(
            car, g, d_rows, v_in[drag], v_star, (state.t[d_rows], state.x[d_rows]), launching
        )
        sink.gear(block)
        state.t[d_rows], state.x[d_rows] = block.time_s[:, -1], block.distance_m[:, -1]
        state.v[d_rows], state.n[d_rows] = block.speed_m_s[:, -1], block.engine_rpm[:, -1]
        state.settle(d_rows, v_star, "drag")
        state.active[d_rows] = False
    return go


def _shift(car: RowCar, g: int, rows: IntArray, state: _State) -> ShiftBlock:
    """The shift out of gear index ``g``: no drive for shift_time_s."""
    model = car.model
    ts = model.launch.shift_time_s
    v_out, t0, x0, rpm_before = state.v[rows], state.t[rows], state.x[rows], state.n[rows]
    decel = model.vehicle.road_load.force_n(v_out) / model.vehicle.mass_kg
    v_after = np.maximum(v_out - decel * ts, 0.0)
    n_after = v_after * car.ratio[rows, g + 1] / (model.tire.rolling_radius_m * RPM_TO_RAD_S)
    x_after = x0 + 0.5 * (v_out + v_after) * ts
    block = ShiftBlock(
        rows, g, t0, v_out, x0, rpm_before, t0 + ts, v_after, x_after, n_after, decel
    )
    state.t[rows], state.x[rows], state.v[rows] = t0 + ts, x_after, v_after
    state.n[rows], state.gear[rows] = n_after, g + 1
    return block


def _hold(car: RowCar, state: _State, start: RunStart, sink: RunSink) -> None:
    """Carry settled rows on at their last speed over the rest of the distance asked."""
    hold = np.flatnonzero(np.isfinite(state.settled) & (state.x < start.cover_distance_m))
    if hold.size == 0:
        return
    v = state.v[hold]
    extra = (start.cover_distance_m - state.x[hold]) / np.maximum(v, 1e-9)
    t = np.stack([state.t[hold], state.t[hold] + extra], axis=1)
    x = np.stack([state.x[hold], np.full(hold.size, start.cover_distance_m)], axis=1)
    vv = np.stack([v, v], axis=1)
    rpm = np.stack([state.n[hold], state.n[hold]], axis=1)
    zero = np.zeros((hold.size, 2))
    for g in np.unique(state.gear[hold]).tolist():
        k = state.gear[hold] == g
        sink.gear(GearBlock(hold[k], g, t[k], vv[k], x[k], rpm[k], zero[k], zero[k] > 0.0))


def _drive_rows(
    car: RowCar,
    block: IntArray,
    shifts: tuple[FloatArray, FloatArray],
    state: _State,
    start: RunStart,
    sink: RunSink,
) -> None:
    """Drive the rows ``block`` gear by gear, shifting at their shift rpm and speed
    ``shifts`` (each shape (c, g), the rev limit in top gear), until each has covered
    what ``start`` asks, settled or stalled."""
    limits, shift_speed = shifts
    gears = car.ratio.shape[1]
    r = car.model.tire.rolling_radius_m
    target_v = min(max(start.cover_speed_m_s, 0.0), MAX_SPEED_M_S)
    for g in range(start.gear, gears):
        idx = block[state.active[block]]
        if idx.size == 0:
            break
        top = g == gears - 1
        launching = start.speed_m_s == 0.0 and g == start.gear
        v_top = shift_speed[idx, g]
        state.n[idx] = state.v[idx] * car.ratio[idx, g] / (r * RPM_TO_RAD_S)
        skip = np.zeros(idx.size, dtype=np.bool_)
        if not top:  # a gear entered above its own shift speed is left at once
            skip = state.v[idx] >= np.minimum(v_top, MAX_SPEED_M_S)
            state.left_at_once[idx[skip], g] = True
        driven = np.flatnonzero(~skip)
        if driven.size:
            rows = idx[driven]
            shift = None if top else limits[rows, g]
            go = _gear(car, g, rows, v_top[driven], shift, state, sink, launching)
            rows = rows[go]
            held = rows if top else rows[state.v[rows] >= MAX_SPEED_M_S * (1 - 1e-12)]
            state.settle(held, state.v[held], "rev_limit")
            state.active[held] = False
            finished = (state.x[rows] >= start.cover_distance_m) & (state.v[rows] >= target_v)
            state.active[rows[finished]] = False
        shifting = idx[state.active[idx]]
        if shifting.size and not top:
            sink.shift(_shift(car, g, shifting, state))


def integrate_runs(
    model: DriveModel,
    overall_ratio: FloatArray,
    masses: tuple[FloatArray, FloatArray],
    shift_rpm: FloatArray,
    start: RunStart,
    sink: RunSink,
) -> RunEnds:
    """Integrate full-throttle runs of one car with each row's gearing.

    Parameters
    ----------
    model : DriveModel
        The car (engine, converter, tires, road load, traction limit, shift time).
    overall_ratio : ndarray, shape (c, g)
        Overall ratio of each row in each gear [-].
    masses : tuple of ndarray, shapes (c, g) and (c,)
        Effective mass in each gear and mass while the engine slips, per row [kg].
    shift_rpm : ndarray, shape (g - 1,) or (c, g - 1)
        Engine speed at which to leave each gear [rpm], checked; the same for every row,
        or one row of them per run.
    start : RunStart
        Start speed and gear, and how far to go.
    sink : RunSink
        Receives the trace block by block.

    Returns
    -------
    RunEnds
    """
    count, gears = overall_ratio.shape
    car = RowCar(model, overall_ratio, masses[0], masses[1])
    limits = np.empty((count, gears))
    limits[:, :-1] = shift_rpm
    limits[:, -1] = model.rev_limit_rpm
    shift_speed = limits * RPM_TO_RAD_S * model.tire.rolling_radius_m / overall_ratio
    state = _State(count, gears, start)
    for first in range(0, count, ROW_BLOCK):
        block = np.arange(first, min(first + ROW_BLOCK, count))
        _drive_rows(car, block, (limits, shift_speed), state, start, sink)
    _hold(car, state, start, sink)
    return RunEnds(
        moved=state.moved,
        settled_m_s=state.settled,
        settled_by=tuple(state.settled_by),
        stalled_gear=state.stalled,
        left_at_once=state.left_at_once,
    )
