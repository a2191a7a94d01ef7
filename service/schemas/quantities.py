"""Every unit-bearing limit of the API, defined once in SI (see :mod:`service.bounds`).

Each alias is a number in the caller's units whose range is checked after conversion, so
a limit means the same physical thing in `metric` and `us`. The atmosphere and dyno-cell
ranges are core's own, so the edge and the computation agree.
"""

from __future__ import annotations

from typing import Annotated

from core.air.altimeter import ALTIMETER_RANGE_PA, ELEVATION_RANGE_M
from core.air.atmosphere import AIR_PRESSURE_RANGE_PA, AIR_TEMPERATURE_RANGE_K, ALTITUDE_RANGE_M
from core.engine.correction import CELL_TEMPERATURE_RANGE_K, STATION_PRESSURE_RANGE_PA
from core.units import STANDARD_GRAVITY_M_S2
from service.bounds import SiLimits
from service.units import Quantity

__all__ = [
    "MAX_CURVE_POWER_W",
    "MAX_CURVE_TORQUE_NM",
    "MAX_RUN_DISTANCE_M",
    "MAX_SPEED_M_S",
    "AirPressure",
    "AirTemperature",
    "AltimeterSetting",
    "Altitude",
    "CellTemperature",
    "CoastDownF0",
    "CoastDownF1",
    "CoastDownF2",
    "CurvePower",
    "CurveTorque",
    "DragArea",
    "Elevation",
    "FixedLoss",
    "FrontalArea",
    "Inertia",
    "KFactor",
    "LogAcceleration",
    "LogSpeed",
    "Mass",
    "OdometerDistance",
    "RoadSpeed",
    "RoadSpeedOrZero",
    "Rollout",
    "RunDistance",
    "StationPressure",
    "TireDiameter",
    "VehicleHeight",
    "VehicleLength",
    "WheelInertia",
]

MAX_SPEED_M_S = 500.0 / 3.6
"""Highest road speed accepted anywhere [m/s]: 500 km/h, 310.7 mph."""
MAX_RUN_DISTANCE_M = 5000.0
"""Longest distance timed [m] (16404 ft; a standing mile is 1609.344 m)."""
MAX_CURVE_TORQUE_NM = 100_000.0
"""Largest curve torque [N*m]."""
MAX_CURVE_POWER_W = 100_000_000.0
"""Largest curve power [W]."""

CurveTorque = Annotated[float, SiLimits(Quantity.TORQUE, ge=0.0, le=MAX_CURVE_TORQUE_NM)]
CurvePower = Annotated[float, SiLimits(Quantity.POWER, ge=0.0, le=MAX_CURVE_POWER_W)]
FixedLoss = Annotated[float, SiLimits(Quantity.POWER, ge=0.0, le=500_000.0)]
TireDiameter = Annotated[float, SiLimits(Quantity.LENGTH, gt=0.0, le=5.0)]
Mass = Annotated[float, SiLimits(Quantity.MASS, gt=0.0, le=60_000.0)]
VehicleLength = Annotated[float, SiLimits(Quantity.LENGTH, gt=0.0, le=20.0)]
VehicleHeight = Annotated[float, SiLimits(Quantity.LENGTH, gt=0.0, le=5.0)]
FrontalArea = Annotated[float, SiLimits(Quantity.AREA, gt=0.0, le=30.0)]
DragArea = Annotated[float, SiLimits(Quantity.AREA, ge=0.0, le=30.0)]
CoastDownF0 = Annotated[float, SiLimits(Quantity.FORCE, ge=0.0, le=20_000.0)]
CoastDownF1 = Annotated[float, SiLimits(Quantity.FORCE_PER_SPEED, ge=0.0, le=500.0)]
CoastDownF2 = Annotated[float, SiLimits(Quantity.FORCE_PER_SPEED_SQUARED, ge=0.0, le=30.0)]
Inertia = Annotated[float, SiLimits(Quantity.INERTIA, ge=0.0, le=10.0)]
WheelInertia = Annotated[float, SiLimits(Quantity.INERTIA, ge=0.0, le=200.0)]
KFactor = Annotated[float, SiLimits(Quantity.K_FACTOR, gt=0.0, le=2000.0)]
AirTemperature = Annotated[
    float,
    SiLimits(Quantity.TEMPERATURE, ge=AIR_TEMPERATURE_RANGE_K[0], le=AIR_TEMPERATURE_RANGE_K[1]),
]
AirPressure = Annotated[
    float,
    SiLimits(Quantity.PRESSURE, ge=AIR_PRESSURE_RANGE_PA[0], le=AIR_PRESSURE_RANGE_PA[1]),
]
Altitude = Annotated[
    float, SiLimits(Quantity.DISTANCE, ge=ALTITUDE_RANGE_M[0], le=ALTITUDE_RANGE_M[1])
]
CellTemperature = Annotated[
    float,
    SiLimits(Quantity.TEMPERATURE, ge=CELL_TEMPERATURE_RANGE_K[0], le=CELL_TEMPERATURE_RANGE_K[1]),
]
StationPressure = Annotated[
    float,
    SiLimits(Quantity.PRESSURE, ge=STATION_PRESSURE_RANGE_PA[0], le=STATION_PRESSURE_RANGE_PA[1]),
]
AltimeterSetting = Annotated[
    float,
    SiLimits(Quantity.PRESSURE, ge=ALTIMETER_RANGE_PA[0], le=ALTIMETER_RANGE_PA[1]),
]
Elevation = Annotated[
    float, SiLimits(Quantity.DISTANCE, ge=ELEVATION_RANGE_M[0], le=ELEVATION_RANGE_M[1])
]
RoadSpeed = Annotated[float, SiLimits(Quantity.SPEED, gt=0.0, le=MAX_SPEED_M_S)]
RoadSpeedOrZero = Annotated[float, SiLimits(Quantity.SPEED, ge=0.0, le=MAX_SPEED_M_S)]
RunDistance = Annotated[float, SiLimits(Quantity.DISTANCE, gt=0.0, le=MAX_RUN_DISTANCE_M)]
Rollout = Annotated[float, SiLimits(Quantity.LENGTH, ge=0.0, le=2.0)]
OdometerDistance = Annotated[float, SiLimits(Quantity.ODOMETER, ge=0.0, le=1e10)]
LogSpeed = Annotated[
    float,
    SiLimits(
        Quantity.SPEED,
        ge=0.0,
        le=600.0 / 3.6,
        unit_field="speed_unit",
        choices=("km/h", "mph", "m/s"),
    ),
]
LogAcceleration = Annotated[
    float,
    SiLimits(
        None,
        ge=-50 * STANDARD_GRAVITY_M_S2,
        le=50 * STANDARD_GRAVITY_M_S2,
        unit_field="acceleration_unit",
        choices=("g", "m/s^2"),
        si_unit="m/s^2",
    ),
]
