"""An acceleration run of one car, integrated as a batch of one.

:func:`simulate_run` integrates one run of a :class:`core.runs.drive_model.DriveModel` with
the integrator of :mod:`core.runs.integrator`, the same code that integrates many final drive
candidates at once (:func:`core.runs.batch.batch_runs`), and keeps its trace.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.car.vehicle import Coupling
from core.errors import SimulationError
from core.notices import Notice
from core.runs.drive_model import DriveModel
from core.runs.integrator import MAX_SPEED_M_S, integrate_runs
from core.runs.run_blocks import GearBlock, RunEnds, RunStart, ShiftBlock
from core.shifts.shift_rpm import checked_shift_rpm

__all__ = [
    "RunResult",
    "RunShift",
    "default_start_gear",
    "simulate_run",
]

FloatArray = NDArray[np.float64]


@dataclass(frozen=True)
class RunShift:
    """One upshift during a run.

    Attributes
    ----------
    from_gear, to_gear : int
        Gear numbers, 1 for first.
    time_s, speed_m_s, distance_m : float
        When, how fast and how far from the start the shift began [s, m/s, m].
    rpm_before, rpm_after : float
        Engine speed as the shift begins and once the next gear takes up the drive [rpm].
    """

    from_gear: int
    to_gear: int
    time_s: float
    speed_m_s: float
    distance_m: float
    rpm_before: float
    rpm_after: float


@dataclass(frozen=True)
class RunResult:
    """A simulated run from its start until it covered the distance and speed asked for.

    Attributes
    ----------
    time_s, speed_m_s, distance_m : ndarray, shape (n,)
        The run's trace [s, m/s, m]; distance from the start of motion.
    gear : ndarray of int, shape (n,)
        Gear number at each point (during a shift, the gear being left).
    engine_rpm, acceleration_m_s2 : ndarray, shape (n,)
        Engine speed [rpm] and net acceleration [m/s^2].
    traction_limited : ndarray of bool, shape (n,)
        Where the tires, not the engine, capped the drive.
    shifts : tuple of RunShift
        Every upshift.
    shift_rpm : ndarray, shape (g - 1,)
        Shift rpm used for each gear change.
    start_gear : int
        Gear the run started in (1 = first).
    held_speed_m_s : float or None
        The drag-limited speed the run approaches (it follows the approach to within a
        part per million, then carries on at it) or the speed it is held at by the rev
        limiter in top gear [m/s]; None when it did neither.
    held_by : str or None
        ``"drag"`` or ``"rev_limit"`` accordingly.
    notices : tuple of Notice
        Warnings about the run.
    """

    time_s: FloatArray
    speed_m_s: FloatArray
    distance_m: FloatArray
    gear: NDArray[np.int64]
    engine_rpm: FloatArray
    acceleration_m_s2: FloatArray
    traction_limited: NDArray[np.bool_]
    shifts: tuple[RunShift, ...]
    shift_rpm: FloatArray
    start_gear: int
    held_speed_m_s: float | None
    held_by: str | None
    notices: tuple[Notice, ...]


def default_start_gear(model: DriveModel, shift_rpm: FloatArray, start_speed_m_s: float) -> int:
    """The lowest gear that can pull the start speed below its shift rpm (1 = first).

    The top gear, which has no shift rpm, takes anything below its rev-limit speed.
    """
    gears = model.drivetrain.gear_count
    for g in range(gears - 1):
        if start_speed_m_s < model.speed_at_rpm(g, float(shift_rpm[g])):
            return g + 1
    return gears


def _checked_start(
    model: DriveModel, shifts: FloatArray, start_speed_m_s: float, start_gear: int | None
) -> int:
    """The start gear number, checked against the start speed."""
    gears = model.drivetrain.gear_count
    if not 0.0 <= start_speed_m_s < MAX_SPEED_M_S:
        raise SimulationError(
            f"`start_speed_m_s` must lie in [0, {MAX_SPEED_M_S:g}), got {start_speed_m_s}",
            parameter="start_speed_m_s",
        )
    top_speed = model.speed_at_rpm(gears - 1, model.rev_limit_rpm)
    if start_speed_m_s >= top_speed:
        raise SimulationError(
            f"`start_speed_m_s` ({start_speed_m_s:.1f} m/s) must be below the top gear's "
            f"rev-limit speed ({top_speed:.1f} m/s)",
            parameter="start_speed_m_s",
        )
    if start_gear is None:
        return default_start_gear(model, shifts, start_speed_m_s)
    if not 1 <= start_gear <= gears:
        raise SimulationError(
            f"`start_gear` must name a gear from 1 to {gears}, got {start_gear}",
            parameter="start_gear",
        )
    rpm = float(model.coupled_rpm(start_gear - 1, np.array([start_speed_m_s]))[0])
    if rpm >= model.rev_limit_rpm:
        raise SimulationError(
            f"`start_gear` {start_gear} would turn {rpm:.0f} rpm at the start speed, at or "
            f"above the rev limit ({model.rev_limit_rpm:.0f} rpm)",
            parameter="start_gear",
        )
    return start_gear


class _Trace:
    """A :class:`core.runs.integrator.RunSink` keeping the one run's trace."""

    def __init__(self) -> None:
        self.parts: list[tuple[FloatArray, ...]] = []
        self.gears: list[NDArray[np.int64]] = []
        self.limited: list[NDArray[np.bool_]] = []
        self.shifts: list[RunShift] = []

    def gear(self, block: GearBlock) -> None:
        t, v = block.time_s[0], block.speed_m_s[0]
        keep = np.ones(t.size, dtype=np.bool_)  # drop the padding that repeats a point
        keep[1:] = (np.diff(t) > 0.0) | (np.diff(v) != 0.0)
        cols = (t, v, block.distance_m[0], block.engine_rpm[0], block.acceleration_m_s2[0])
        self.parts.append(tuple(c[keep] for c in cols))
        self.gears.append(np.full(int(keep.sum()), block.gear + 1, dtype=np.int64))
        self.limited.append(block.traction_limited[0][keep])

    def shift(self, block: ShiftBlock) -> None:
        g, decel = block.gear, float(block.deceleration_m_s2[0])
        self.shifts.append(
            RunShift(
                g + 1,
                g + 2,
                float(block.time_s[0]),
                float(block.speed_m_s[0]),
                float(block.distance_m[0]),
                float(block.rpm_before[0]),
                max(float(block.rpm_after[0]), 0.0),
            )
        )
        if block.end_time_s[0] <= block.time_s[0]:
            return  # an instant shift adds no points
        # the coast through the shift: decelerating from its first instant
        pair = (
            np.array([block.time_s[0], block.end_time_s[0]]),
            np.array([block.speed_m_s[0], block.end_speed_m_s[0]]),
            np.array([block.distance_m[0], block.end_distance_m[0]]),
            np.array([block.rpm_before[0], max(float(block.rpm_after[0]), 0.0)]),
            np.array([-decel, -decel]),
        )
        self.parts.append(pair)
        self.gears.append(np.array([g + 1, g + 2], dtype=np.int64))
        self.limited.append(np.zeros(2, dtype=np.bool_))


def _run_notices(
    model: DriveModel, shifts: FloatArray, ends: RunEnds, trace: _Trace, start_speed: float
) -> list[Notice]:
    notes: list[Notice] = []
    gears = model.drivetrain.gear_count
    if (
        start_speed == 0.0
        and model.launch.coupling is Coupling.CLUTCH
        and gears > 1
        and model.launch_rpm >= shifts[0]
    ):
        notes.append(
            Notice(
                "launch_above_shift",
                f"The launch rpm ({model.launch_rpm:.0f}) is at or above the first shift rpm "
                f"({shifts[0]:.0f}): first gear is left while the clutch still slips.",
                "launch_rpm",
            )
        )
    for g in np.flatnonzero(ends.left_at_once[0]).tolist():
        notes.append(
            Notice(
                "gear_left_at_once",
                f"Gear {g + 1} lands above its shift rpm ({shifts[g]:.0f}); it is "
                "left as soon as it is entered.",
                f"shift_rpm[{g}]",
            )
        )
    stalled = int(ends.stalled_gear[0])
    if stalled >= 0:
        notes.append(
            Notice(
                "gear_cannot_pull",
                f"Gear {stalled + 1} cannot accelerate the car at the speed it is entered "
                "with; the run ends there and later distances and speeds are not reached.",
                f"shift_rpm[{stalled - 1}]",
            )
        )
    settled = float(ends.settled_m_s[0])
    if ends.settled_by[0] == "drag":
        notes.append(
            Notice(
                "drag_limited_speed",
                f"The car approaches its drag-limited speed of {settled:.2f} m/s in gear "
                f"{int(trace.gears[-1][-1])} and never quite reaches it; the run follows "
                "the approach to within a part per million and carries on at that speed.",
            )
        )
    elif ends.settled_by[0] == "rev_limit":
        notes.append(
            Notice(
                "rev_limit_held",
                f"The car reaches the rev limit in gear {int(trace.gears[-1][-1])} at "
                f"{settled:.2f} m/s and is held there (no acceleration) for the rest of the "
                "run.",
            )
        )
    return notes


def simulate_run(
    model: DriveModel,
    shift_rpm: Sequence[float] | FloatArray,
    *,
    start_speed_m_s: float = 0.0,
    start_gear: int | None = None,
    cover_distance_m: float,
    cover_speed_m_s: float = 0.0,
) -> RunResult:
    """Simulate a full-throttle run: the integrator of :mod:`core.runs.integrator` with one row.

    Parameters
    ----------
    model : DriveModel
        The car.
    shift_rpm : sequence of float, length g - 1
        Engine speed at which to leave each gear [rpm], at most the rev limit.
    start_speed_m_s : float
        0 for a standing start (the launch gear slips its clutch or converter), else a
        rolling start [m/s].
    start_gear : int, optional
        Gear to start in (1 = first); by default the lowest gear that can pull the start
        speed below its shift rpm (:func:`default_start_gear`).
    cover_distance_m : float
        The run continues at least this far from the start [m].
    cover_speed_m_s : float
        ... and until this speed, if the car can reach it [m/s].

    Returns
    -------
    RunResult
        A car that cannot reach its next shift goes on towards its drag-limited speed; one
        whose next gear cannot pull it ends early, and its trace stops there.

    Raises
    ------
    SimulationError
        When the car cannot move off, or the shift rpm list, start speed or start gear do
        not fit the gears.
    """
    shifts = checked_shift_rpm(
        model.curve, model.rev_limit_rpm, model.drivetrain.gear_count, shift_rpm
    )
    gear = _checked_start(model, shifts, start_speed_m_s, start_gear)
    trace = _Trace()
    start = RunStart(start_speed_m_s, gear - 1, cover_distance_m, cover_speed_m_s)
    ratio = model.drivetrain.overall_ratios[None, :]
    masses = (model.effective_mass_kg[None, :], np.array([model.decoupled_mass_kg]))
    ends = integrate_runs(model, ratio, masses, shifts, start, trace)
    if not ends.moved[0]:
        raise SimulationError(
            "The car cannot move off: road load and grade exceed the drive force at the start.",
            parameter="start_speed_m_s",
        )
    columns = [np.concatenate(c) for c in zip(*trace.parts, strict=True)]
    notes = _run_notices(model, shifts, ends, trace, start_speed_m_s)
    settled = float(ends.settled_m_s[0])
    return RunResult(
        time_s=columns[0],
        speed_m_s=columns[1],
        distance_m=columns[2],
        gear=np.concatenate(trace.gears),
        engine_rpm=columns[3],
        acceleration_m_s2=columns[4],
        traction_limited=np.concatenate(trace.limited),
        shifts=tuple(trace.shifts),
        shift_rpm=shifts,
        start_gear=gear,
        held_speed_m_s=settled if math.isfinite(settled) else None,
        held_by=ends.settled_by[0],
        notices=tuple(model.notices) + tuple(notes),
    )
