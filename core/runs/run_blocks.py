"""What the run integrator takes and hands on: where runs start, each gear's and each
shift's block of trace points for its sinks, and how each run ended.

:func:`core.runs.integrator.integrate_runs` hands its results to a :class:`RunSink` block by
block: :func:`core.runs.simulate.simulate_run` keeps them as a trace (a batch of one), and
:func:`core.runs.batch.batch_runs` reads them as strip timers.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Protocol

import numpy as np
from numpy.typing import NDArray

__all__ = ["GearBlock", "RunEnds", "RunSink", "RunStart", "ShiftBlock"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]


@dataclass(frozen=True)
class GearBlock:
    """Trace points of some rows in one gear, each row non-decreasing in time and distance.

    Attributes
    ----------
    rows : ndarray of int, shape (r,)
        The runs the block belongs to.
    gear : int
        Gear index, 0 for first.
    time_s, speed_m_s, distance_m, engine_rpm, acceleration_m_s2 : ndarray, shape (r, n)
        [s, m/s, m, rpm, m/s^2]; a row shorter than n repeats its last point.
    traction_limited : ndarray of bool, shape (r, n)
        Where the tires, not the engine, capped the drive.
    """

    rows: IntArray
    gear: int
    time_s: FloatArray
    speed_m_s: FloatArray
    distance_m: FloatArray
    engine_rpm: FloatArray
    acceleration_m_s2: FloatArray
    traction_limited: BoolArray


@dataclass(frozen=True)
class ShiftBlock:
    """One upshift of some rows: no drive, slowing at the road-load deceleration.

    Attributes
    ----------
    rows : ndarray of int, shape (r,)
        The runs shifting.
    gear : int
        Index of the gear being left.
    time_s, speed_m_s, distance_m, rpm_before : ndarray, shape (r,)
        As the shift begins [s, m/s, m, rpm].
    end_time_s, end_speed_m_s, end_distance_m, rpm_after : ndarray, shape (r,)
        Once the next gear takes up the drive [s, m/s, m, rpm].
    deceleration_m_s2 : ndarray, shape (r,)
        Road-load deceleration through the shift [m/s^2], >= 0.
    """

    rows: IntArray
    gear: int
    time_s: FloatArray
    speed_m_s: FloatArray
    distance_m: FloatArray
    rpm_before: FloatArray
    end_time_s: FloatArray
    end_speed_m_s: FloatArray
    end_distance_m: FloatArray
    rpm_after: FloatArray
    deceleration_m_s2: FloatArray


class RunSink(Protocol):
    """What receives the integrator's blocks, in time order per row."""

    def gear(self, block: GearBlock) -> None:
        """Points driven in one gear, or held at the speed the run settled at."""

    def shift(self, block: ShiftBlock) -> None:
        """An upshift."""


@dataclass(frozen=True)
class RunStart:
    """Where the runs begin and how far they must go.

    Attributes
    ----------
    speed_m_s : float
        Start speed [m/s]; 0 for a standing start (the launch gear slips its clutch or
        converter).
    gear : int
        Start gear index, 0 for first.
    cover_distance_m : float
        Each run goes on at least this far from the start [m] ...
    cover_speed_m_s : float
        ... and until this speed, if the car can reach it [m/s].
    """

    speed_m_s: float
    gear: int
    cover_distance_m: float
    cover_speed_m_s: float


@dataclass(frozen=True)
class RunEnds:
    """How each run ended.

    Attributes
    ----------
    moved : ndarray of bool, shape (c,)
        False where the car cannot accelerate at the start speed (no trace follows).
    settled_m_s : ndarray, shape (c,)
        The speed the run approaches (the drag-limited speed of its gear) or is held at
        (the rev limit in top gear, or the integration ceiling) [m/s]; NaN where it did
        neither before covering what was asked.
    settled_by : tuple of str or None, length c
        ``"drag"`` or ``"rev_limit"`` where it settled.
    stalled_gear : ndarray of int, shape (c,)
        Index of a gear that could not accelerate the car when entered after a shift (the
        run ends there, and distances past it are not reached); -1 where none.
    left_at_once : ndarray of bool, shape (c, g)
        Gears entered above their own shift speed, and so left at once.
    """

    moved: BoolArray
    settled_m_s: FloatArray
    settled_by: tuple[str | None, ...]
    stalled_gear: IntArray
    left_at_once: BoolArray
