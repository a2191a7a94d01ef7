"""Standing-start runs of one car with many final drive ratios, integrated together and
timed like a strip.

:func:`batch_runs` hands every candidate final drive to the one integrator of runs
(:func:`core.runs.integrator.integrate_runs`) as a row: in each gear every still-running
candidate gets its speed grid, one row of a (c, n) array, so the loop runs once per gear,
not once per candidate, and a single run (:func:`core.runs.simulate.simulate_run`) is the same
integration with one row.

The traces are not kept: :class:`core.runs.batch_timing.TraceProbes` reads each block as it is
made, for the strip timing :func:`core.runs.report.run_report` gives (the clock starts after
the rollout, traps average the last 66 ft).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.choice.batch_drive import candidate_masses, checked_final_drives, overall_ratios
from core.engine.curves import RPM_TO_RAD_S
from core.errors import SimulationError
from core.runs.batch_timing import (
    BatchTimedDistance,
    BatchTimedSpeed,
    TraceProbes,
    probe_distances,
    probe_speeds,
    timed_distances,
    timed_speeds,
)
from core.runs.drive_model import DriveModel
from core.runs.integrator import MAX_SPEED_M_S, integrate_runs
from core.runs.milestones import STANDARD_ROLLOUT_M
from core.runs.run_blocks import GearBlock, RunStart, ShiftBlock
from core.shifts.shift_rpm import checked_shift_rpm

__all__ = ["BatchRuns", "batch_finish_times", "batch_runs"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]
_KEEP_ROWS = 16  # runs up to which the sink reads blocks together (fewer, larger calls)


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
        Drag-limited speed the run approaches, or the speed the rev limiter holds it at
        [m/s]; NaN where neither happened within the run.
    held_by : tuple of str or None, length c
        ``"drag"`` or ``"rev_limit"`` accordingly.
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


class _Probing:
    """A :class:`core.runs.integrator.RunSink` feeding the strip timers, recording shifts.

    Many runs are read block by block as they come. A few runs keep their blocks while
    every block covers the same rows (the usual case: no run finishes or stops before the
    others) and are read as one block at :meth:`finish` or when the rows change: the same
    points, the same probes, fewer calls."""

    def __init__(self, probes: TraceProbes, count: int, gears: int) -> None:
        self.probes = probes
        events = np.full((4, count, gears - 1), np.nan)
        self.events = dict(zip(("t", "v", "n0", "n1"), events, strict=True))
        self.keeping = count <= _KEEP_ROWS
        self.kept: list[tuple[FloatArray, FloatArray, FloatArray, FloatArray]] = []
        self.kept_rows = np.zeros(0, dtype=np.int64)

    def gear(self, block: GearBlock) -> None:
        self._read(
            block.rows, block.time_s, block.speed_m_s, block.distance_m, block.acceleration_m_s2
        )

    def shift(self, block: ShiftBlock) -> None:
        rows, g = block.rows, block.gear
        self.events["t"][rows, g] = block.time_s
        self.events["v"][rows, g] = block.speed_m_s
        self.events["n0"][rows, g] = block.rpm_before
        self.events["n1"][rows, g] = np.maximum(block.rpm_after, 0.0)
        if np.any(block.end_time_s > block.time_s):
            self._read(
                rows,
                block.end_time_s[:, None],
                block.end_speed_m_s[:, None],
                block.end_distance_m[:, None],
                -block.deceleration_m_s2[:, None],
            )

    def _read(
        self, rows: IntArray, t: FloatArray, v: FloatArray, x: FloatArray, a: FloatArray
    ) -> None:
        if not self.keeping:
            self.probes.add(rows, t, v, x, a)
            return
        if self.kept and not np.array_equal(rows, self.kept_rows):
            self.finish()
        self.kept_rows = rows
        self.kept.append((t, v, x, a))

    def finish(self) -> TraceProbes:
        """The probes, every block read."""
        if self.kept:
            t, v, x, a = (np.concatenate(c, axis=1) for c in zip(*self.kept, strict=True))
            self.probes.add(self.kept_rows, t, v, x, a, speed_falls=True)
            self.kept = []
        return self.probes


def batch_runs(
    model: DriveModel,
    final_drive_ratio: ArrayLike,
    shift_rpm: ArrayLike,
    *,
    distances: Sequence[tuple[str, float, bool]],
    speeds: Sequence[tuple[str, float, float]] = (),
    rollout_m: float = STANDARD_ROLLOUT_M,
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
        as :data:`core.runs.milestones.STANDARD_DISTANCES`.
    speeds : sequence of (str, float, float)
        Name, start and end speed [m/s], as :data:`core.runs.milestones.STANDARD_SPEEDS`.
    rollout_m : float
        Distance rolled before the clock starts [m].

    Returns
    -------
    BatchRuns
        Row c equals :func:`core.runs.report.run_report` of the car with final drive
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
    gears = model.drivetrain.gear_count
    shifts = checked_shift_rpm(model.curve, model.rev_limit_rpm, gears, shift_rpm)
    lengths = [rollout_m] + [d for _, d, _ in distances]
    rates = [v for _, a, b in speeds for v in (a, b)]
    for name, values in (("distances", lengths), ("speeds", rates)):
        if not all(math.isfinite(v) and v >= 0.0 for v in values):
            raise SimulationError(f"`{name}` must be finite and >= 0", parameter=name)
    count = f.size
    cover_distance_m = max(lengths[1:], default=0.0) + rollout_m
    target_v = min(max(rates, default=0.0), MAX_SPEED_M_S)
    probes = TraceProbes(count, probe_distances(rollout_m, distances), probe_speeds(speeds))
    sink = _Probing(probes, count, model.drivetrain.gear_count)
    ends = integrate_runs(
        model,
        overall_ratios(model, f),
        candidate_masses(model, f),
        shifts,
        RunStart(0.0, 0, cover_distance_m, target_v),
        sink,
    )
    sink.finish()
    moved = ends.moved
    return BatchRuns(
        final_drive_ratio=f,
        distances=timed_distances(probes, distances, moved),
        speeds=timed_speeds(probes, speeds, moved),
        moved=moved,
        held_speed_m_s=ends.settled_m_s,
        held_by=ends.settled_by,
        shift_rpm=shifts,
        shift_time_s=sink.events["t"],
        shift_speed_m_s=sink.events["v"],
        rpm_before=sink.events["n0"],
        rpm_after=sink.events["n1"],
        gears_left_at_once=ends.left_at_once.sum(axis=1).astype(np.int64),
    )


def _start_gears(model: DriveModel, shifts: FloatArray, start_speed_m_s: float) -> IntArray:
    """:func:`core.runs.simulate.default_start_gear` of each row of shift rpms (1 = first),
    shape (k,): the lowest gear whose shift speed lies above the start speed."""
    ratios = model.drivetrain.overall_ratios[:-1]
    speeds = shifts * RPM_TO_RAD_S * model.tire.rolling_radius_m / ratios
    below = start_speed_m_s < speeds
    gears = np.where(below.any(axis=1), np.argmax(below, axis=1) + 1, ratios.size + 1)
    return gears.astype(np.int64)


def batch_finish_times(
    model: DriveModel,
    shift_rpm: ArrayLike,
    *,
    start_speed_m_s: float,
    rollout_m: float,
    finish_distance_m: float | None,
    finish_speed_m_s: float | None,
) -> FloatArray:
    """Time to the finish of one car with each row of shift rpms, all run together.

    Parameters
    ----------
    model : DriveModel
        The car.
    shift_rpm : array_like, shape (k, g - 1)
        One row of shift rpms per run [rpm], each checked as for a single run.
    start_speed_m_s : float
        0 for a standing start, else a rolling start in the default start gear of each
        row [m/s].
    rollout_m : float
        Distance rolled before the clock starts on a standing start [m].
    finish_distance_m, finish_speed_m_s : float or None
        The finish: a distance from the clock start [m], or a speed [m/s].

    Returns
    -------
    ndarray, shape (k,)
        Elapsed time [s] as :func:`core.runs.report.run_report` times the finish (a speed
        from the start of the run); NaN where the run does not get there or cannot move.
    """
    rows = np.atleast_2d(np.asarray(shift_rpm, dtype=np.float64))
    gears = model.drivetrain.gear_count
    checked = [checked_shift_rpm(model.curve, model.rev_limit_rpm, gears, r) for r in rows]
    shifts = np.array(checked).reshape(rows.shape)
    k = rows.shape[0]
    rollout = rollout_m if start_speed_m_s == 0.0 else 0.0
    distances = [] if finish_distance_m is None else [("finish", finish_distance_m, False)]
    speeds = [] if finish_speed_m_s is None else [("finish", start_speed_m_s, finish_speed_m_s)]
    out = np.full(k, np.nan)
    starts = _start_gears(model, shifts, start_speed_m_s)
    for gear in np.unique(starts).tolist():
        idx = np.flatnonzero(starts == gear)
        probes = TraceProbes(idx.size, probe_distances(rollout, distances), probe_speeds(speeds))
        cover = (finish_distance_m or 0.0) + rollout
        start = RunStart(start_speed_m_s, gear - 1, cover, finish_speed_m_s or 0.0)
        ratio = np.tile(model.drivetrain.overall_ratios, (idx.size, 1))
        masses = (
            np.tile(model.effective_mass_kg, (idx.size, 1)),
            np.full(idx.size, model.decoupled_mass_kg),
        )
        sink = _Probing(probes, idx.size, gears)
        ends = integrate_runs(model, ratio, masses, shifts[idx], start, sink)
        sink.finish()
        if finish_distance_m is not None:
            timed = timed_distances(probes, distances, ends.moved)[0].elapsed_s
        else:
            timed = np.where(ends.moved, probes.reaching()[:, 1], np.nan)
        out[idx] = timed
    return out
