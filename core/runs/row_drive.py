"""The rows of a batch of runs in one gear: their net acceleration, and their approach to
a drag-limited speed.

:class:`RowCar` gives the net acceleration of any rows of a batch (one car, each row behind
its own overall ratios) at a (rows, points) grid of speeds, from one call of
:func:`core.choice.batch_drive.batch_drive`. Where a gear cannot reach its shift speed,
:func:`drag_limited_speed` finds where the acceleration falls to zero and :func:`approach`
integrates towards it (see :mod:`core.runs.integrator`).
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
from numpy.typing import NDArray
from scipy.optimize.elementwise import find_root

from core.choice.batch_drive import batch_drive
from core.runs.run_blocks import GearBlock

if TYPE_CHECKING:
    from core.runs.drive_model import DriveModel

__all__ = [
    "POINTS_PER_GEAR",
    "TAIL_END",
    "TAIL_POINTS",
    "RowCar",
    "approach",
    "drag_limited_speed",
]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]
IntArray = NDArray[np.int64]
POINTS_PER_GEAR = 121
TAIL_POINTS = 24
TAIL_END = 1e-6  # [-] relative distance to the drag-limited speed where the approach ends


@dataclass(frozen=True)
class RowCar:
    """The rows' gearing and masses."""

    model: DriveModel
    ratio: FloatArray  # (c, g) overall ratios
    mass: FloatArray  # (c, g) effective mass
    decoupled: FloatArray  # (c,) mass while the engine slips

    def net(
        self, g: int, rows: IntArray, speed: FloatArray, launching: bool
    ) -> tuple[FloatArray, FloatArray, BoolArray]:
        """Net acceleration [m/s^2], engine speed [rpm] and traction-limited flags."""
        model = self.model
        ratio = self.ratio[rows, g]
        force, engine, n_in = batch_drive(model, g, speed, ratio, launching)
        limited = force > model.traction_limit_n
        net = np.minimum(force, model.traction_limit_n, out=force)
        net -= model.vehicle.road_load.force_n(np.maximum(speed, 0.0))
        # the engine's inertia rides with the car only while it follows the wheels
        follows = n_in * (1.0 + 1e-6)
        follows += 1e-6
        slipping = engine > follows
        net /= np.where(slipping, self.decoupled[rows][:, None], self.mass[rows, g][:, None])
        # a shared (read-only) engine row is copied out; the caller may cut the rows
        rpm = engine if engine.flags.writeable else np.array(engine, dtype=np.float64)
        return net, rpm, limited


def drag_limited_speed(
    car: RowCar, g: int, rows: IntArray, lo: FloatArray, hi: FloatArray, launching: bool
) -> FloatArray:
    """Speed [m/s] in (lo, hi] where the net acceleration falls to zero, per row."""

    def accel(v: FloatArray, idx: FloatArray) -> FloatArray:
        flat = v.ravel()
        a = car.net(g, rows[idx.ravel().astype(np.int64)], flat[:, None], launching)[0]
        return a[:, 0].reshape(v.shape)

    found = find_root(
        accel,
        (lo, hi),
        args=(np.arange(rows.size, dtype=np.float64),),
        tolerances={"xatol": 1e-9, "xrtol": 1e-12},
    )
    return np.clip(np.asarray(found.x, dtype=np.float64), lo, hi)


def approach(
    car: RowCar,
    g: int,
    rows: IntArray,
    v_in: FloatArray,
    v_star: FloatArray,
    start: tuple[FloatArray, FloatArray],
    launching: bool,
) -> GearBlock:
    """Integrate rows from ``v_in`` towards their drag-limited speed ``v_star``, with
    ``POINTS_PER_GEAR + TAIL_POINTS`` points each."""
    span = v_star - v_in
    body = np.linspace(0.0, 1.0, POINTS_PER_GEAR, endpoint=False)
    last = 1.0 / POINTS_PER_GEAR  # relative distance to v* after the evenly spaced part
    tail = np.geomspace(last, TAIL_END * v_star / span, TAIL_POINTS + 1)
    rel = np.concatenate([np.broadcast_to(1.0 - body, (rows.size, body.size)), tail.T[:, 1:]], 1)
    d = rel * span[:, None]  # distance to v*, falling
    v = v_star[:, None] - d
    a, rpm, limited = car.net(g, rows, v, launching)
    q_inv = d / np.where(a > 0.0, a, np.nan)
    # product integration: int dv/(q d) with 1/q linear on each interval
    mean_inv = 0.5 * (q_inv[:, 1:] + q_inv[:, :-1])
    dt = mean_inv * np.log(d[:, :-1] / d[:, 1:])
    dx = v_star[:, None] * dt - mean_inv * (v[:, 1:] - v[:, :-1])
    t = np.zeros(v.shape)
    x = np.zeros(v.shape)
    np.cumsum(dt, axis=1, out=t[:, 1:])
    np.cumsum(dx, axis=1, out=x[:, 1:])
    t += start[0][:, None]
    x += start[1][:, None]
    return GearBlock(rows, g, t, v, x, rpm, a, limited)
