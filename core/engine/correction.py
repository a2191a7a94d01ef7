"""Dyno correction of observed torque or power to a standard's reference air.

An engine breathing thin, warm or humid air makes less power than in the reference air of
a rating standard. Each standard gives a correction factor ``CF``; corrected torque (or
power) is ``CF`` times the observed value.

Formulas
--------
``T`` is the air temperature [K], ``p_d`` the dry-air pressure (station pressure less the
water-vapour pressure), ``p`` the total station pressure.

* SAE J1349 (JUN90): ``CF = 1.18 * (99/p_d) * sqrt(T/298) - 0.18``, ``p_d`` [kPa].
* SAE J1349 (AUG2004): the same form with 1.176 and 0.176 (constants from memory).
* SAE J607 (small engines, 60 F and 29.92 inHg dry): ``CF = 29.92/(p_b - p_v) *
  sqrt((t_F + 459.7)/519.7)``, pressures [inHg], ``t_F`` [F]; evaluated as printed, with
  ``t_F`` converted exactly from ``T``.
* DIN 70020: ``CF = (1013/p) * sqrt(T/293)``, total pressure ``p`` [mbar]. The standard
  writes the absolute temperature as ``273 + t``; this module uses the kelvin temperature
  given, as the J1349 and ISO formulas do with 298 (so 20 C = 293.15 K gives a factor
  1.00026, not 1; the difference is below 3e-4 everywhere).
* ISO 1585 / EEC 80/1269 (spark ignition): ``alpha = (99/p_d)**1.2 * (T/298)**0.6``,
  ``p_d`` [kPa] (exponents as printed in the Bosch Automotive Handbook, 5th ed., p. 415).
  The factor is valid for ``0.93 <= alpha <= 1.07`` (from memory); a factor outside that
  band is still returned, flagged in ``within_validity`` and a notice.

The water-vapour pressure is ``relative_humidity`` times the saturation vapour pressure of
Buck (1996), from :func:`core.air.atmosphere.air_state`.

A station pressure may be given directly or as an altimeter setting with the station
elevation (converted by :func:`core.air.altimeter.station_pressure_from_altimeter_pa`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from core.air.altimeter import station_pressure_from_altimeter_pa
from core.air.atmosphere import air_state
from core.checks import require_range
from core.engine.curves import TorqueCurve
from core.engine.reference_air import CorrectionStandard
from core.errors import CorrectionError
from core.notices import Notice
from core.units import HECTOPASCAL_PA, INCH_OF_MERCURY_PA, KILOPASCAL_PA, ZERO_CELSIUS_K

__all__ = [
    "CELL_TEMPERATURE_RANGE_K",
    "STATION_PRESSURE_RANGE_PA",
    "Correction",
    "apply_correction",
    "correction_factor",
    "correction_factors",
]

# Conventional inch of mercury: 25.4 mm x 13595.1 kg/m^3 x 9.80665 m/s^2 (NIST SP 811).

CELL_TEMPERATURE_RANGE_K = (233.15, 333.15)
"""Intake-air temperature accepted [K]: -40 degC (-40 degF) to 60 degC (140 degF)."""
STATION_PRESSURE_RANGE_PA = (50_000.0, 110_000.0)
"""Station pressure accepted [Pa]."""
_TEMPERATURE_RANGE_K = CELL_TEMPERATURE_RANGE_K
_STATION_PRESSURE_RANGE_PA = STATION_PRESSURE_RANGE_PA
_FACTOR_RANGE = (0.0, 3.0)
_ISO_1585_VALID_BAND = (0.93, 1.07)  # memory


@dataclass(frozen=True)
class Correction:
    """A correction factor and the air it was computed for.

    Attributes
    ----------
    standard : CorrectionStandard
        The standard whose formula gave ``factor``.
    factor : float
        Correction factor [-]: corrected = factor * observed, for torque and power alike.
    temperature_k : float
        Air temperature [K].
    station_pressure_pa : float
        Total pressure at the dyno [Pa] (from the altimeter setting when one was given).
    vapour_pressure_pa : float
        Partial pressure of water vapour [Pa].
    dry_pressure_pa : float
        Dry-air pressure, ``station_pressure_pa - vapour_pressure_pa`` [Pa].
    within_validity : bool
        False when the factor or the air lies outside a range the standard states.
    notices : tuple of Notice
        One notice per range exceeded.
    """

    standard: CorrectionStandard
    factor: float
    temperature_k: float
    station_pressure_pa: float
    vapour_pressure_pa: float
    dry_pressure_pa: float
    within_validity: bool
    notices: tuple[Notice, ...]


def _station_pressure(
    station_pressure_pa: float | None,
    altimeter_setting_pa: float | None,
    elevation_m: float | None,
) -> float:
    """Resolve the two ways of giving the pressure into one station pressure [Pa]."""
    if station_pressure_pa is not None:
        if altimeter_setting_pa is not None:
            raise CorrectionError(
                "only one of `station_pressure_pa` and `altimeter_setting_pa` may be given, "
                "got both",
                parameter="altimeter_setting_pa",
            )
        if elevation_m is not None:
            raise CorrectionError(
                "`elevation_m` must be given only with `altimeter_setting_pa`",
                parameter="elevation_m",
            )
        require_range(
            station_pressure_pa,
            "station_pressure_pa",
            *_STATION_PRESSURE_RANGE_PA,
            CorrectionError,
        )
        return float(station_pressure_pa)
    if altimeter_setting_pa is None:
        raise CorrectionError(
            "one of `station_pressure_pa` and `altimeter_setting_pa` must be given, got neither",
            parameter="station_pressure_pa",
        )
    if elevation_m is None:
        raise CorrectionError(
            "`elevation_m` must be given with `altimeter_setting_pa`", parameter="elevation_m"
        )
    pressure = station_pressure_from_altimeter_pa(altimeter_setting_pa, elevation_m)
    require_range(pressure, "station_pressure_pa", *_STATION_PRESSURE_RANGE_PA, CorrectionError)
    return pressure


def _formula(standard: CorrectionStandard, t_k: float, p_pa: float, p_dry_pa: float) -> float:
    """The bare correction formula of a standard."""
    match standard:
        case CorrectionStandard.SAE_J1349_1990:
            return 1.18 * (99.0 / (p_dry_pa / KILOPASCAL_PA)) * math.sqrt(t_k / 298.0) - 0.18
        case CorrectionStandard.SAE_J1349_2004:
            return 1.176 * (99.0 / (p_dry_pa / KILOPASCAL_PA)) * math.sqrt(t_k / 298.0) - 0.176
        case CorrectionStandard.SAE_J607:
            t_f = (t_k - ZERO_CELSIUS_K) * 1.8 + 32.0
            return 29.92 / (p_dry_pa / INCH_OF_MERCURY_PA) * math.sqrt((t_f + 459.7) / 519.7)
        case CorrectionStandard.DIN_70020:
            return (1013.0 / (p_pa / HECTOPASCAL_PA)) * math.sqrt(t_k / 293.0)
        case CorrectionStandard.ISO_1585:
            return float((99.0 / (p_dry_pa / KILOPASCAL_PA)) ** 1.2 * (t_k / 298.0) ** 0.6)
    raise CorrectionError(  # pragma: no cover - every member is matched above
        f"`standard` must be a CorrectionStandard, got {standard!r}", parameter="standard"
    )


def _validity_notices(standard: CorrectionStandard, factor: float) -> tuple[Notice, ...]:
    """Notices for each range the standard states and the result exceeds."""
    low, high = _ISO_1585_VALID_BAND
    if standard is CorrectionStandard.ISO_1585 and not low <= factor <= high:
        return (
            Notice(
                "correction_factor_out_of_range",
                f"The ISO 1585 factor {factor:.4f} lies outside its validity band "
                f"{low:g}..{high:g}; the test air is too far from the reference air for the "
                "correction to be trusted.",
                "standard",
            ),
        )
    return ()


def correction_factor(
    standard: CorrectionStandard,
    temperature_k: float,
    relative_humidity: float,
    *,
    station_pressure_pa: float | None = None,
    altimeter_setting_pa: float | None = None,
    elevation_m: float | None = None,
) -> Correction:
    """The correction factor of one standard for the air at the dyno.

    Give either ``station_pressure_pa``, or ``altimeter_setting_pa`` with ``elevation_m``.

    Parameters
    ----------
    standard : CorrectionStandard
        The rating standard.
    temperature_k : float
        Air temperature at the engine intake [K], 240..330.
    relative_humidity : float
        Relative humidity over liquid water [-], 0..1.
    station_pressure_pa : float, optional
        Total (barometric) pressure at the dyno [Pa], 50 000..110 000.
    altimeter_setting_pa : float, optional
        Altimeter setting [Pa], 85 000..110 000, converted to station pressure with
        :func:`core.air.altimeter.station_pressure_from_altimeter_pa`.
    elevation_m : float, optional
        Station elevation [m], -500..6000; only with ``altimeter_setting_pa``.

    Returns
    -------
    Correction
        The factor, the partial pressures and any validity notice.

    Raises
    ------
    CorrectionError
        If an argument is out of range, or the pressure is given both ways or not at all.

    Examples
    --------
    >>> c = correction_factor(CorrectionStandard.SAE_J1349_1990, 303.15, 0.5,
    ...                       station_pressure_pa=95_000.0)
    >>> round(c.factor, 5), round(c.dry_pressure_pa)
    (1.08861, 92877)
    """
    if not isinstance(standard, CorrectionStandard):
        raise CorrectionError(
            f"`standard` must be a CorrectionStandard, got {standard!r}", parameter="standard"
        )
    require_range(temperature_k, "temperature_k", *_TEMPERATURE_RANGE_K, CorrectionError)
    require_range(relative_humidity, "relative_humidity", 0.0, 1.0, CorrectionError)
    pressure = _station_pressure(station_pressure_pa, altimeter_setting_pa, elevation_m)
    air = air_state(float(temperature_k), float(relative_humidity), pressure_pa=pressure)
    factor = _formula(standard, air.temperature_k, air.pressure_pa, air.dry_pressure_pa)
    notices = _validity_notices(standard, factor)
    return Correction(
        standard=standard,
        factor=factor,
        temperature_k=air.temperature_k,
        station_pressure_pa=air.pressure_pa,
        vapour_pressure_pa=air.vapour_pressure_pa,
        dry_pressure_pa=air.dry_pressure_pa,
        within_validity=not notices,
        notices=notices,
    )


def correction_factors(
    temperature_k: float,
    relative_humidity: float,
    *,
    station_pressure_pa: float | None = None,
    altimeter_setting_pa: float | None = None,
    elevation_m: float | None = None,
) -> dict[CorrectionStandard, Correction]:
    """The correction factor of every standard for the same air.

    Parameters
    ----------
    temperature_k, relative_humidity, station_pressure_pa, altimeter_setting_pa, elevation_m
        As for :func:`correction_factor`.

    Returns
    -------
    dict of CorrectionStandard to Correction
        One entry per standard, in the order of :class:`CorrectionStandard`.

    Raises
    ------
    CorrectionError
        As for :func:`correction_factor`.

    Examples
    --------
    >>> all_cf = correction_factors(303.15, 0.5, station_pressure_pa=95_000.0)
    >>> round(all_cf[CorrectionStandard.DIN_70020].factor, 5)
    1.08463
    """
    return {
        standard: correction_factor(
            standard,
            temperature_k,
            relative_humidity,
            station_pressure_pa=station_pressure_pa,
            altimeter_setting_pa=altimeter_setting_pa,
            elevation_m=elevation_m,
        )
        for standard in CorrectionStandard
    }


def apply_correction(curve: TorqueCurve, factor: Correction | float) -> TorqueCurve:
    """A new curve with the torque multiplied by a correction factor.

    Power scales by the same factor, since it is torque times angular speed.

    Parameters
    ----------
    curve : TorqueCurve
        Observed torque curve; its rpm, interpolation and source are kept.
    factor : Correction or float
        A :class:`Correction`, or a bare factor [-] in (0, 3].

    Returns
    -------
    TorqueCurve
        The corrected curve.

    Raises
    ------
    CorrectionError
        If the factor is not finite or lies outside (0, 3].

    Examples
    --------
    >>> from core.engine.curves import torque_curve_from_torque
    >>> c = apply_correction(torque_curve_from_torque([1000, 2000, 3000], [100, 120, 110]), 1.05)
    >>> [round(t, 6) for t in c.torque_nm.tolist()]
    [105.0, 126.0, 115.5]
    """
    value = factor.factor if isinstance(factor, Correction) else float(factor)
    low, high = _FACTOR_RANGE
    if not math.isfinite(value):
        raise CorrectionError(f"`factor` must be finite, got {value}", parameter="factor")
    if not low < value <= high:
        raise CorrectionError(
            f"`factor` must lie in ({low:g}, {high:g}], got {value:g}", parameter="factor"
        )
    return TorqueCurve(
        curve.rpm.copy(),
        curve.torque_nm * value,
        interpolation=curve.interpolation,
        source=curve.source,
    )
