"""Weather at the strip: density altitude, and a time slip carried from one weather to another.

Density altitude is the altitude of the ISO 2533 standard atmosphere (troposphere:
``T = T0 - L*h``, ``rho = rho0*(T/T0)**(g*M/(R*L) - 1)``) whose density equals the air's
actual density, water vapour included; strips report it so because air density is what
both the engine and the drag feel.

A slip is carried to other weather by re-running the car in both: the engine curve is
taken as given at the chosen dyno standard's reference air, so in any weather the engine
makes ``curve / CF`` (``CF`` the standard's correction factor for that air, see
:mod:`core.engine.correction`); the aerodynamic term of the road load scales with air density.
The predicted slip is the measured one plus the simulated change (elapsed time) or times
the simulated ratio (trap speed). Limits: tire grip, track preparation, wind, fuel and
intake temperature are taken as unchanged, and the standard's factor is a rating
convention, not a model of a particular engine (turbocharged engines differ most).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from core.air.atmosphere import air_density_kg_m3
from core.engine.correction import correction_factor
from core.engine.curves import TorqueCurve
from core.engine.reference_air import CorrectionStandard
from core.errors import CorrectionError
from core.notices import Notice
from core.runs.drive_model import DriveModel, drive_model
from core.runs.milestones import STANDARD_ROLLOUT_M
from core.runs.performance import ShiftCriterion, planned_shift_rpm
from core.runs.report import run_report
from core.units import ISO_LAPSE_RATE_K_PER_M, ISO_SEA_LEVEL_TEMPERATURE_K, STANDARD_GRAVITY_M_S2

__all__ = [
    "ISO_SEA_LEVEL_DENSITY_KG_M3",
    "SlipPrediction",
    "Weather",
    "WeatherAir",
    "density_altitude_m",
    "predict_slip",
    "weather_air",
]

ISO_SEA_LEVEL_DENSITY_KG_M3 = 1.225
"""ISO 2533 sea-level density [kg/m^3]."""
_M_AIR = 0.0289644
_R = 8.31447
_EARTH_RADIUS_M = 6356766.0  # ISO 2533 / US Standard Atmosphere 1976
_EXPONENT = STANDARD_GRAVITY_M_S2 * _M_AIR / (_R * ISO_LAPSE_RATE_K_PER_M) - 1.0
"""``g*M/(R*L) - 1`` = 4.2559 of the ISO 2533 troposphere [-]."""


@dataclass(frozen=True)
class Weather:
    """Air at the strip.

    Attributes
    ----------
    temperature_k : float
        Air temperature [K].
    pressure_pa : float
        Station (absolute, uncorrected) pressure [Pa].
    relative_humidity : float
        Relative humidity [0..1].
    """

    temperature_k: float
    pressure_pa: float
    relative_humidity: float = 0.0


@dataclass(frozen=True)
class WeatherAir:
    """What the strip reports about its air.

    Attributes
    ----------
    weather : Weather
    density_kg_m3 : float
        Moist-air density [kg/m^3].
    density_altitude_m : float
        ISO 2533 altitude of the same density [m].
    relative_density : float
        Density over ISO sea level [-].
    correction_factor : float
        The standard's factor: reference power over power in this air [-].
    notices : tuple of Notice
        The standard's validity notices for this air.
    """

    weather: Weather
    density_kg_m3: float
    density_altitude_m: float
    relative_density: float
    correction_factor: float
    notices: tuple[Notice, ...] = ()


@dataclass(frozen=True)
class SlipPrediction:
    """A time slip carried from one weather to another.

    Attributes
    ----------
    taken_in, predict_for : WeatherAir
    simulated_et_s, simulated_trap_m_s : tuple of 2 floats
        Simulated elapsed time [s] and trap speed [m/s] in each weather.
    predicted_et_s, predicted_trap_m_s : float
        The slip in ``predict_for`` [s, m/s].
    """

    taken_in: WeatherAir
    predict_for: WeatherAir
    simulated_et_s: tuple[float, float]
    simulated_trap_m_s: tuple[float, float]
    predicted_et_s: float
    predicted_trap_m_s: float


def density_altitude_m(density_kg_m3: float) -> float:
    """ISO 2533 altitude whose standard density equals ``density_kg_m3`` [m].

    The troposphere formula gives a geopotential altitude ``H``; the answer is the geometric
    altitude ``Z = r*H/(r - H)``, ``r = 6 356 766 m``, as altimeters and maps read.

    Examples
    --------
    >>> round(density_altitude_m(1.225), 6)
    0.0
    """
    if not 0.3 <= density_kg_m3 <= 1.6:
        raise CorrectionError(
            f"`density_kg_m3` must lie in [0.3, 1.6], got {density_kg_m3:g}",
            parameter="density_kg_m3",
        )
    ratio = density_kg_m3 / ISO_SEA_LEVEL_DENSITY_KG_M3
    scale_m = ISO_SEA_LEVEL_TEMPERATURE_K / ISO_LAPSE_RATE_K_PER_M
    geopotential = scale_m * (1.0 - ratio ** (1.0 / _EXPONENT))
    return float(_EARTH_RADIUS_M * geopotential / (_EARTH_RADIUS_M - geopotential))


def weather_air(weather: Weather, standard: CorrectionStandard) -> WeatherAir:
    """Density, density altitude and the standard's correction factor of one weather."""
    corr = correction_factor(
        standard,
        weather.temperature_k,
        weather.relative_humidity,
        station_pressure_pa=weather.pressure_pa,
    )
    rho = air_density_kg_m3(weather.pressure_pa, weather.temperature_k, weather.relative_humidity)
    return WeatherAir(
        weather,
        rho,
        density_altitude_m(rho),
        rho / ISO_SEA_LEVEL_DENSITY_KG_M3,
        corr.factor,
        corr.notices,
    )


def _in_weather(model: DriveModel, air: WeatherAir, model_density_kg_m3: float) -> DriveModel:
    curve = TorqueCurve(
        model.curve.rpm,
        model.curve.torque_nm / air.correction_factor,
        model.curve.interpolation,
        model.curve.source,
    )
    load = model.vehicle.road_load
    load = dataclasses.replace(
        load, quadratic_n_s2_m2=load.quadratic_n_s2_m2 * air.density_kg_m3 / model_density_kg_m3
    )
    vehicle = dataclasses.replace(model.vehicle, road_load=load)
    return drive_model(
        curve,
        model.drivetrain,
        model.tire,
        vehicle,
        model.launch,
        rev_limit_rpm=model.rev_limit_rpm,
    )


def predict_slip(
    model: DriveModel,
    model_density_kg_m3: float,
    taken_in: Weather,
    predict_for: Weather,
    standard: CorrectionStandard,
    *,
    finish_distance_m: float,
    rollout_m: float = STANDARD_ROLLOUT_M,
    measured_et_s: float | None = None,
    measured_trap_m_s: float | None = None,
) -> SlipPrediction:
    """A slip taken in one weather, predicted for another by re-running the car in both.

    Parameters
    ----------
    model : DriveModel
        The car, its curve at the standard's reference air and its road load at
        ``model_density_kg_m3``.
    model_density_kg_m3 : float
        Air density the road load's aerodynamic term was built for [kg/m^3].
    taken_in, predict_for : Weather
    standard : CorrectionStandard
        Dyno standard the curve refers to.
    finish_distance_m, rollout_m : float
        Finish from the clock start and rollout [m].
    measured_et_s, measured_trap_m_s : float, optional
        The slip [s, m/s]; omitted, the simulated figures stand in.

    Returns
    -------
    SlipPrediction
    """
    airs = (weather_air(taken_in, standard), weather_air(predict_for, standard))
    ets, traps = [], []
    for air in airs:
        m = _in_weather(model, air, model_density_kg_m3)
        rep = run_report(
            m,
            planned_shift_rpm(m, ShiftCriterion.NET_ACCELERATION),
            rollout_m=rollout_m,
            finish_distance_m=finish_distance_m,
        )
        finish = rep.finish
        trap = getattr(finish, "trap_speed_m_s", None)
        ets.append(float(finish.elapsed_s) if finish.elapsed_s is not None else float("nan"))
        traps.append(float(trap) if trap is not None else float("nan"))
    if not np.all(np.isfinite(ets + traps)):
        raise CorrectionError("the car does not reach the finish", parameter="finish_distance_m")
    et_a = ets[0] if measured_et_s is None else measured_et_s
    trap_a = traps[0] if measured_trap_m_s is None else measured_trap_m_s
    return SlipPrediction(
        airs[0],
        airs[1],
        (ets[0], ets[1]),
        (traps[0], traps[1]),
        et_a + ets[1] - ets[0],
        trap_a * traps[1] / traps[0],
    )
