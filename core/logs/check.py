"""Checking the shifts of a logged pass: gears engaged, each shift, and whether it was early,
late or about right.

The pass is put on an even time grid (:func:`core.logs.pass_data.uniform_samples`), speed and
acceleration are smoothed (or speed differentiated) as :mod:`core.logs.signal` describes, and
the pass is analysed from the start up to full throttle's end: the peak speed, less any
trailing stretch where the acceleration has fallen below half its median of the second
before last (a lift). The gear at each sample comes from the rpm-to-speed ratio; without an
rpm channel, shifts are dips of the acceleration and gears are counted up from a stated
start gear. A shift runs from the last sample in the old gear to the first in the new one
(with rpm), or between the half-depth crossings of the dip (without).

Each shift is measured and judged by :func:`core.logs.shift.measure_shift`: accelerations
before and after it, the empirical crossover and the verdict (:mod:`core.logs.crossover`).
"""

from __future__ import annotations

import enum
import itertools
import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.driveline.drivetrain import Drivetrain
from core.driveline.tires import Tire
from core.engine.curves import RPM_TO_RAD_S
from core.errors import LogDataError
from core.logs.crossover import SETTLE_S, VerdictBasis
from core.logs.pass_data import PassLog, uniform_samples
from core.logs.shift import AVERAGE_WINDOW_S, LoggedShift, ShiftSignals, measure_shift
from core.logs.signal import (
    MOVING_SPEED_M_S,
    SampleSegment,
    acceleration_dips,
    gear_segments,
    match_gears,
    smoothed,
    window_points,
)
from core.logs.spin import match_notices
from core.notices import Notice

__all__ = [
    "DEFAULT_SMOOTHING_WINDOW_S",
    "DEFAULT_TOLERANCE",
    "MAX_SHIFTS",
    "GearSegment",
    "GearSource",
    "PassAnalysis",
    "analyse_pass",
]

FloatArray = NDArray[np.float64]

DEFAULT_SMOOTHING_WINDOW_S = 0.3
DEFAULT_TOLERANCE = 0.03
MAX_SHIFTS = 24
LOW_RATE_HZ = 10.0
_LIFT_SHARE = 0.5
_TAIL_NOTICE_S = 0.5  # [s] a longer unanalysed tail is reported
_MIN_PASS_SAMPLES = 10


class GearSource(enum.Enum):
    """How the gears of a pass were told apart."""

    RPM = "rpm"
    """From the ratio of logged engine speed to road speed."""
    ACCELERATION = "acceleration"
    """From dips of acceleration, counted up from the start gear."""


@dataclass(frozen=True)
class GearSegment:
    """A stretch of the pass in one gear.

    Attributes
    ----------
    gear : int
        Gear number, 1 for first.
    start_time_s, end_time_s : float
        First and last sample in the gear [s].
    start_speed_m_s, end_speed_m_s : float
        Smoothed road speed there [m/s].
    samples : int
        Samples of the even grid in the segment.
    """

    gear: int
    start_time_s: float
    end_time_s: float
    start_speed_m_s: float
    end_speed_m_s: float
    samples: int


@dataclass(frozen=True)
class PassAnalysis:
    """A checked pass.

    Attributes
    ----------
    gears_from : GearSource
        How gears were told apart.
    interval_s : float
        Spacing of the even grid [s].
    smoothing_window_s : float
        Smoothing window used: its sample count times the spacing [s].
    tolerance : float
        Half-width of the "about right" band [-].
    speed_calibration : float or None
        Logged rpm over rpm implied by speed and gear (None without rpm).
    analysed_from_s, analysed_until_s : float
        The stretch of the log analysed [s].
    segments : tuple of GearSegment
    shifts : tuple of LoggedShift
    notices : tuple of Notice
    """

    gears_from: GearSource
    interval_s: float
    smoothing_window_s: float
    tolerance: float
    speed_calibration: float | None
    analysed_from_s: float
    analysed_until_s: float
    segments: tuple[GearSegment, ...]
    shifts: tuple[LoggedShift, ...]
    notices: tuple[Notice, ...]


def _check_options(
    drivetrain: Drivetrain, rev_limit: float | None, start_gear: int, tol: float, window: float
) -> None:
    if not (math.isfinite(tol) and 0.005 <= tol <= 0.3):
        raise LogDataError(
            f"`tolerance` must lie in [0.005, 0.3], got {tol}", parameter="tolerance"
        )
    if not (math.isfinite(window) and 0.05 <= window <= 2.0):
        raise LogDataError(
            f"`smoothing_window_s` must lie in [0.05, 2] s, got {window}",
            parameter="smoothing_window_s",
        )
    if not 1 <= start_gear <= drivetrain.gear_count:
        raise LogDataError(
            f"`start_gear` must name a gear 1 to {drivetrain.gear_count}, got {start_gear}",
            parameter="start_gear",
        )
    if rev_limit is not None and not (math.isfinite(rev_limit) and 0.0 < rev_limit <= 30_000.0):
        raise LogDataError(
            f"`rev_limit_rpm` must lie in (0, 30000], got {rev_limit}", parameter="rev_limit_rpm"
        )


def _throttle_end(speed: FloatArray, accel: FloatArray, interval_s: float) -> int:
    """Index where full throttle ends: the peak speed, less a trailing lift."""
    peak = int(np.argmax(speed))
    lo, hi = peak - round(2.0 / interval_s), peak - round(1.0 / interval_s)
    if lo < 0 or hi - lo < 3:
        return peak
    ref = float(np.median(accel[lo:hi]))
    i = peak
    while ref > 0.0 and i > hi and accel[i] < _LIFT_SHARE * ref:
        i -= 1
    return i


def _segments_from_dips(
    sig: ShiftSignals,
    dt: float,
    first: int,
    start_gear: int,
    gears: int,
    notes: list[Notice],
) -> tuple[list[SampleSegment], list[tuple[int, int, float, float]]]:
    """Segments between acceleration dips, gears counted up from ``start_gear``."""
    dips = [d for d in acceleration_dips(sig.time, sig.accel, sig.speed, dt) if d.first > first]
    room = gears - start_gear
    if len(dips) > room:
        notes.append(
            Notice(
                "more_dips_than_gears",
                f"{len(dips)} acceleration dips were found but only {room} upshifts fit "
                f"above gear {start_gear}; the later dips are left out.",
                "start_gear",
            )
        )
        dips = dips[:room]
    edges = [first, *[d.last for d in dips]]
    ends = [*[d.first for d in dips], sig.time.size - 1]
    segs = [
        SampleSegment(start_gear + k, s, e)
        for k, (s, e) in enumerate(zip(edges, ends, strict=True))
    ]
    notes.append(
        Notice(
            "no_rpm",
            "Engine speed is not logged: shifts are found from dips of acceleration, gears "
            f"are counted up from gear {start_gear}, and rpm figures are implied by speed "
            "and gear.",
            "rpm",
        )
    )
    return segs, [(d.first, d.last, d.start_s, d.end_s) for d in dips]


def _sampling_notices(dt: float, tail_s: float, end_s: float) -> list[Notice]:
    """Notices of a coarse sample rate and of a log going on past full throttle."""
    notes = []
    if 1.0 / dt < LOW_RATE_HZ:
        notes.append(
            Notice(
                "low_sample_rate",
                f"The log is sampled at {1.0 / dt:.3g} Hz; below {LOW_RATE_HZ:g} Hz shift "
                "times and accelerations are coarse.",
                "time",
            )
        )
    if tail_s > _TAIL_NOTICE_S:
        notes.append(
            Notice(
                "analysed_until",
                f"Full throttle ends at t = {end_s:.2f} s (peak speed, less any lift); the "
                "rest of the log is not analysed.",
            )
        )
    return notes


def _shift_notices(shifts: tuple[LoggedShift, ...]) -> list[Notice]:
    """Notices of a pass without gear changes, and of shifts without a verdict."""
    notes = []
    if not shifts:
        notes.append(Notice("no_shifts", "No gear change was found in the pass."))
    for s in shifts:
        if s.basis is VerdictBasis.INSUFFICIENT_DATA:
            notes.append(
                Notice(
                    "too_few_samples",
                    f"Shift {s.from_gear}-{s.to_gear}: too few samples in a gear to fit its "
                    "acceleration; no verdict.",
                )
            )
    return notes


def _gear_segments(
    segs: Sequence[SampleSegment], t: FloatArray, speed: FloatArray
) -> tuple[GearSegment, ...]:
    """The stretches of the pass in one gear, with their times and speeds."""
    return tuple(
        GearSegment(
            s.gear,
            float(t[s.first]),
            float(t[s.last]),
            float(speed[s.first]),
            float(speed[s.last]),
            s.last - s.first + 1,
        )
        for s in segs
    )


def _gears_of_pass(
    sig: ShiftSignals,
    rpm: FloatArray | None,
    drivetrain: Drivetrain,
    tire: Tire,
    span: tuple[int, int],
    dt: float,
    start_gear: int,
    notes: list[Notice],
) -> tuple[GearSource, list[SampleSegment], list[tuple[int, int, float, float]], float | None]:
    """Where the pass is in each gear: from engine speed when logged (with the speed
    calibration it implies), else from the acceleration dips of the shifts. Appends its
    notices to ``notes``."""
    first, stop = span
    if stop - first + 1 < _MIN_PASS_SAMPLES:
        notes.append(
            Notice(
                "no_pass",
                f"The log holds no full-throttle pass of {_MIN_PASS_SAMPLES} samples or more "
                "above 2 m/s (the speed peaks too soon, or never rises).",
                "speed",
            )
        )
        return GearSource.ACCELERATION, [], [], None
    if rpm is not None:
        t = sig.time
        match = match_gears(sig.speed, rpm, drivetrain.overall_ratios, tire.rolling_radius_m, dt)
        segs = gear_segments(match.gear, dt)
        notes += match_notices(match, segs, t, sig.speed, drivetrain.overall_ratios, dt)
        bounds = [
            (x.last, y.first, float(t[x.last]), float(t[y.first]))
            for x, y in itertools.pairwise(segs)
        ]
        return GearSource.RPM, segs, bounds, match.calibration
    segs, bounds = _segments_from_dips(sig, dt, first, start_gear, drivetrain.gear_count, notes)
    return GearSource.ACCELERATION, segs, bounds, None


def analyse_pass(
    log: PassLog,
    drivetrain: Drivetrain,
    tire: Tire,
    *,
    rev_limit_rpm: float | None = None,
    start_gear: int = 1,
    tolerance: float = DEFAULT_TOLERANCE,
    smoothing_window_s: float = DEFAULT_SMOOTHING_WINDOW_S,
) -> PassAnalysis:
    """Find the gears and shifts of a logged pass and judge each shift.

    Parameters
    ----------
    log : PassLog
        The pass (:func:`core.logs.pass_data.pass_log`).
    drivetrain : Drivetrain
        Gear ratios, final drive and extra reduction.
    tire : Tire
        Driven tires (rolling radius).
    rev_limit_rpm : float, optional
        Rev limit [rpm]; a crossover above it makes the limit the target.
    start_gear : int
        Gear of the first segment when no rpm is logged (ignored otherwise).
    tolerance : float
        Half-width of the "about right" band as a share of the target speed, 0.005 to 0.3.
    smoothing_window_s : float
        Savitzky-Golay window [s], 0.05 to 2.

    Returns
    -------
    PassAnalysis

    Raises
    ------
    LogDataError
        On an option out of range.
    """
    _check_options(drivetrain, rev_limit_rpm, start_gear, tolerance, smoothing_window_s)
    u = uniform_samples(log)
    dt, w = u.interval_s, smoothing_window_s
    notes = list(log.notices)
    speed = smoothed(u.speed_m_s, dt, w)
    if u.acceleration_m_s2 is not None:
        accel = smoothed(u.acceleration_m_s2, dt, w)
    else:
        accel = smoothed(u.speed_m_s, dt, w, derivative=True)
    points = window_points(w, dt, speed.size)
    stop = _throttle_end(speed, accel, dt)
    moving = np.flatnonzero(speed[: stop + 1] > MOVING_SPEED_M_S)
    first = int(moving[0]) if moving.size else stop + 1
    t = u.time_s[: stop + 1]
    sig = ShiftSignals(
        t,
        speed[: stop + 1],
        accel[: stop + 1],
        points // 2,
        math.ceil(SETTLE_S / dt),
        round(AVERAGE_WINDOW_S / dt),
    )
    notes += _sampling_notices(dt, float(u.time_s[-1] - u.time_s[stop]), float(t[-1]))
    rpm = None if u.rpm is None else u.rpm[: stop + 1]
    source, segs, bounds, calibration = _gears_of_pass(
        sig, rpm, drivetrain, tire, (first, stop), dt, start_gear, notes
    )
    ratio_per_speed = drivetrain.overall_ratios / (tire.rolling_radius_m * RPM_TO_RAD_S)
    if calibration is not None:
        ratio_per_speed = ratio_per_speed * calibration
    if len(bounds) > MAX_SHIFTS:
        notes.append(
            Notice(
                "too_many_shifts",
                f"{len(bounds)} gear changes found; the first {MAX_SHIFTS} are analysed.",
            )
        )
        bounds = bounds[:MAX_SHIFTS]
    limit = rev_limit_rpm
    shifts = tuple(
        measure_shift(segs[k], segs[k + 1], b, sig, ratio_per_speed, limit, tolerance)
        for k, b in enumerate(bounds)
    )
    notes += _shift_notices(shifts)
    segments = _gear_segments(segs, t, sig.speed)
    return PassAnalysis(
        gears_from=source,
        interval_s=dt,
        smoothing_window_s=points * dt,
        tolerance=tolerance,
        speed_calibration=calibration,
        analysed_from_s=float(t[min(first, stop)]),
        analysed_until_s=float(t[-1]),
        segments=segments,
        shifts=shifts,
        notices=tuple(notes),
    )
