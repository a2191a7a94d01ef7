"""Per-gear kinematics and the wheel-force table of each gear."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.converter.drive import ConverterDrive, converter_input
from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S, TorqueCurve
from core.errors import CurveError

__all__ = [
    "MAX_TABLE_ROWS",
    "GearTable",
    "engine_rpm_at_speed",
    "gear_tables",
    "road_speed_m_s",
    "rpm_grid",
]

MAX_TABLE_ROWS = 2000

FloatArray = NDArray[np.float64]


def road_speed_m_s(rpm: ArrayLike, overall_ratio: float, rolling_radius_m: float) -> FloatArray:
    """Road speed at an engine speed with no slip in the driveline.

    Parameters
    ----------
    rpm : array_like, shape (n,)
        Engine speed [rpm].
    overall_ratio : float
        Engine revolutions per wheel revolution.
    rolling_radius_m : float
        Tire rolling radius [m].

    Returns
    -------
    ndarray, shape (n,)
        Road speed [m/s] = (2*pi/60) * rpm * r / N (Gillespie, ch. 2).

    Examples
    --------
    >>> float(road_speed_m_s(6000.0, 3.0, 0.3302)) / 0.44704
    154.6996...
    """
    return np.asarray(rpm, dtype=np.float64) * RPM_TO_RAD_S * rolling_radius_m / overall_ratio


def engine_rpm_at_speed(
    speed_m_s: ArrayLike, overall_ratio: float, rolling_radius_m: float
) -> FloatArray:
    """Engine speed [rpm] at a road speed [m/s] with no slip; the inverse of road_speed_m_s.

    Parameters
    ----------
    speed_m_s : array_like, shape (n,)
        Road speed [m/s].
    overall_ratio : float
        Engine revolutions per wheel revolution.
    rolling_radius_m : float
        Tire rolling radius [m].

    Returns
    -------
    ndarray, shape (n,)
        Engine speed [rpm].
    """
    v = np.asarray(speed_m_s, dtype=np.float64)
    return v * overall_ratio / (rolling_radius_m * RPM_TO_RAD_S)


@dataclass(frozen=True)
class GearTable:
    """One gear's ratio, reach and force table over engine speed.

    Attributes
    ----------
    gear : int
        Gear number, 1 for first.
    overall_ratio : float
        Gear ratio * final drive * extra reduction.
    efficiency : float
        Driveline efficiency applied in this gear (1 for a chassis curve).
    max_speed_m_s : float
        Road speed at the rev limit [m/s].
    rpm : ndarray, shape (n,)
        Engine speed [rpm].
    speed_m_s : ndarray, shape (n,)
        Road speed [m/s].
    engine_torque_nm : ndarray, shape (n,)
        Torque of the curve [N*m].
    engine_power_w : ndarray, shape (n,)
        Power of the curve [W].
    wheel_torque_nm : ndarray, shape (n,)
        Torque at the driven wheels [N*m].
    tractive_force_n : ndarray, shape (n,)
        Force at the tire contact patch [N].
    wheel_power_w : ndarray, shape (n,)
        Power delivered at the wheels [W].
    engine_rpm : ndarray, shape (n,), or None
        With a torque converter: engine speed at each row, whose ``rpm`` is then the
        gearbox input (turbine) speed [rpm]; None without one.
    torque_ratio : ndarray, shape (n,), or None
        With a torque converter: its torque ratio at the speed ratio it runs at [-].
    """

    gear: int
    overall_ratio: float
    efficiency: float
    max_speed_m_s: float
    rpm: FloatArray
    speed_m_s: FloatArray
    engine_torque_nm: FloatArray
    engine_power_w: FloatArray
    wheel_torque_nm: FloatArray
    tractive_force_n: FloatArray
    wheel_power_w: FloatArray
    engine_rpm: FloatArray | None = None
    torque_ratio: FloatArray | None = None


def rpm_grid(curve: TorqueCurve, rev_limit_rpm: float, rpm_step: float | None) -> FloatArray:
    """Engine speeds for the gear tables, from the curve's start to the rev limit.

    Parameters
    ----------
    curve : TorqueCurve
        The curve; its own points are used when ``rpm_step`` is None.
    rev_limit_rpm : float
        Highest engine speed [rpm], inside the curve's range; always the last row.
    rpm_step : float or None
        Row spacing [rpm], or None for the curve's own points.

    Returns
    -------
    ndarray, shape (n,)
        Strictly increasing engine speeds [rpm], at most 2000.

    Raises
    ------
    CurveError
        When the step is not positive or gives more than 2000 rows.
    """
    start = curve.rpm_min
    if rpm_step is None:
        inner = curve.rpm[curve.rpm < rev_limit_rpm]
    else:
        if not math.isfinite(rpm_step) or rpm_step <= 0.0:
            raise CurveError(f"`rpm_step` must be > 0, got {rpm_step}", parameter="rpm_step")
        rows = math.floor((rev_limit_rpm - start) / rpm_step) + 2
        if rows > MAX_TABLE_ROWS:
            raise CurveError(
                f"`rpm_step` of {rpm_step:g} rpm gives {rows} rows; at most {MAX_TABLE_ROWS}",
                parameter="rpm_step",
            )
        inner = start + rpm_step * np.arange(rows, dtype=np.float64)
        inner = inner[inner < rev_limit_rpm * (1.0 - 1e-12)]
    return np.append(inner, rev_limit_rpm)


def gear_tables(
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    rpm: FloatArray,
    efficiency: FloatArray,
    converter: ConverterDrive | None = None,
) -> tuple[GearTable, ...]:
    """Force tables for every gear on one engine-speed grid, computed together.

    With a torque converter the rows are gearbox input (turbine) speeds and the wheel
    columns count the converter's torque ratio at the speed ratio it runs at
    (:func:`core.converter.drive.converter_input`).

    Parameters
    ----------
    curve : TorqueCurve
        Engine (or chassis, referred to engine rpm) torque curve.
    drivetrain : Drivetrain
        Ratios of every gear.
    tire : Tire
        Rolling radius of the driven tires.
    rpm : ndarray, shape (n,)
        Engine speeds of the rows [rpm]; the last is the rev limit.
    efficiency : ndarray, shape (g,)
        Driveline efficiency applied per gear (ones for a chassis curve).
    converter : ConverterDrive, optional
        The torque converter and its lock-up gears, if the drivetrain has one.

    Returns
    -------
    tuple of GearTable, length g
    """
    ratios = drivetrain.overall_ratios
    r = tire.rolling_radius_m
    if converter is not None:
        return _converter_tables(curve, ratios, r, rpm, efficiency, converter)
    torque = curve.torque_at(rpm)
    power = torque * rpm * RPM_TO_RAD_S
    # every gear's rows at once: one array per quantity, a row of it per gear
    wheel_torque = np.outer(ratios * efficiency, torque)
    force = wheel_torque / r
    speed = np.outer(1.0 / ratios, rpm * RPM_TO_RAD_S * r)
    wheel_power = np.outer(efficiency, power)
    return tuple(
        GearTable(
            gear=i + 1,
            overall_ratio=g,
            efficiency=e,
            max_speed_m_s=top,
            rpm=rpm,
            speed_m_s=speed[i],
            engine_torque_nm=torque,
            engine_power_w=power,
            wheel_torque_nm=wheel_torque[i],
            tractive_force_n=force[i],
            wheel_power_w=wheel_power[i],
        )
        for i, (g, e, top) in enumerate(
            zip(ratios.tolist(), efficiency.tolist(), speed[:, -1].tolist(), strict=True)
        )
    )


def _converter_tables(
    curve: TorqueCurve,
    ratios: FloatArray,
    r: float,
    rpm: FloatArray,
    efficiency: FloatArray,
    converter: ConverterDrive,
) -> tuple[GearTable, ...]:
    torque = curve.torque_at(rpm)
    power = torque * rpm * RPM_TO_RAD_S
    tables = []
    for i in range(ratios.size):
        inp = converter_input(converter, curve, float(rpm[-1]), i, rpm)
        speed = rpm * RPM_TO_RAD_S * r / ratios[i]
        wheel_torque = inp.torque_nm * ratios[i] * efficiency[i]
        tables.append(
            GearTable(
                gear=i + 1,
                overall_ratio=float(ratios[i]),
                efficiency=float(efficiency[i]),
                max_speed_m_s=float(speed[-1]),
                rpm=rpm,
                speed_m_s=speed,
                engine_torque_nm=torque,
                engine_power_w=power,
                wheel_torque_nm=wheel_torque,
                tractive_force_n=wheel_torque / r,
                wheel_power_w=wheel_torque / r * speed,
                engine_rpm=inp.engine_rpm,
                torque_ratio=inp.torque_ratio,
            )
        )
    return tuple(tables)
