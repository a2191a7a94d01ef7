"""Gear-set spacing: the ratios between a first and a top gear, and where each shift lands.

A set of n forward ratios ``i_1 > i_2 > ... > i_n`` is described by its spread
``S = i_1 / i_n`` and its steps ``phi_k = i_k / i_(k+1)``, k = 1 .. n-1, whose product is S.
Two rules fix the steps from the first ratio, the top ratio and the gear count:

* **Geometric** (closed form): every step is the same, ``phi = S**(1/(n-1))``.
* **Progressive** (common practice: wide steps in the low gears, close ones in the upper
  gears where the car spends most of its time): each step is the one before it divided by a
  constant progression factor ``psi >= 1``, ``phi_(k+1) = phi_k / psi``. Requiring the product
  of the steps to be S gives, in closed form,

  ::

      phi_k = S**(1/(n-1)) * psi**((n-2)/2 - (k-1))          k = 1 .. n-1
      i_k   = i_n * phi_top**m * psi**(m*(m-1)/2)             m = n - k
      phi_top = phi_(n-1) = S**(1/(n-1)) * psi**(-(n-2)/2)

  ``psi = 1`` gives the geometric set. Every step must exceed 1 (the gears strictly
  descend), which for n >= 3 bounds ``psi < S**(2/((n-1)*(n-2)))``. With two gears there is a
  single step and ``psi`` has no effect.

A shift from gear k at engine speed ``n_s`` lands, with no slip, at
``n_s * i_(k+1) / i_k = n_s / phi_k`` (the final drive cancels), a drop of
``n_s * (1 - 1/phi_k)``; :mod:`core.driveline.landing` sets those speeds against a torque curve.
"""

from __future__ import annotations

import enum
import math
import operator
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.checks import require_positive
from core.driveline.drivetrain import MAX_GEARS, MAX_RATIO, make_drivetrain
from core.errors import CurveError, DrivetrainError

__all__ = [
    "MIN_GEARS",
    "GearSet",
    "ShiftLandings",
    "Spacing",
    "geometric_gear_set",
    "max_progression_factor",
    "progressive_gear_set",
    "shift_landings",
]

MIN_GEARS = 2

FloatArray = NDArray[np.float64]
IntArray = NDArray[np.int64]


class Spacing(enum.Enum):
    """The rule that placed the ratios between first and top gear."""

    GEOMETRIC = "geometric"
    PROGRESSIVE = "progressive"


@dataclass(frozen=True)
class GearSet:
    """Forward ratios placed between a first and a top gear.

    Attributes
    ----------
    spacing : Spacing
        The rule used.
    gear_ratios : ndarray, shape (n,)
        Transmission ratio of each gear [-], first gear first, strictly descending; the first
        and last equal the given first and top ratios exactly.
    steps : ndarray, shape (n-1,)
        Step between adjacent gears, ``gear_ratios[k] / gear_ratios[k+1]`` [-], each > 1
        (equal to the ratio quotient to rounding).
    progression_factor : float
        Quotient of adjacent steps, ``steps[k] / steps[k+1]`` [-]; 1 for geometric spacing.
    """

    spacing: Spacing
    gear_ratios: FloatArray
    steps: FloatArray
    progression_factor: float

    @property
    def gear_count(self) -> int:
        """Number of forward gears."""
        return int(self.gear_ratios.size)

    @property
    def spread(self) -> float:
        """Ratio spread, first ratio / top ratio [-]."""
        return float(self.gear_ratios[0] / self.gear_ratios[-1])


@dataclass(frozen=True)
class ShiftLandings:
    """Where each upshift of a gear set lands.

    Attributes
    ----------
    from_gear : ndarray of int, shape (n-1,)
        Gear shifted out of, 1 for first.
    steps : ndarray, shape (n-1,)
        Ratio step of each shift, current / next [-].
    shift_rpm : ndarray, shape (n-1,)
        Engine speed at each shift [rpm].
    landing_rpm : ndarray, shape (n-1,)
        Engine speed just after each shift, ``shift_rpm * next / current`` [rpm].
    rpm_drop : ndarray, shape (n-1,)
        ``shift_rpm - landing_rpm`` [rpm].
    drop_percent : ndarray, shape (n-1,)
        The drop as a share of the shift speed [%].
    """

    from_gear: IntArray
    steps: FloatArray
    shift_rpm: FloatArray
    landing_rpm: FloatArray
    rpm_drop: FloatArray
    drop_percent: FloatArray


def _checked_ends(
    first_ratio: float, top_ratio: float, gear_count: int
) -> tuple[float, float, int]:
    try:
        n = operator.index(gear_count)
    except TypeError:
        raise DrivetrainError(
            f"`gear_count` must be an integer, got {gear_count!r}", parameter="gear_count"
        ) from None
    if not MIN_GEARS <= n <= MAX_GEARS:
        raise DrivetrainError(
            f"`gear_count` must be between {MIN_GEARS} and {MAX_GEARS}, got {n}",
            parameter="gear_count",
        )
    first = require_positive(first_ratio, "first_ratio", DrivetrainError, at_most=MAX_RATIO)
    top = require_positive(top_ratio, "top_ratio", DrivetrainError, at_most=MAX_RATIO)
    if top >= first:
        raise DrivetrainError(
            f"`top_ratio` must be < `first_ratio` ({first:g}), got {top:g}",
            parameter="top_ratio",
        )
    return first, top, n


def max_progression_factor(first_ratio: float, top_ratio: float, gear_count: int) -> float:
    """The progression factor at which the top step of a progressive set reaches 1.

    Parameters
    ----------
    first_ratio : float
        First-gear ratio [-], in (0, 50].
    top_ratio : float
        Top-gear ratio [-], below ``first_ratio``.
    gear_count : int
        Number of forward gears, 2 to 12.

    Returns
    -------
    float
        ``S**(2/((n-1)*(n-2)))`` with ``S = first_ratio / top_ratio`` [-]; a usable factor is
        strictly below it. Infinite for two gears, where the factor has no effect.

    Examples
    --------
    >>> round(max_progression_factor(4.0, 1.0, 3), 6)
    4.0
    """
    first, top, n = _checked_ends(first_ratio, top_ratio, gear_count)
    if n == MIN_GEARS:
        return math.inf
    return float((first / top) ** (2.0 / ((n - 1) * (n - 2))))


def geometric_gear_set(first_ratio: float, top_ratio: float, gear_count: int) -> GearSet:
    """Ratios with one constant step between first and top gear.

    Parameters
    ----------
    first_ratio : float
        First-gear ratio [-], in (0, 50].
    top_ratio : float
        Top-gear ratio [-], in (0, first_ratio).
    gear_count : int
        Number of forward gears, 2 to 12.

    Returns
    -------
    GearSet
        Steps all ``(first_ratio / top_ratio)**(1/(gear_count-1))``.

    Raises
    ------
    DrivetrainError
        On a gear count outside 2 to 12, a ratio not finite or outside (0, 50], or a top
        ratio not below the first.

    Examples
    --------
    >>> g = geometric_gear_set(4.0, 1.0, 3)
    >>> g.gear_ratios.tolist(), g.steps.tolist()
    ([4.0, 2.0, 1.0], [2.0, 2.0])
    """
    first, top, n = _checked_ends(first_ratio, top_ratio, gear_count)
    step = (first / top) ** (1.0 / (n - 1))
    m = np.arange(n - 1, -1, -1, dtype=np.float64)
    ratios = top * step**m
    ratios[0] = first
    ratios[-1] = top
    return GearSet(Spacing.GEOMETRIC, ratios, np.full(n - 1, step), 1.0)


def progressive_gear_set(
    first_ratio: float, top_ratio: float, gear_count: int, *, progression_factor: float
) -> GearSet:
    """Ratios whose steps shrink by a constant factor from first toward top gear.

    Each step is the previous one divided by ``progression_factor`` (common practice in
    transmission design); the closed form in the module docstring places first and top
    exactly.

    Parameters
    ----------
    first_ratio : float
        First-gear ratio [-], in (0, 50].
    top_ratio : float
        Top-gear ratio [-], in (0, first_ratio).
    gear_count : int
        Number of forward gears, 2 to 12.
    progression_factor : float
        Quotient of adjacent steps [-], at least 1 (1 gives the geometric set) and below
        :func:`max_progression_factor` so that every step exceeds 1.

    Returns
    -------
    GearSet

    Raises
    ------
    DrivetrainError
        On the conditions of :func:`geometric_gear_set`, or a progression factor not finite,
        below 1, or so large that the top step would not exceed 1.

    Examples
    --------
    >>> g = progressive_gear_set(4.0, 1.0, 3, progression_factor=1.5625)
    >>> [round(r, 6) for r in g.gear_ratios.tolist()], [round(s, 6) for s in g.steps.tolist()]
    ([4.0, 1.6, 1.0], [2.5, 1.6])
    """
    first, top, n = _checked_ends(first_ratio, top_ratio, gear_count)
    psi = progression_factor
    if not math.isfinite(psi) or psi < 1.0:
        raise DrivetrainError(
            f"`progression_factor` must be finite and >= 1, got {psi}",
            parameter="progression_factor",
        )
    limit = max_progression_factor(first, top, n)
    message = (
        f"`progression_factor` must be < {limit:.6g} for {n} gears from {first:g} to "
        f"{top:g} (the top step would not exceed 1), got {psi}"
    )
    if psi >= limit:
        raise DrivetrainError(message, parameter="progression_factor")
    base = (first / top) ** (1.0 / (n - 1))
    k = np.arange(n - 1, dtype=np.float64)
    steps = base * psi ** ((n - 2) / 2.0 - k)
    m = np.arange(n - 1, -1, -1, dtype=np.float64)
    ratios = top * steps[-1] ** m * psi ** (m * (m - 1.0) / 2.0)
    ratios[0] = first
    ratios[-1] = top
    if steps[-1] <= 1.0 or np.any(np.diff(ratios) >= 0.0):  # a factor within rounding of it
        raise DrivetrainError(message, parameter="progression_factor")
    return GearSet(Spacing.PROGRESSIVE, ratios, steps, float(psi))


def _checked_set(gear_ratios: ArrayLike) -> FloatArray:
    ratios = np.asarray(gear_ratios, dtype=np.float64)
    if ratios.ndim != 1 or not MIN_GEARS <= ratios.size <= MAX_GEARS:
        raise DrivetrainError(
            f"`gear_ratios` must list {MIN_GEARS} to {MAX_GEARS} forward gears, got {ratios.size}",
            parameter="gear_ratios",
        )
    # the drivetrain's own rules: finite, in (0, 50], strictly descending
    return make_drivetrain(ratios.tolist(), 1.0).gear_ratios


def _checked_shift_rpm(shift_rpm: ArrayLike, shifts: int) -> FloatArray:
    arr = np.asarray(shift_rpm, dtype=np.float64)
    if arr.ndim == 0:
        arr = np.full(shifts, float(arr))
    elif arr.shape != (shifts,):
        raise CurveError(
            f"`shift_rpm` must be one value or one per shift ({shifts}), got {arr.size}",
            parameter="shift_rpm",
        )
    bad = np.flatnonzero(~np.isfinite(arr) | (arr <= 0.0))
    if bad.size:
        i = int(bad[0])
        raise CurveError(
            f"`shift_rpm[{i}]` must be finite and > 0, got {arr[i]}", parameter=f"shift_rpm[{i}]"
        )
    return arr


def shift_landings(gear_ratios: ArrayLike, shift_rpm: ArrayLike) -> ShiftLandings:
    """Engine speed after each upshift and the drop from the shift speed.

    Parameters
    ----------
    gear_ratios : array_like, shape (n,)
        Forward ratios [-], first gear first, strictly descending, 2 to 12 gears; a
        :attr:`GearSet.gear_ratios` or :attr:`~core.driveline.drivetrain.Drivetrain.gear_ratios`.
    shift_rpm : float or array_like, shape (n-1,)
        Engine speed at each shift [rpm], e.g. the rev limit for every shift; one value for
        all shifts or one per shift, each finite and > 0.

    Returns
    -------
    ShiftLandings

    Raises
    ------
    DrivetrainError
        When the ratios are not a valid set of 2 to 12 descending gears.
    CurveError
        When a shift speed is not finite and > 0, or their count is wrong.

    Examples
    --------
    >>> s = shift_landings([3.0, 2.0, 1.5], 6000.0)
    >>> s.landing_rpm.tolist(), s.rpm_drop.tolist()
    ([4000.0, 4500.0], [2000.0, 1500.0])
    """
    ratios = _checked_set(gear_ratios)
    shifts = _checked_shift_rpm(shift_rpm, ratios.size - 1)
    landing = shifts * ratios[1:] / ratios[:-1]
    drop = shifts - landing
    return ShiftLandings(
        from_gear=np.arange(1, ratios.size, dtype=np.int64),
        steps=ratios[:-1] / ratios[1:],
        shift_rpm=shifts,
        landing_rpm=landing,
        rpm_drop=drop,
        drop_percent=100.0 * drop / shifts,
    )
