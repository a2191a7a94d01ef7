"""Where the shifts of a gear set land on a torque curve.

After an upshift from gear k at ``n_s`` the engine runs at ``n_s * i_(k+1) / i_k``
(:func:`core.driveline.spacing.shift_landings`). This module measures each landing speed from the
curve's torque peak and power peak, in rpm and in per cent of the peak speed, and checks it
against a band. Landing between the torque peak and the power peak is the usual aim when
choosing ratios (common practice): the engine pulls at or above peak torque after the shift
and has not yet passed peak power.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from core.driveline.spacing import ShiftLandings, shift_landings
from core.engine.curves import TorqueCurve
from core.errors import CurveError
from core.notices import Notice

__all__ = ["LandingAnalysis", "LandingBand", "landing_analysis"]

FloatArray = NDArray[np.float64]
BoolArray = NDArray[np.bool_]


class LandingBand(enum.Enum):
    """The engine-speed band a shift should land in.

    ``PEAK_TORQUE_TO_PEAK_POWER``: from the torque peak up to the power peak.
    ``CURVE_RANGE``: anywhere on the sampled curve, from its first to its last point.
    """

    PEAK_TORQUE_TO_PEAK_POWER = "peak_torque_to_peak_power"
    CURVE_RANGE = "curve_range"


@dataclass(frozen=True)
class LandingAnalysis:
    """Each shift's landing speed against the torque curve's peaks and a chosen band.

    Attributes
    ----------
    landings : ShiftLandings
        Shift and landing speeds.
    peak_torque_rpm, peak_power_rpm : float
        Where the curve peaks [rpm].
    from_torque_peak_rpm : ndarray, shape (n-1,)
        ``landing_rpm - peak_torque_rpm`` [rpm]; negative when landing below the peak.
    from_torque_peak_percent : ndarray, shape (n-1,)
        The same relative to ``peak_torque_rpm`` [%].
    from_power_peak_rpm : ndarray, shape (n-1,)
        ``landing_rpm - peak_power_rpm`` [rpm].
    from_power_peak_percent : ndarray, shape (n-1,)
        The same relative to ``peak_power_rpm`` [%].
    band_low_rpm, band_high_rpm : float
        The band used [rpm], inclusive at both ends.
    in_band : ndarray of bool, shape (n-1,)
        Whether each landing speed lies inside the band.
    landing_torque_nm : ndarray, shape (n-1,)
        Torque at each landing speed [N*m], taken at the curve's nearest end off the curve.
    landing_power_w : ndarray, shape (n-1,)
        Power at each landing speed [W], likewise.
    notices : tuple of Notice
        Landings or shifts off the sampled curve.
    """

    landings: ShiftLandings
    peak_torque_rpm: float
    peak_power_rpm: float
    from_torque_peak_rpm: FloatArray
    from_torque_peak_percent: FloatArray
    from_power_peak_rpm: FloatArray
    from_power_peak_percent: FloatArray
    band_low_rpm: float
    band_high_rpm: float
    in_band: BoolArray
    landing_torque_nm: FloatArray
    landing_power_w: FloatArray
    notices: tuple[Notice, ...]


def _band_rpm(
    band: LandingBand | tuple[float, float],
    curve: TorqueCurve,
    peak_torque: float,
    peak_power: float,
) -> tuple[float, float]:
    if band is LandingBand.PEAK_TORQUE_TO_PEAK_POWER:
        return min(peak_torque, peak_power), max(peak_torque, peak_power)
    if band is LandingBand.CURVE_RANGE:
        return curve.rpm_min, curve.rpm_max
    low, high = (float(v) for v in band)
    for i, v in enumerate((low, high)):
        if not math.isfinite(v) or v <= 0.0:
            raise CurveError(
                f"`band[{i}]` must be finite and > 0, got {v}", parameter=f"band[{i}]"
            )
    if high < low:
        raise CurveError(
            f"`band[1]` must be >= `band[0]` ({low:g} rpm), got {high:g}", parameter="band[1]"
        )
    return low, high


def landing_analysis(
    curve: TorqueCurve,
    gear_ratios: ArrayLike,
    shift_rpm: ArrayLike,
    *,
    band: LandingBand | tuple[float, float] = LandingBand.PEAK_TORQUE_TO_PEAK_POWER,
) -> LandingAnalysis:
    """How far each shift lands from the torque and power peaks, and whether it stays in a band.

    Parameters
    ----------
    curve : TorqueCurve
        Engine torque curve; its peaks are measured on the interpolated curve.
    gear_ratios : array_like, shape (n,)
        Forward ratios [-], first gear first, strictly descending, 2 to 12 gears.
    shift_rpm : float or array_like, shape (n-1,)
        Engine speed at each shift [rpm], one for all or one per shift.
    band : LandingBand or tuple of (float, float)
        The band a landing should stay in: a :class:`LandingBand` or explicit
        ``(low_rpm, high_rpm)`` [rpm], inclusive. Default from torque peak to power peak.

    Returns
    -------
    LandingAnalysis
        Notices ``"landing_below_curve"`` and ``"shift_above_curve"`` flag shifts whose
        speeds leave the sampled curve (torque there is taken at the curve's end).

    Raises
    ------
    DrivetrainError
        When the ratios are not a valid set.
    CurveError
        When a shift speed or the band is invalid.

    Examples
    --------
    >>> from core.engine.curves import Interpolation, torque_curve_from_torque
    >>> c = torque_curve_from_torque([1000, 4000, 7000], [200, 300, 200],
    ...                              interpolation=Interpolation.LINEAR)
    >>> a = landing_analysis(c, [3.0, 2.0, 1.5], 6000.0)
    >>> a.landings.landing_rpm.tolist(), a.in_band.tolist()
    ([4000.0, 4500.0], [True, True])
    """
    landings = shift_landings(gear_ratios, shift_rpm)
    peak_torque = curve.peak_torque_rpm()
    peak_power = curve.peak_power_rpm()
    low, high = _band_rpm(band, curve, peak_torque, peak_power)
    landing = landings.landing_rpm
    notes: list[Notice] = []
    for code, off, where in (
        ("landing_below_curve", landing < curve.rpm_min, "land below"),
        ("shift_above_curve", landings.shift_rpm > curve.rpm_max, "start above"),
    ):
        if np.any(off):
            shifts = ", ".join(f"{g}-{g + 1}" for g in landings.from_gear[off].tolist())
            notes.append(
                Notice(
                    code,
                    f"Shifts {shifts} {where} the sampled curve ({curve.rpm_min:g} to "
                    f"{curve.rpm_max:g} rpm); torque there is taken at the curve's nearest "
                    "end, not extrapolated.",
                    "shift_rpm",
                )
            )
    to_torque = landing - peak_torque
    to_power = landing - peak_power
    return LandingAnalysis(
        landings=landings,
        peak_torque_rpm=peak_torque,
        peak_power_rpm=peak_power,
        from_torque_peak_rpm=to_torque,
        from_torque_peak_percent=100.0 * to_torque / peak_torque,
        from_power_peak_rpm=to_power,
        from_power_peak_percent=100.0 * to_power / peak_power,
        band_low_rpm=low,
        band_high_rpm=high,
        in_band=(landing >= low) & (landing <= high),
        landing_torque_nm=curve.torque_at(landing),
        landing_power_w=curve.power_at(landing),
        notices=tuple(notes),
    )
