"""Chassis-dyno conversions: wheel figures to engine estimates and back, and a curve measured
in one gear re-expressed for the others.

The model (common practice; Gillespie, Fundamentals of Vehicle Dynamics, ch. 2): at one
engine speed the wheels get the engine's power less the driveline's losses,

    P_wheel(n) = eta * P_engine(n),        so    P_engine(n) = P_wheel(n) / eta,

with ``eta`` the driveline efficiency in the gear of the run. A chassis dyno reports wheel
power against engine rpm, and often a "wheel torque" that is that power over the engine's
angular speed (torque referred to the engine); both scale by ``eta`` alike. A loss stated
in per cent is a share of engine power: ``eta = 1 - loss / 100`` (a loss quoted as a share
of wheel power would give ``1 / (1 + loss / 100)``; that convention is not used here).

Per gear: if gear j loses a different share than gear k (a direct-drive gear often loses
least), the curve measured in gear k maps to gear j at the same engine rpm by

    P_wheel,j(n) = eta_j * P_engine(n) = P_wheel,k(n) * eta_j / eta_k.

Wheel power referred to engine rpm does not depend on the gear's ratio, so with equal
efficiencies the curve is the same in every gear.
"""

from __future__ import annotations

import enum
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_range
from core.driveline.drivetrain import MAX_GEARS
from core.engine.curves import RPM_TO_RAD_S
from core.errors import CurveError, DrivetrainError
from core.notices import Notice

__all__ = [
    "MAX_LOSS_PERCENT",
    "MIN_EFFICIENCY",
    "ChassisConversion",
    "MeasuredAt",
    "chassis_conversion",
    "efficiency_from_loss",
    "engine_from_wheel",
    "wheel_from_engine",
]

FloatArray = NDArray[np.float64]

MIN_EFFICIENCY = 0.4
MAX_LOSS_PERCENT = 100.0 * (1.0 - MIN_EFFICIENCY)
MAX_POINTS = 2000


class MeasuredAt(enum.Enum):
    """Where a curve was measured."""

    WHEELS = "wheels"
    ENGINE = "engine"


def efficiency_from_loss(loss_percent: float) -> float:
    """Driveline efficiency from a loss in per cent of engine power.

    Parameters
    ----------
    loss_percent : float
        Driveline loss [%], 0 to 60.

    Returns
    -------
    float
        ``1 - loss_percent / 100`` [-].

    Examples
    --------
    >>> efficiency_from_loss(15.0)
    0.85
    """
    if not (math.isfinite(loss_percent) and 0.0 <= loss_percent <= MAX_LOSS_PERCENT):
        raise DrivetrainError(
            f"`loss_percent` must lie in [0, {MAX_LOSS_PERCENT:g}], got {loss_percent}",
            parameter="loss_percent",
        )
    return round(1.0 - loss_percent / 100.0, 12)


def engine_from_wheel(wheel: ArrayLike, efficiency: float) -> FloatArray:
    """Engine figure estimated from a wheel figure (power, or torque referred to the engine).

    Examples
    --------
    >>> engine_from_wheel([170.0], 0.85).round(9).tolist()
    [200.0]
    """
    eta = require_range(efficiency, "efficiency", MIN_EFFICIENCY, 1.0, DrivetrainError)
    return np.asarray(wheel, dtype=np.float64) / eta


def wheel_from_engine(engine: ArrayLike, efficiency: float) -> FloatArray:
    """Wheel figure from an engine figure: ``engine * efficiency``.

    Examples
    --------
    >>> wheel_from_engine([200.0], 0.85).round(9).tolist()
    [170.0]
    """
    eta = require_range(efficiency, "efficiency", MIN_EFFICIENCY, 1.0, DrivetrainError)
    return np.asarray(engine, dtype=np.float64) * eta


@dataclass(frozen=True)
class ChassisConversion:
    """A curve at the engine and at the wheels, and per gear when gears differ.

    Attributes
    ----------
    rpm : ndarray, shape (n,)
        Engine speed [rpm].
    measured_at : MeasuredAt
        Where the input curve was measured.
    efficiency : float
        Driveline efficiency of the measured gear (or the only one) [-].
    engine_power_w, wheel_power_w : ndarray, shape (n,)
        Power at the engine and at the wheels [W].
    engine_torque_nm, wheel_torque_nm : ndarray, shape (n,)
        Torque at the engine, and wheel power over engine angular speed [N*m].
    measured_gear : int or None
        Gear of the run (1 = first) when per-gear efficiencies are given.
    gear_efficiency : ndarray, shape (g,) or None
        Efficiency of each gear.
    wheel_power_by_gear_w : ndarray, shape (g, n) or None
        Wheel power in each gear at the same rpm [W].
    notices : tuple of Notice
    fixed_loss_w : float
        Fixed part of the driveline loss [W]; 0 for a loss by efficiency alone.
    """

    rpm: FloatArray
    measured_at: MeasuredAt
    efficiency: float
    engine_power_w: FloatArray
    wheel_power_w: FloatArray
    engine_torque_nm: FloatArray
    wheel_torque_nm: FloatArray
    measured_gear: int | None
    gear_efficiency: FloatArray | None
    wheel_power_by_gear_w: FloatArray | None
    notices: tuple[Notice, ...]
    fixed_loss_w: float = 0.0


def _curve(
    rpm: ArrayLike, torque_nm: ArrayLike | None, power_w: ArrayLike | None
) -> tuple[FloatArray, FloatArray]:
    """Validated rpm and power [W]."""
    n = np.asarray(rpm, dtype=np.float64)
    if n.ndim != 1 or not 1 <= n.size <= MAX_POINTS:
        raise CurveError(
            f"`rpm` must hold 1 to {MAX_POINTS} values, got {n.size}", parameter="rpm"
        )
    for i, x in enumerate(n.tolist()):
        if not (math.isfinite(x) and 1.0 <= x <= 30_000.0):
            raise CurveError(f"`rpm[{i}]` must lie in [1, 30000], got {x}", parameter=f"rpm[{i}]")
        if i and x <= n[i - 1]:
            raise CurveError(
                f"`rpm` must be strictly increasing: rpm[{i}] = {x:g} follows "
                f"rpm[{i - 1}] = {n[i - 1]:g}",
                parameter=f"rpm[{i}]",
            )
    if (torque_nm is None) == (power_w is None):
        raise CurveError("give exactly one of `torque_nm` or `power_w`", parameter="torque_nm")
    name = "torque_nm" if torque_nm is not None else "power_w"
    values = np.asarray(torque_nm if torque_nm is not None else power_w, dtype=np.float64)
    if values.shape != n.shape:
        raise CurveError(
            f"`{name}` must hold one value per rpm ({n.size}), got {values.size}", parameter=name
        )
    for i, x in enumerate(values.tolist()):
        if not (math.isfinite(x) and x >= 0.0):
            raise CurveError(
                f"`{name}[{i}]` must be finite and >= 0, got {x}", parameter=f"{name}[{i}]"
            )
    power = values * n * RPM_TO_RAD_S if torque_nm is not None else values
    return n, power


def _checked_efficiencies(
    efficiency: float | Sequence[float], measured_gear: int | None, fixed_loss_w: float
) -> tuple[float, FloatArray | None]:
    """The efficiency of the measured gear [-] and, given per gear, every gear's; with the
    fixed loss [W] checked against them."""
    if not (math.isfinite(fixed_loss_w) and 0.0 <= fixed_loss_w <= 500e3):
        raise DrivetrainError(
            f"`fixed_loss_w` must lie in [0, 500000], got {fixed_loss_w:g}",
            parameter="fixed_loss_w",
        )
    if fixed_loss_w > 0.0 and not isinstance(efficiency, (int, float)):
        raise DrivetrainError(
            "`fixed_loss_w` goes with a single efficiency, not per-gear ones",
            parameter="fixed_loss_w",
        )
    per_gear = None
    if isinstance(efficiency, (int, float)):
        if measured_gear is not None:
            raise DrivetrainError(
                "`measured_gear` goes with, and only with, per-gear efficiencies",
                parameter="measured_gear",
            )
        eta = require_range(float(efficiency), "efficiency", MIN_EFFICIENCY, 1.0, DrivetrainError)
    else:
        per_gear = np.array(
            [
                require_range(float(e), f"efficiency[{i}]", MIN_EFFICIENCY, 1.0, DrivetrainError)
                for i, e in enumerate(efficiency)
            ]
        )
        if not 1 <= per_gear.size <= MAX_GEARS:
            raise DrivetrainError(
                f"`efficiency` must give 1 to {MAX_GEARS} gears, got {per_gear.size}",
                parameter="efficiency",
            )
        if measured_gear is None or not 1 <= measured_gear <= per_gear.size:
            raise DrivetrainError(
                f"`measured_gear` must name a gear 1 to {per_gear.size}, got {measured_gear}",
                parameter="measured_gear",
            )
        eta = float(per_gear[measured_gear - 1])
    return eta, per_gear


def chassis_conversion(
    rpm: ArrayLike,
    *,
    measured_at: MeasuredAt,
    efficiency: float | Sequence[float],
    torque_nm: ArrayLike | None = None,
    power_w: ArrayLike | None = None,
    measured_gear: int | None = None,
    fixed_loss_w: float = 0.0,
) -> ChassisConversion:
    """Convert a curve between wheels and engine, and re-express it for every gear.

    With a fixed loss the driveline takes a fixed part plus a share of the engine's power,
    ``wheel = engine * efficiency - fixed`` (the common chassis-dyno convention, common
    practice), so ``engine = (wheel + fixed) / efficiency``.

    Parameters
    ----------
    rpm : array_like, shape (n,)
        Engine speed [rpm], 1 to 30000, strictly increasing, 1 to 2000 points.
    measured_at : MeasuredAt
        Where the curve was measured.
    efficiency : float or sequence of float
        Driveline efficiency, 0.4 to 1: one value, or one per gear (then
        ``measured_gear`` names the gear of the run).
    torque_nm, power_w : array_like, shape (n,), optional
        The curve as torque [N*m] (at the wheels: referred to engine rpm) or power [W];
        exactly one.
    measured_gear : int, optional
        Gear of the run (1 = first), with and only with per-gear efficiencies.
    fixed_loss_w : float, optional
        Fixed part of the loss [W], 0 to 500 kW, with a single efficiency only.

    Returns
    -------
    ChassisConversion

    Raises
    ------
    CurveError
        On a bad curve.
    DrivetrainError
        On a bad efficiency or gear.

    Examples
    --------
    >>> c = chassis_conversion([6000.0], measured_at=MeasuredAt.WHEELS, efficiency=0.85,
    ...                        power_w=[170e3])
    >>> round(float(c.engine_power_w[0]))
    200000
    """
    n, power = _curve(rpm, torque_nm, power_w)
    eta, per_gear = _checked_efficiencies(efficiency, measured_gear, fixed_loss_w)
    notes: list[Notice] = []
    if measured_at is MeasuredAt.WHEELS:
        wheel, engine = power, engine_from_wheel(power + fixed_loss_w, eta)
    else:
        engine, wheel = power, wheel_from_engine(power, eta) - fixed_loss_w
        if np.any(wheel < 0.0):
            notes.append(
                Notice(
                    "fixed_loss_exceeds_power",
                    "The fixed loss exceeds the engine's power at some rpm; the wheel power "
                    "there is taken as 0.",
                    "fixed_loss_w",
                )
            )
            wheel = np.maximum(wheel, 0.0)
    omega = n * RPM_TO_RAD_S
    by_gear = None
    if per_gear is not None:
        by_gear = wheel[None, :] * (per_gear / eta)[:, None]
        if np.all(per_gear == per_gear[0]):
            notes.append(
                Notice(
                    "equal_efficiencies",
                    "Every gear has the same efficiency, so the wheel curve (power against "
                    "engine rpm) is the same in every gear: the ratio does not change it.",
                    "efficiency",
                )
            )
    model = f"engine x {eta:.3g}" + (" - the fixed loss" if fixed_loss_w > 0.0 else "")
    notes.append(
        Notice(
            "estimate",
            f"Estimate: wheel = {model} at the same rpm. Real losses vary with "
            "gear, speed, temperature, tires and the dyno itself.",
            "efficiency",
        )
    )
    return ChassisConversion(
        rpm=n,
        measured_at=measured_at,
        efficiency=eta,
        engine_power_w=engine,
        wheel_power_w=wheel,
        engine_torque_nm=engine / omega,
        wheel_torque_nm=wheel / omega,
        measured_gear=measured_gear,
        gear_efficiency=per_gear,
        wheel_power_by_gear_w=by_gear,
        notices=tuple(notes),
        fixed_loss_w=float(fixed_loss_w),
    )
