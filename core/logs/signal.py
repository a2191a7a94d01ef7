"""Signals of a logged pass: smoothing, acceleration, the gear engaged, and shift dips.

Smoothing and differentiation
    ``scipy.signal.savgol_filter`` (Savitzky-Golay: a least-squares quadratic over a sliding
    window) with a window given in seconds, turned into an odd number of samples of at least
    5 (:func:`window_points`). Where acceleration is not logged it is the filter's first
    derivative of road speed; a logged acceleration is smoothed with the same window. A
    symmetric window keeps a step where it is: a sudden drop of acceleration still crosses
    half its depth at the instant it happened, so shift times read off the smoothed signal
    are not delayed.

Gear from engine speed
    In gear g without slip, ``rpm = v * N_g / (r * 2*pi/60)`` (Gillespie ch. 2), so every
    moving sample implies an overall ratio ``N = rpm * r * (2*pi/60) / v``. A sample is in
    the gear whose ratio is nearest in ``ln N`` if within the match tolerance (5 %, or 40 %
    of the narrowest log step between adjacent gears if that is smaller); else it is
    unmatched (clutch or converter slipping, a shift in progress, wheelspin). The median
    ratio of logged to implied rpm over the matched samples is the speed calibration (tire
    growth, a speed channel that reads off); samples are matched a second time with it
    divided out. A run of one gear shorter than ``MIN_DWELL_S`` is unmatched (noise cannot
    flip the gear), and two runs of the same gear separated by less than ``MERGE_GAP_S`` of
    unmatched samples are one segment (hysteresis).

Shifts from acceleration alone
    Without engine speed a shift is a dip of the smoothed acceleration below
    ``DIP_FRACTION`` of its running median over ``BASELINE_WINDOW_S``, lasting
    ``MIN_DIP_S`` to ``MAX_DIP_S``; the shift starts and ends where the acceleration
    crosses half-way between the running median and the dip's lowest value.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray
from scipy.ndimage import median_filter
from scipy.signal import savgol_filter

from core.engine.curves import RPM_TO_RAD_S

__all__ = [
    "BASELINE_WINDOW_S",
    "DIP_FRACTION",
    "MAX_DIP_S",
    "MERGE_GAP_S",
    "MIN_DIP_S",
    "MIN_DWELL_S",
    "MOVING_SPEED_M_S",
    "Dip",
    "GearMatch",
    "SampleSegment",
    "acceleration_dips",
    "gear_segments",
    "match_gears",
    "smoothed",
    "window_points",
]

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]

MOVING_SPEED_M_S = 2.0  # [m/s]; slower samples are not matched to a gear
MIN_MATCH_RPM = 400.0  # [rpm]; lower readings are not matched to a gear
MAX_MATCH_TOLERANCE = 0.05  # ln-ratio tolerance, about 5 %
MATCH_STEP_SHARE = 0.4  # ... or this share of the narrowest ln step between adjacent gears
MIN_DWELL_S = 0.3  # [s] shortest run that counts as a gear
MERGE_GAP_S = 0.5  # [s] unmatched stretches this short inside one gear are bridged
BASELINE_WINDOW_S = 2.0  # [s] running median the acceleration dips are measured against
DIP_FRACTION = 0.4
MIN_DIP_S = 0.08  # [s]
MAX_DIP_S = 2.0  # [s]
MIN_BASELINE_M_S2 = 0.3  # [m/s^2]; weaker pulls are not searched for dips
_MIN_CALIBRATION_SAMPLES = 10


def window_points(window_s: float, interval_s: float, samples: int) -> int:
    """Odd filter length in samples for a window in seconds, at least 5, at most the data.

    Examples
    --------
    >>> window_points(0.3, 0.04, 500), window_points(0.3, 0.01, 500), window_points(1.0, 0.1, 6)
    (9, 31, 5)
    """
    points = round(window_s / interval_s)
    points = max(points | 1, 5)
    largest = samples if samples % 2 else samples - 1
    return min(points, max(largest, 3))


def smoothed(
    values: FloatArray, interval_s: float, window_s: float, *, derivative: bool = False
) -> FloatArray:
    """Savitzky-Golay quadratic smoothing, or its first derivative, over a window in seconds.

    Parameters
    ----------
    values : ndarray, shape (n,)
        Evenly sampled signal.
    interval_s : float
        Sample spacing [s].
    window_s : float
        Filter window [s].
    derivative : bool
        Return the time derivative [unit/s] instead of the smoothed signal.

    Returns
    -------
    ndarray, shape (n,)
    """
    points = window_points(window_s, interval_s, values.size)
    order = min(2, points - 1)
    out = savgol_filter(
        values, points, order, deriv=1 if derivative else 0, delta=interval_s, mode="interp"
    )
    return np.asarray(out, dtype=np.float64)


@dataclass(frozen=True)
class GearMatch:
    """The gear engaged at each sample, from the ratio of engine to road speed.

    Attributes
    ----------
    gear : ndarray of int, shape (n,)
        Gear number (1 = first) per sample, 0 where no gear matches.
    log_ratio : ndarray, shape (n,)
        ``ln`` of the implied overall ratio with the calibration divided out; NaN where the
        car is slower than ``MOVING_SPEED_M_S`` or the rpm reads below 400.
    calibration : float
        Median of logged rpm over the rpm implied by speed and matched gear (1 when fewer
        than 10 samples matched).
    tolerance : float
        ``ln``-ratio tolerance used.
    """

    gear: IntArray
    log_ratio: FloatArray
    calibration: float
    tolerance: float


def _nearest(log_ratio: FloatArray, log_gears: FloatArray, tol: float) -> IntArray:
    diff = np.abs(log_ratio[:, None] - log_gears[None, :])
    diff = np.where(np.isnan(diff), np.inf, diff)
    best = np.argmin(diff, axis=1)
    ok = diff[np.arange(diff.shape[0]), best] <= tol
    return np.where(ok, best + 1, 0).astype(np.int64)


def match_gears(
    speed_m_s: FloatArray,
    rpm: FloatArray,
    overall_ratios: FloatArray,
    rolling_radius_m: float,
    interval_s: float,
) -> GearMatch:
    """Gear per sample from the rpm-to-speed ratio, with calibration, dwell and hysteresis.

    Parameters
    ----------
    speed_m_s : ndarray, shape (n,)
        Road speed [m/s], smoothed, evenly sampled.
    rpm : ndarray, shape (n,)
        Engine speed [rpm], same samples.
    overall_ratios : ndarray, shape (g,)
        Overall ratio of each gear, first gear first.
    rolling_radius_m : float
        Tire rolling radius [m].
    interval_s : float
        Sample spacing [s].

    Returns
    -------
    GearMatch
    """
    log_gears = np.log(overall_ratios)
    steps = -np.diff(log_gears)
    tol = MAX_MATCH_TOLERANCE
    if steps.size:
        tol = min(tol, MATCH_STEP_SHARE * float(steps.min()))
    moving = (speed_m_s > MOVING_SPEED_M_S) & (rpm > MIN_MATCH_RPM)
    with np.errstate(divide="ignore", invalid="ignore"):
        implied = rpm * rolling_radius_m * RPM_TO_RAD_S / speed_m_s
        log_ratio = np.where(moving, np.log(np.where(moving, implied, 1.0)), np.nan)
    first = _nearest(log_ratio, log_gears, tol)
    calibration = 1.0
    matched = first > 0
    if int(matched.sum()) >= _MIN_CALIBRATION_SAMPLES:
        offset = float(np.median(log_ratio[matched] - log_gears[first[matched] - 1]))
        calibration = math.exp(offset)
        log_ratio = log_ratio - offset
    labels = _nearest(log_ratio, log_gears, tol)
    return GearMatch(_dwell_filtered(labels, interval_s), log_ratio, calibration, tol)


def _runs(labels: IntArray) -> list[tuple[int, int, int]]:
    """(label, first, last) of every run of equal labels."""
    if labels.size == 0:
        return []
    cuts = np.flatnonzero(np.diff(labels) != 0) + 1
    starts = np.concatenate(([0], cuts))
    ends = np.concatenate((cuts - 1, [labels.size - 1]))
    return [
        (int(labels[s]), int(s), int(e))
        for s, e in zip(starts.tolist(), ends.tolist(), strict=True)
    ]


def _dwell_filtered(labels: IntArray, interval_s: float) -> IntArray:
    out = labels.copy()
    shortest = MIN_DWELL_S / interval_s
    for label, s, e in _runs(labels):
        if label and e - s + 1 < shortest:
            out[s : e + 1] = 0
    return out


@dataclass(frozen=True)
class SampleSegment:
    """A stretch of samples in one gear.

    Attributes
    ----------
    gear : int
        Gear number, 1 for first.
    first, last : int
        Indices of the first and last sample in the gear (inclusive).
    """

    gear: int
    first: int
    last: int


def gear_segments(gear: IntArray, interval_s: float) -> list[SampleSegment]:
    """Segments of one gear each, bridging unmatched gaps shorter than ``MERGE_GAP_S``.

    Parameters
    ----------
    gear : ndarray of int, shape (n,)
        Gear per sample, 0 where unmatched (e.g. :attr:`GearMatch.gear`).
    interval_s : float
        Sample spacing [s].

    Returns
    -------
    list of SampleSegment
        In time order.

    Examples
    --------
    >>> gear_segments(np.array([0, 1, 1, 0, 1, 2, 2, 0, 0, 0, 3]), 0.1)
    [SampleSegment(gear=1, first=1, last=4), SampleSegment(gear=2, first=5, last=6), \
SampleSegment(gear=3, first=10, last=10)]
    """
    out: list[SampleSegment] = []
    for label, s, e in _runs(gear):
        if not label:
            continue
        if out and out[-1].gear == label and (s - out[-1].last - 1) * interval_s < MERGE_GAP_S:
            out[-1] = SampleSegment(label, out[-1].first, e)
        else:
            out.append(SampleSegment(label, s, e))
    return out


@dataclass(frozen=True)
class Dip:
    """A torque interruption found in the acceleration alone.

    Attributes
    ----------
    first, last : int
        Sample indices bracketing the shift: the last before it starts, the first after
        it ends.
    start_s, end_s : float
        Interpolated start and end of the shift [s].
    """

    first: int
    last: int
    start_s: float
    end_s: float


def _crossing_time(time: FloatArray, accel: FloatArray, i: int, j: int, level: float) -> float:
    """Time where the signal passes ``level`` between samples i and j (linear)."""
    a0, a1 = float(accel[i]), float(accel[j])
    if a0 == a1:
        return float(time[i])
    frac = min(max((level - a0) / (a1 - a0), 0.0), 1.0)
    return float(time[i] + frac * (time[j] - time[i]))


def acceleration_dips(
    time_s: FloatArray, accel_m_s2: FloatArray, speed_m_s: FloatArray, interval_s: float
) -> list[Dip]:
    """Shifts found as dips of the smoothed acceleration (no engine speed logged).

    Parameters
    ----------
    time_s : ndarray, shape (n,)
        Evenly spaced times [s].
    accel_m_s2 : ndarray, shape (n,)
        Smoothed longitudinal acceleration [m/s^2].
    speed_m_s : ndarray, shape (n,)
        Smoothed road speed [m/s].
    interval_s : float
        Sample spacing [s].

    Returns
    -------
    list of Dip
        In time order.
    """
    n = accel_m_s2.size
    size = window_points(BASELINE_WINDOW_S, interval_s, n)
    baseline = np.asarray(median_filter(accel_m_s2, size=size, mode="nearest"), np.float64)
    low = (
        (accel_m_s2 < DIP_FRACTION * baseline)
        & (baseline > MIN_BASELINE_M_S2)
        & (speed_m_s > MOVING_SPEED_M_S)
    )
    out: list[Dip] = []
    for label, s, e in _runs(low.astype(np.int64)):
        duration = (e - s + 1) * interval_s
        if not label or not MIN_DIP_S <= duration <= MAX_DIP_S or s == 0 or e == n - 1:
            continue
        m = s + int(np.argmin(accel_m_s2[s : e + 1]))
        floor = float(accel_m_s2[m])
        before = 0.5 * (float(baseline[s]) + floor)
        after = 0.5 * (float(baseline[e]) + floor)
        i = m
        while i > 0 and accel_m_s2[i] < before:
            i -= 1
        j = m
        while j < n - 1 and accel_m_s2[j] < after:
            j += 1
        if out and i <= out[-1].last:
            continue
        start = _crossing_time(time_s, accel_m_s2, i, i + 1, before)
        end = _crossing_time(time_s, accel_m_s2, j - 1, j, after)
        out.append(Dip(i, j, start, end))
    return out
