"""The empirical crossover of two gears' logged acceleration, and the verdict on a shift.

For a shift from gear i at road speed ``v_s``, the quickest shift is where gear i's
acceleration falls below gear j's at the same speed (the time ``int dv / a`` across the two
gears' shared range is least there; see :mod:`core.shifts.best`). The log holds gear i only
below ``v_s`` and gear j only above it, so each is fitted against speed and extrapolated:

* Fit samples: gear i from ``(1 - FIT_SPAN_BEFORE) * v_s`` up to the shift, gear j from the
  shift up to ``(1 + FIT_SPAN_AFTER)`` times its first speed (gear j reaches further: it is
  the one extrapolated back when a shift came late), leaving out half a smoothing window
  beside each shift (the filter blurs the dip into it) and ``SETTLE_S`` after a gear takes
  up the drive (driveline shunt).
* Fit: a polynomial in ``v - v_s`` by least squares, quadratic with at least 20 samples
  spanning 10 % of ``v_s``, else a straight line with at least 6 samples spanning 3 %; once
  refitted without samples whose residual exceeds 3.5 robust standard deviations
  (1.4826 * median absolute residual).
* Crossover: where ``a_i(v) - a_j(v)`` changes sign, searched from ``v_s`` towards the
  side its sign at ``v_s`` points to (gear i still stronger: upwards; already weaker:
  downwards), within ``v_s * (1 -+ MAX_EXTRAPOLATION)``; the first root met is where
  gear i falls behind. None there: gear i is stronger (crossover above the range) or
  weaker (below) throughout.

The verdict compares ``v_s`` with the target: the crossover speed, or the speed at the rev
limit in gear i when that comes first (or when the crossover lies above the range and a
rev limit is known). ``deviation = v_s / v_target - 1``; within the tolerance (default
+-3 %, the same share in rpm since rpm is proportional to speed in a gear) the shift is about
right, below it early, above it late. Without a target it is early (gear i still stronger)
or late (gear j already stronger) by the sign of ``a_i - a_j`` at ``v_s``.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np
from numpy.polynomial import polynomial as npoly
from numpy.typing import NDArray

__all__ = [
    "FIT_SPAN_AFTER",
    "FIT_SPAN_BEFORE",
    "MAX_EXTRAPOLATION",
    "SETTLE_S",
    "CrossoverFit",
    "ShiftVerdict",
    "VerdictBasis",
    "acceleration_fit",
    "crossover",
    "verdict",
]

FloatArray = NDArray[np.float64]

FIT_SPAN_BEFORE = 0.35
FIT_SPAN_AFTER = 0.5
MAX_EXTRAPOLATION = 0.5
SETTLE_S = 0.1  # [s]
_OUTLIER_SIGMAS = 3.5
_MAD_TO_SIGMA = 1.4826


class ShiftVerdict(enum.Enum):
    """Whether a logged shift came too early, too late, or about right."""

    EARLY = "early"
    LATE = "late"
    ABOUT_RIGHT = "about_right"
    UNDETERMINED = "undetermined"


class VerdictBasis(enum.Enum):
    """What the verdict compares the shift with."""

    CROSSOVER = "crossover"
    """The empirical crossover of the two gears' acceleration."""
    REV_LIMIT = "rev_limit"
    """The rev limit, reached before the crossover."""
    BEYOND_RANGE = "beyond_range"
    """No crossover within the extrapolation range: one gear is stronger throughout."""
    INSUFFICIENT_DATA = "insufficient_data"
    """Too few samples in a gear to fit its acceleration."""
    DOWNSHIFT = "downshift"
    """A downshift: not judged."""


def _robust_polyfit(x: FloatArray, y: FloatArray, degree: int) -> FloatArray:
    """Least squares, refitted once without residuals beyond 3.5 robust sigmas."""
    coef = np.asarray(npoly.polyfit(x, y, degree), dtype=np.float64)
    resid = y - npoly.polyval(x, coef)
    sigma = _MAD_TO_SIGMA * float(np.median(np.abs(resid)))
    keep = np.abs(resid) <= _OUTLIER_SIGMAS * sigma
    if sigma > 0.0 and not keep.all() and int(keep.sum()) > 2 * (degree + 1):
        coef = np.asarray(npoly.polyfit(x[keep], y[keep], degree), dtype=np.float64)
    return coef


def acceleration_fit(
    speed_m_s: FloatArray, accel_m_s2: FloatArray, ref_m_s: float
) -> FloatArray | None:
    """Polynomial coefficients of acceleration in ``u = v / ref_m_s - 1``, lowest power first.

    Written in the relative speed ``u`` the fit is well conditioned at any speed.

    Parameters
    ----------
    speed_m_s, accel_m_s2 : ndarray, shape (n,)
        Samples of one gear [m/s, m/s^2].
    ref_m_s : float
        Speed the polynomial is centred on (the shift speed) [m/s].

    Returns
    -------
    ndarray, shape (3,), or None
        Coefficients of 1, u and u^2 [m/s^2] (the last 0 for a line); None with too few
        samples.

    Examples
    --------
    >>> v = np.linspace(20.0, 30.0, 30)
    >>> np.round(acceleration_fit(v, 5.0 - 0.1 * (v - 25.0), 25.0), 6).tolist()
    [5.0, -2.5, 0.0]
    """
    x = speed_m_s / ref_m_s - 1.0
    span = float(np.ptp(x)) if x.size else 0.0
    if x.size < 6 or span < 0.03:
        return None
    degree = 2 if x.size >= 20 and span >= 0.1 else 1
    coef = _robust_polyfit(x, accel_m_s2, degree)
    return np.pad(coef, (0, 3 - coef.size))


@dataclass(frozen=True)
class CrossoverFit:
    """The two gears' fitted acceleration and where they cross.

    Attributes
    ----------
    speed_m_s : float or None
        Crossover speed [m/s]; None when none lies in the search range.
    current_stronger : bool
        Whether the gear being left accelerates harder than the next at the shift speed.
    current_at_shift_m_s2, next_at_shift_m_s2 : float
        The two fits at the shift speed [m/s^2].
    """

    speed_m_s: float | None
    current_stronger: bool
    current_at_shift_m_s2: float
    next_at_shift_m_s2: float


def crossover(current: FloatArray, following: FloatArray, shift_speed_m_s: float) -> CrossoverFit:
    """Where the gear being left falls behind the next, from their fits about the shift speed.

    Parameters
    ----------
    current, following : ndarray, shape (3,)
        Fits of :func:`acceleration_fit` centred on ``shift_speed_m_s``.
    shift_speed_m_s : float
        Speed as the shift began [m/s].

    Returns
    -------
    CrossoverFit

    Examples
    --------
    >>> c = crossover(np.array([5.0, -10.0, 0.0]), np.array([4.0, -5.0, 0.0]), 20.0)
    >>> c.speed_m_s, c.current_stronger
    (24.0, True)
    """
    diff = current - following
    a_cur, a_next = float(current[0]), float(following[0])
    stronger = a_cur > a_next
    roots = npoly.polyroots(np.trim_zeros(diff, "b")) if np.any(diff[1:]) else np.array([])
    real = [float(r.real) for r in np.atleast_1d(roots) if abs(r.imag) < 1e-9]
    # the crossing on the side the sign at the shift points to: gear i still stronger,
    # the first root above the shift speed; already weaker, the last root below it
    side = [u for u in real if (u > 0.0 if stronger else u < 0.0) and abs(u) <= MAX_EXTRAPOLATION]
    speed = None if not side else shift_speed_m_s * (1.0 + min(side, key=abs))
    return CrossoverFit(speed, stronger, a_cur, a_next)


def verdict(
    shift_speed_m_s: float,
    fit: CrossoverFit,
    limit_speed_m_s: float | None,
    tolerance: float,
) -> tuple[ShiftVerdict, VerdictBasis, float | None, float | None]:
    """The verdict on a shift against the crossover or the rev limit.

    Parameters
    ----------
    shift_speed_m_s : float
        Speed as the shift began [m/s].
    fit : CrossoverFit
        The two gears' crossover.
    limit_speed_m_s : float or None
        Speed at the rev limit in the gear being left [m/s], if the limit is known.
    tolerance : float
        Half-width of the "about right" band, as a share of the target speed [-].

    Returns
    -------
    tuple
        Verdict, its basis, the target speed [m/s] (or None) and the deviation
        ``v_s / v_target - 1`` (or None).

    Examples
    --------
    >>> fit = CrossoverFit(25.0, True, 3.0, 2.5)
    >>> v, basis, target, dev = verdict(20.0, fit, None, 0.03)
    >>> v.value, basis.value, target, round(dev, 3)
    ('early', 'crossover', 25.0, -0.2)
    """
    target, basis = fit.speed_m_s, VerdictBasis.CROSSOVER
    if target is None:
        basis = VerdictBasis.BEYOND_RANGE
        if fit.current_stronger and limit_speed_m_s is not None:
            target, basis = limit_speed_m_s, VerdictBasis.REV_LIMIT
    elif limit_speed_m_s is not None and target > limit_speed_m_s:
        target, basis = limit_speed_m_s, VerdictBasis.REV_LIMIT
    if target is None:
        late = not fit.current_stronger
        return (ShiftVerdict.LATE if late else ShiftVerdict.EARLY), basis, None, None
    deviation = shift_speed_m_s / target - 1.0
    a_cur, a_next = fit.current_at_shift_m_s2, fit.next_at_shift_m_s2
    alike = abs(a_cur - a_next) <= tolerance * max(abs(a_cur), abs(a_next))
    if alike or abs(deviation) <= tolerance:
        result = ShiftVerdict.ABOUT_RIGHT
    elif deviation < 0.0:
        result = ShiftVerdict.EARLY
    else:
        result = ShiftVerdict.LATE
    return result, basis, target, deviation
