"""Speedometer and odometer error after a tire or axle change, and the recalibration it needs.

A speedometer counts the turns of a sensor shaft and converts them to speed with a
calibration fixed for the original tire and axle. With rolling radius ``r`` and the ratio
``N`` between the sensor shaft and the wheels, the sensor turns at ``v * N / r`` for a true
road speed ``v``; the instrument shows ``v_ind = (v * N / r) * (r0 / N0)``. So, in closed
form,

::

    true / indicated = (r1 / r0) * (N0 / N1)     sensor on the transmission output
    true / indicated = r1 / r0                   sensor at a wheel (N plays no part)

where 0 is the calibrated set-up and 1 the new one. For a transmission-output sensor ``N``
is the final drive ratio (times any reduction between the sensor and the wheels, e.g. a
transfer case behind it). The odometer counts the same turns, so distances share the ratio.

Recalibration (common practice): an electronic instrument set in pulses per distance needs
that setting multiplied by ``indicated / true``; a mechanical drive needs its driven-to-drive
teeth ratio multiplied by the same factor, usually by changing the driven gear (a larger tire
needs fewer driven teeth).
"""

from __future__ import annotations

import enum
import math
import operator
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.driveline.drivetrain import MAX_RATIO
from core.driveline.tires import MAX_DIAMETER_M, MIN_DIAMETER_M, Tire
from core.errors import DrivetrainError, TireSizeError, VehicleError

__all__ = [
    "DistanceReadings",
    "DrivenGearChange",
    "SpeedReadings",
    "SpeedometerCorrection",
    "SpeedometerDrive",
    "SpeedometerSetup",
    "driven_gear_change",
    "odometer_readings",
    "speed_readings",
    "speedometer_correction",
    "speedometer_setup",
]

MAX_DRIVEN_TEETH = 200

FloatArray = NDArray[np.float64]


class SpeedometerDrive(enum.Enum):
    """Where the speedometer takes its signal.

    ``TRANSMISSION_OUTPUT``: a sensor or cable drive on the transmission output shaft, so
    both the tire and the axle (final drive) ratio matter.
    ``WHEEL``: a wheel-speed sensor, so only the tire matters.
    """

    TRANSMISSION_OUTPUT = "transmission_output"
    WHEEL = "wheel"


@dataclass(frozen=True)
class SpeedometerSetup:
    """The tire and axle a speedometer sees.

    Attributes
    ----------
    rolling_radius_m : float
        Effective rolling radius of the tire [m].
    final_drive_ratio : float
        Ratio between the sensor shaft and the wheels [-] (the axle ratio for a
        transmission-output sensor).
    """

    rolling_radius_m: float
    final_drive_ratio: float


@dataclass(frozen=True)
class SpeedometerCorrection:
    """How a speedometer calibrated for one set-up reads on another.

    Attributes
    ----------
    drive : SpeedometerDrive
        Where the signal is taken.
    original, new : SpeedometerSetup
        The calibrated set-up and the changed one.
    true_per_indicated : float
        True speed / indicated speed [-]; also the factor a reading (or the instrument's
        speed per sensor pulse) must be multiplied by to be true.
    indicated_per_true : float
        Indicated speed / true speed [-], the reciprocal.
    reading_error_percent : float
        ``100 * (indicated - true) / true`` [%]; positive when the instrument reads high.
    pulses_per_distance_factor : float
        Factor for the instrument's pulses-per-distance setting, and for the driven-to-drive
        teeth ratio of a mechanical drive, that makes it read true [-]; equal to
        ``indicated_per_true``.
    """

    drive: SpeedometerDrive
    original: SpeedometerSetup
    new: SpeedometerSetup
    true_per_indicated: float
    indicated_per_true: float
    reading_error_percent: float
    pulses_per_distance_factor: float


@dataclass(frozen=True)
class SpeedReadings:
    """Indicated and true speeds side by side.

    Attributes
    ----------
    indicated_m_s : ndarray, shape (m,)
        Speed the instrument shows [m/s].
    true_m_s : ndarray, shape (m,)
        Road speed [m/s].
    error_m_s : ndarray, shape (m,)
        ``indicated_m_s - true_m_s`` [m/s]; positive when reading high.
    """

    indicated_m_s: FloatArray
    true_m_s: FloatArray
    error_m_s: FloatArray


@dataclass(frozen=True)
class DistanceReadings:
    """Indicated and true distances side by side.

    Attributes
    ----------
    indicated_m : ndarray, shape (m,)
        Distance the odometer shows [m].
    true_m : ndarray, shape (m,)
        Distance travelled [m].
    error_m : ndarray, shape (m,)
        ``indicated_m - true_m`` [m]; positive when the odometer over-reads.
    """

    indicated_m: FloatArray
    true_m: FloatArray
    error_m: FloatArray


@dataclass(frozen=True)
class DrivenGearChange:
    """The driven gear of a mechanical speedometer drive after a tire or axle change.

    Attributes
    ----------
    original_teeth : int
        Teeth of the driven gear fitted now.
    exact_teeth : float
        Teeth that would make the speedometer read true [-].
    nearest_teeth : int
        ``exact_teeth`` rounded to a whole gear, at least 1.
    residual_error_percent : float
        Reading error left with ``nearest_teeth``, ``100 * (indicated - true) / true`` [%].
    """

    original_teeth: int
    exact_teeth: float
    nearest_teeth: int
    residual_error_percent: float


def speedometer_setup(tire: Tire | float, final_drive_ratio: float = 1.0) -> SpeedometerSetup:
    """Validate one tire and axle combination.

    Parameters
    ----------
    tire : Tire or float
        The tire, or its effective rolling radius [m] (a diameter of 0.2 to 3 m).
    final_drive_ratio : float
        Ratio between the sensor shaft and the wheels [-], in (0, 50]; leave at 1 for a
        wheel sensor.

    Returns
    -------
    SpeedometerSetup

    Raises
    ------
    TireSizeError
        When the rolling radius is not finite or outside 0.1 to 1.5 m.
    DrivetrainError
        When the final drive ratio is not finite or outside (0, 50].

    Examples
    --------
    >>> speedometer_setup(0.33, 3.73)
    SpeedometerSetup(rolling_radius_m=0.33, final_drive_ratio=3.73)
    """
    radius = float(tire.rolling_radius_m if isinstance(tire, Tire) else tire)
    low, high = 0.5 * MIN_DIAMETER_M, 0.5 * MAX_DIAMETER_M
    if not math.isfinite(radius) or not low <= radius <= high:
        raise TireSizeError(
            f"`rolling_radius_m` must be between {low * 1e3:g} mm and {high * 1e3:g} mm, got "
            f"{radius * 1e3:.4g} mm",
            parameter="rolling_radius_m",
        )
    ratio = float(final_drive_ratio)
    if not math.isfinite(ratio) or ratio <= 0.0:
        raise DrivetrainError(
            f"`final_drive_ratio` must be finite and > 0, got {ratio}",
            parameter="final_drive_ratio",
        )
    if ratio > MAX_RATIO:
        raise DrivetrainError(
            f"`final_drive_ratio` must be <= {MAX_RATIO:g}, got {ratio}",
            parameter="final_drive_ratio",
        )
    return SpeedometerSetup(radius, ratio)


def speedometer_correction(
    original: SpeedometerSetup, new: SpeedometerSetup, *, drive: SpeedometerDrive
) -> SpeedometerCorrection:
    """How a speedometer calibrated for ``original`` reads on ``new``.

    Parameters
    ----------
    original : SpeedometerSetup
        The set-up the speedometer is calibrated for.
    new : SpeedometerSetup
        The set-up after the change.
    drive : SpeedometerDrive
        Where the signal is taken; with ``WHEEL`` the final drive ratios play no part.

    Returns
    -------
    SpeedometerCorrection

    Examples
    --------
    >>> c = speedometer_correction(speedometer_setup(0.30, 3.5), speedometer_setup(0.33, 3.5),
    ...                            drive=SpeedometerDrive.TRANSMISSION_OUTPUT)
    >>> round(c.true_per_indicated, 6), round(c.reading_error_percent, 4)
    (1.1, -9.0909)
    """
    ratio = new.rolling_radius_m / original.rolling_radius_m
    if drive is SpeedometerDrive.TRANSMISSION_OUTPUT:
        ratio *= original.final_drive_ratio / new.final_drive_ratio
    inverse = 1.0 / ratio
    return SpeedometerCorrection(
        drive=drive,
        original=original,
        new=new,
        true_per_indicated=ratio,
        indicated_per_true=inverse,
        reading_error_percent=100.0 * (inverse - 1.0),
        pulses_per_distance_factor=inverse,
    )


def _checked_amounts(values: ArrayLike, name: str) -> FloatArray:
    arr = np.atleast_1d(np.asarray(values, dtype=np.float64))
    if arr.ndim != 1:
        raise VehicleError(
            f"`{name}` must be one-dimensional, got {arr.ndim} dimensions", parameter=name
        )
    bad = np.flatnonzero(~np.isfinite(arr) | (arr < 0.0))
    if bad.size:
        i = int(bad[0])
        raise VehicleError(
            f"`{name}[{i}]` must be finite and >= 0, got {arr[i]}", parameter=f"{name}[{i}]"
        )
    return arr


def speed_readings(
    correction: SpeedometerCorrection, indicated_speed_m_s: ArrayLike
) -> SpeedReadings:
    """True road speed at given indicated speeds.

    Parameters
    ----------
    correction : SpeedometerCorrection
        From :func:`speedometer_correction`.
    indicated_speed_m_s : float or array_like, shape (m,)
        Speeds the instrument shows [m/s], finite and >= 0.

    Returns
    -------
    SpeedReadings
        Arrays of shape (m,), (1,) for a float; ``true = indicated * true_per_indicated``.

    Raises
    ------
    VehicleError
        When a speed is negative or not finite, or the input is not one-dimensional.
    """
    indicated = _checked_amounts(indicated_speed_m_s, "indicated_speed_m_s")
    true = indicated * correction.true_per_indicated
    return SpeedReadings(indicated, true, indicated - true)


def odometer_readings(
    correction: SpeedometerCorrection, indicated_distance_m: ArrayLike
) -> DistanceReadings:
    """Distance travelled over given indicated distances.

    Parameters
    ----------
    correction : SpeedometerCorrection
        From :func:`speedometer_correction`; the odometer counts the same sensor turns.
    indicated_distance_m : float or array_like, shape (m,)
        Distances the odometer shows [m], finite and >= 0.

    Returns
    -------
    DistanceReadings
        Arrays of shape (m,), (1,) for a float; ``true = indicated * true_per_indicated``.

    Raises
    ------
    VehicleError
        When a distance is negative or not finite, or the input is not one-dimensional.
    """
    indicated = _checked_amounts(indicated_distance_m, "indicated_distance_m")
    true = indicated * correction.true_per_indicated
    return DistanceReadings(indicated, true, indicated - true)


def driven_gear_change(correction: SpeedometerCorrection, driven_teeth: int) -> DrivenGearChange:
    """The driven gear a mechanical speedometer drive needs to read true again.

    The drive gear on the output shaft is kept; the cable turns at drive / driven teeth of
    the shaft (common practice, see the gear-teeth rule), so the driven teeth scale by
    ``indicated_per_true``.

    Parameters
    ----------
    correction : SpeedometerCorrection
        From :func:`speedometer_correction`.
    driven_teeth : int
        Teeth of the driven gear now fitted, 1 to 200.

    Returns
    -------
    DrivenGearChange

    Raises
    ------
    DrivetrainError
        When the tooth count is not a whole number from 1 to 200.

    Examples
    --------
    >>> c = speedometer_correction(speedometer_setup(0.3302), speedometer_setup(0.3556),
    ...                            drive=SpeedometerDrive.WHEEL)
    >>> g = driven_gear_change(c, 18)
    >>> round(g.exact_teeth, 4), g.nearest_teeth, round(g.residual_error_percent, 3)
    (16.7143, 17, -1.681)
    """
    try:
        teeth = operator.index(driven_teeth)
    except TypeError:
        raise DrivetrainError(
            f"`driven_teeth` must be a whole number, got {driven_teeth!r}",
            parameter="driven_teeth",
        ) from None
    if not 1 <= teeth <= MAX_DRIVEN_TEETH:
        raise DrivetrainError(
            f"`driven_teeth` must be between 1 and {MAX_DRIVEN_TEETH}, got {teeth}",
            parameter="driven_teeth",
        )
    exact = teeth * correction.indicated_per_true
    nearest = max(1, round(exact))
    residual = correction.indicated_per_true * teeth / nearest
    return DrivenGearChange(teeth, exact, nearest, 100.0 * (residual - 1.0))
