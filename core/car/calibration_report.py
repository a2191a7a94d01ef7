"""How well a calibrated pass fits, gear by gear, and the warnings about the fit.

For each gear fitted the speed residual (fitted minus logged) over its samples, from the
first sample in the gear up to the first of the next, gives the RMS and the largest
magnitude. The time error at the gear's end is when the calibrated simulation reaches the
logged speed at the gear's last sample, less the logged time of that sample: positive
where the model is late (slower than the car).
"""

from __future__ import annotations

import itertools
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Protocol

import numpy as np
from numpy.typing import NDArray

from core.car.calibration_pass import FitWindow
from core.car.vehicle import Launch
from core.notices import Notice
from core.runs.simulate import RunResult

__all__ = [
    "MIN_FIT_DURATION_S",
    "MIN_FIT_SAMPLES",
    "POOR_MATCH_RMS_M_S",
    "POOR_SHARE",
    "STRONG_CORRELATION",
    "GearResidual",
    "figure_notices",
    "gear_residuals",
]

FloatArray = NDArray[np.float64]

MIN_FIT_SAMPLES = 40
MIN_FIT_DURATION_S = 4.0  # [s]
POOR_SHARE = 0.10  # a standard uncertainty over 10 % of the value: poorly determined
STRONG_CORRELATION = 0.9
POOR_MATCH_RMS_M_S = 0.5  # [m/s] residual RMS above this: the model misses the pass
SHIFT_TIME_SLACK_S = 0.1  # [s] logged shifts this much (and 50 %) off the launch's


class _Figure(Protocol):
    @property
    def name(self) -> str: ...
    @property
    def value(self) -> float: ...
    @property
    def std_error(self) -> float: ...
    @property
    def fitted(self) -> bool: ...
    @property
    def at_bound(self) -> bool: ...


_LABELS = {"mass_factor": "mass factor", "efficiency": "efficiency", "drag_area": "drag area"}


@dataclass(frozen=True)
class GearResidual:
    """The fit in one logged gear.

    Attributes
    ----------
    gear : int
        Gear number, 1 for first.
    start_time_s, end_time_s : float
        First and last logged sample in the gear [s].
    samples : int
        Samples compared in the gear (up to the next gear's first).
    rms_m_s, max_m_s : float
        Speed residual, RMS and largest magnitude [m/s]; NaN without samples.
    time_error_s : float or None
        Calibrated simulation's time at the logged end speed of the gear, less the logged
        time [s]; None where the simulation does not reach that speed in the gear.
    """

    gear: int
    start_time_s: float
    end_time_s: float
    samples: int
    rms_m_s: float
    max_m_s: float
    time_error_s: float | None


def _time_error(run: RunResult, gear: int, speed: float, end: float, t0: float) -> float | None:
    driving = (run.gear == gear) & (run.acceleration_m_s2 > 0.0)
    v, t = run.speed_m_s[driving], run.time_s[driving]
    if v.size < 2 or not v[0] - 1e-6 <= speed <= v[-1] * (1.0 + 1e-6) + 1e-6:
        return None
    return float(np.interp(speed, v, t)) + t0 - end


def gear_residuals(
    window: FitWindow, resid: FloatArray, run: RunResult, t0: float
) -> tuple[GearResidual, ...]:
    """Residuals and time error of every fitted gear.

    Parameters
    ----------
    window : FitWindow
        The fitted samples and the logged gears.
    resid : ndarray, shape (n,)
        Fitted minus logged speed at the samples [m/s].
    run : RunResult
        The calibrated simulation.
    t0 : float
        Log time of the simulation's start [s].

    Returns
    -------
    tuple of GearResidual
    """
    out: list[GearResidual] = []
    t = window.time_s
    starts = [s[1] for s in window.segments[1:]] + [np.inf]
    for (gear, first, last, speed), nxt in zip(window.segments, starts, strict=True):
        lo = -np.inf if not out else first
        mask = (t >= lo - 1e-9) & (t < nxt - 1e-9)
        r = resid[mask]
        out.append(
            GearResidual(
                gear=gear,
                start_time_s=first,
                end_time_s=last,
                samples=int(r.size),
                rms_m_s=float(np.sqrt(np.mean(r**2))) if r.size else float("nan"),
                max_m_s=float(np.max(np.abs(r))) if r.size else float("nan"),
                time_error_s=_time_error(run, gear, speed, last, t0),
            )
        )
    return tuple(out)


def _pass_notices(window: FitWindow, gears: Sequence[GearResidual]) -> list[Notice]:
    notes = []
    span = float(window.time_s[-1] - window.time_s[0]) if window.time_s.size else 0.0
    if window.time_s.size < MIN_FIT_SAMPLES or span < MIN_FIT_DURATION_S:
        notes.append(
            Notice(
                "pass_too_short",
                f"The fitted pass holds {window.time_s.size} samples over {span:.1f} s; at "
                f"least {MIN_FIT_SAMPLES} samples over {MIN_FIT_DURATION_S:g} s are needed to "
                "tell the figures apart.",
                "log",
            )
        )
    if len(gears) < 2:
        notes.append(
            Notice(
                "one_gear",
                "The pass is fitted in one gear only: mass factor and efficiency are told "
                "apart by the gears' different rotating masses, so expect them poorly "
                "determined.",
                "log",
            )
        )
    return notes


def figure_notices(
    figures: Sequence[_Figure],
    corr: FloatArray,
    window: FitWindow,
    launch: Launch,
    gears: Sequence[GearResidual],
) -> list[Notice]:
    """Warnings: short pass, bounds, poorly determined or correlated figures, shift time."""
    notes = _pass_notices(window, gears)
    for f in figures:
        if not f.fitted:
            continue
        label = _LABELS[f.name]
        if f.at_bound:
            notes.append(
                Notice(
                    "parameter_at_bound",
                    f"The {label} ended at a bound of the fit ({f.value:.4g}); the pass "
                    "asks for a value outside the plausible range: check the other inputs.",
                    f.name,
                )
            )
        elif f.std_error > POOR_SHARE * abs(f.value):
            notes.append(
                Notice(
                    "poorly_determined",
                    f"The {label} is poorly determined by this pass (standard uncertainty "
                    f"{100.0 * f.std_error / abs(f.value):.0f} % of its value).",
                    f.name,
                )
            )
    for a, b in itertools.combinations(range(len(figures)), 2):
        if abs(corr[a, b]) > STRONG_CORRELATION:
            notes.append(
                Notice(
                    "strongly_correlated",
                    f"The {_LABELS[figures[a].name]} and {_LABELS[figures[b].name]} are "
                    f"strongly correlated ({corr[a, b]:+.2f}): the pass fixes a combination "
                    "of the two better than either.",
                )
            )
    if window.logged_shift_s:
        logged = float(np.median(window.logged_shift_s))
        ts = launch.shift_time_s
        if abs(logged - ts) > max(SHIFT_TIME_SLACK_S, 0.5 * ts):
            notes.append(
                Notice(
                    "shift_time_differs",
                    f"The logged shifts take about {logged:.2f} s against the {ts:.2f} s "
                    "stated; the fit uses the stated time, so set it nearer the log's.",
                    "shift_time_s",
                )
            )
    return notes
