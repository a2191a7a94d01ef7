"""The stretch of a logged pass a calibration fits, and how the simulation is lined up with it.

The logged pass is read by the log check (:func:`core.logs.check.analyse_pass`): gears from
the rpm-to-speed ratio (or acceleration dips without rpm), every shift, and the end of full
throttle. A calibration simulates the pass with the project's one integrator
(:func:`core.runs.simulate.simulate_run`), so it must tell the simulation

* where to start: a log that begins at rest (first speed below ``STANDING_SPEED_M_S``) in
  first gear is a standing start, and the launch instant ``t0`` is fitted (a nuisance
  parameter, guessed at the last sample at rest); any other log (or one whose first gear
  matched is not first, as with a converter slipping in first) is a rolling start at its
  first sample in the first matched gear, and the start speed is fitted;
* where to shift: at the speed each logged shift began, as the engine rpm the model turns
  there (with a slipping converter that is above the coupled rpm);
* which samples to compare: from the start up to the end of full throttle, or up to the
  last gear change that fits the drivetrain (each logged gear one above the last).
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.errors import FitError
from core.logs.check import GearSegment, PassAnalysis, analyse_pass
from core.logs.pass_data import PassLog
from core.notices import Notice
from core.runs.drive_model import DriveModel

__all__ = ["STANDING_SPEED_M_S", "FitWindow", "StartKind", "fit_window", "launch_bounds"]

FloatArray = NDArray[np.float64]

STANDING_SPEED_M_S = 0.5
"""A log whose first speed is below this starts from rest [m/s]."""
LAUNCH_SEARCH_S = 1.0  # [s] the launch instant is sought this far before the last rest sample
_DROPPED = frozenset({"too_few_samples"})  # the log check's verdict notices


class StartKind(enum.Enum):
    """How the simulated pass starts."""

    STANDING = "standing"
    ROLLING = "rolling"


@dataclass(frozen=True)
class FitWindow:
    """The samples a calibration compares, and the simulation lined up with them.

    Attributes
    ----------
    analysis : PassAnalysis
        The log check's reading of the pass.
    start : StartKind
        Standing or rolling start.
    time_s, speed_m_s : ndarray, shape (n,)
        Logged samples fitted [s, m/s].
    start_time_s : float
        Standing: the last logged sample at rest; rolling: the first sample fitted [s].
    start_speed_m_s : float
        Rolling: the first logged speed fitted [m/s]; 0 for a standing start.
    start_gear : int
        Gear the pass starts in (1 = first).
    last_gear : int
        Last gear fitted.
    shift_rpm : ndarray, shape (g - 1,)
        Engine speed at which the simulation leaves each gear [rpm]: the logged shift
        speeds, the rev limit for gears not shifted in the log.
    segments : tuple of (int, float, float, float)
        Per fitted gear: gear, first time, last time in the gear [s] and the logged (smoothed)
        speed there [m/s].
    logged_shift_s : tuple of float
        Duration of each logged shift fitted [s].
    notices : tuple of Notice
    """

    analysis: PassAnalysis
    start: StartKind
    time_s: FloatArray
    speed_m_s: FloatArray
    start_time_s: float
    start_speed_m_s: float
    start_gear: int
    last_gear: int
    shift_rpm: FloatArray
    segments: tuple[tuple[int, float, float, float], ...]
    logged_shift_s: tuple[float, ...]
    notices: tuple[Notice, ...]


def _consistent(analysis: PassAnalysis, notes: list[Notice]) -> int:
    """How many logged gear segments, from the first, step up one gear at a time."""
    segs = analysis.segments
    count = 1
    while count < len(segs) and segs[count].gear == segs[count - 1].gear + 1:
        count += 1
    if count < len(segs):
        a, b = segs[count - 1], segs[count]
        notes.append(
            Notice(
                "logged_gears_disagree",
                f"The log goes from gear {a.gear} to gear {b.gear} at t = "
                f"{b.start_time_s:.2f} s, not one gear up; the fit stops at the end of gear "
                f"{a.gear}. Check the gear ratios, final drive and tire.",
                "drivetrain",
            )
        )
    return count


def _shift_rpm(model: DriveModel, analysis: PassAnalysis, count: int) -> FloatArray:
    """Rev limit everywhere, the logged shift speeds as engine rpm where the log shifts."""
    gears = model.drivetrain.gear_count
    limit = model.rev_limit_rpm
    rpm = np.full(gears - 1, limit)
    floor = model.curve.rpm_min * (1.0 + 1e-6) + 1e-6
    for shift in analysis.shifts[: count - 1]:
        g = shift.from_gear - 1
        if 0 <= g < gears - 1:
            engine = model.drive(g, np.array([shift.speed_before_m_s]))[1]
            rpm[g] = min(max(float(engine[0]), floor), limit)
    return rpm


def _start(
    log: PassLog, first_time: float, until: float, standing: bool
) -> tuple[StartKind, float, float, NDArray[np.bool_]]:
    """Start kind, start time and speed, and which samples are fitted."""
    t, v = log.time_s, log.speed_m_s
    inside = t <= until + 1e-9
    if standing:
        moving = np.flatnonzero(v >= STANDING_SPEED_M_S)
        last_rest = int(moving[0]) - 1 if moving.size else t.size - 1
        keep = inside & (np.arange(t.size) >= last_rest)
        return StartKind.STANDING, float(t[last_rest]), 0.0, keep
    first = int(np.searchsorted(t, first_time - 1e-9))
    keep = inside & (np.arange(t.size) >= first)
    return StartKind.ROLLING, float(t[first]), float(v[first]), keep


def _start_notices(
    log: PassLog, first: GearSegment, kind: StartKind, t_start: float, at_rest: bool
) -> list[Notice]:
    """Why the fit does not start where the log does, if it does not."""
    if at_rest and kind is StartKind.ROLLING:
        return [
            Notice(
                "first_gear_not_matched",
                f"The log starts at rest but the first gear it matches is gear {first.gear} "
                "(a slipping converter or clutch, or ratios that do not fit): the fit starts "
                f"at t = {t_start:.2f} s as a rolling start in that gear.",
                "log",
            )
        ]
    if kind is StartKind.ROLLING and first.start_time_s - float(log.time_s[0]) > 1.0:
        return [
            Notice(
                "fit_starts_later",
                f"The log does not start at rest; the fit starts at t = {t_start:.2f} s, the "
                f"first sample matched to gear {first.gear}.",
                "log",
            )
        ]
    return []


def fit_window(
    log: PassLog, model: DriveModel, *, smoothing_window_s: float, start_gear: int
) -> FitWindow:
    """Read a logged pass and line up the simulation with it.

    Parameters
    ----------
    log : PassLog
        The logged pass in SI.
    model : DriveModel
        The car as the caller describes it.
    smoothing_window_s : float
        Smoothing window of the log check [s], 0.05 to 2.
    start_gear : int
        Gear of the first segment when no rpm is logged.

    Returns
    -------
    FitWindow

    Raises
    ------
    FitError
        When the log holds no full-throttle pass in a gear.
    """
    analysis = analyse_pass(
        log,
        model.drivetrain,
        model.tire,
        rev_limit_rpm=model.rev_limit_rpm,
        start_gear=start_gear,
        smoothing_window_s=smoothing_window_s,
    )
    notes = [n for n in analysis.notices if n.code not in _DROPPED]
    if not analysis.segments:
        raise FitError(
            "`log` holds no full-throttle pass in a gear to fit (the speed never rises, or "
            "no sample matches a gear)",
            parameter="log",
        )
    count = _consistent(analysis, notes)
    segs = analysis.segments[:count]
    until = analysis.analysed_until_s if count == len(analysis.segments) else segs[-1].end_time_s
    at_rest = bool(log.speed_m_s[0] < STANDING_SPEED_M_S)
    standing = at_rest and segs[0].gear == 1
    kind, t_start, v_start, keep = _start(log, segs[0].start_time_s, until, standing)
    notes += _start_notices(log, segs[0], kind, t_start, at_rest)
    bounds = [(s.gear, s.start_time_s, s.end_time_s, s.end_speed_m_s) for s in segs]
    bounds[0] = (segs[0].gear, t_start, segs[0].end_time_s, segs[0].end_speed_m_s)
    return FitWindow(
        analysis=analysis,
        start=kind,
        time_s=log.time_s[keep],
        speed_m_s=log.speed_m_s[keep],
        start_time_s=t_start,
        start_speed_m_s=v_start,
        start_gear=segs[0].gear,
        last_gear=segs[-1].gear,
        shift_rpm=_shift_rpm(model, analysis, count),
        segments=tuple(bounds),
        logged_shift_s=tuple(s.duration_s for s in analysis.shifts[: count - 1]),
        notices=tuple(notes),
    )


def launch_bounds(window: FitWindow) -> tuple[float, float]:
    """Bounds of the fitted launch instant relative to the last rest sample [s]."""
    moving = window.time_s[window.speed_m_s >= 2.0 * STANDING_SPEED_M_S]
    late = float(moving[0]) - window.start_time_s if moving.size else 1.0
    return -LAUNCH_SEARCH_S, max(late, 0.05)
