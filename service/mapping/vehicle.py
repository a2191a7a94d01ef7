"""Build the core vehicle and launch from request models, in SI, naming fields on error."""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np

from core import (
    AxleGeometry,
    Coupling,
    DriveLayout,
    Launch,
    RoadLoad,
    RotatingInertia,
    TorqueConverter,
    TorqueCurve,
    Vehicle,
    air_state,
)
from core.units import ISO_SEA_LEVEL_TEMPERATURE_K
from service.mapping.inputs import DRIVETRAIN_FIELDS, ENGINE_FIELDS, core_fields
from service.schemas.vehicle import AirIn, LaunchIn, VehicleIn
from service.units import Quantity, UnitSystem, to_si

__all__ = [
    "CAR_FIELDS",
    "LAUNCH_FIELDS",
    "VEHICLE_FIELDS",
    "air_density",
    "build_launch",
    "build_vehicle",
]

VEHICLE_FIELDS: Mapping[str, str] = {
    "mass_kg": "vehicle.mass",
    "wheelbase_m": "vehicle.wheelbase",
    "cg_height_m": "vehicle.cg_height",
    "front_weight_share": "vehicle.front_weight_share",
    "front_torque_share": "vehicle.front_torque_share",
    "friction_coefficient": "vehicle.friction_coefficient",
    "drag_area_m2": "vehicle.road_load",
    "rolling_coefficient": "vehicle.road_load.rolling_coefficient",
    "f0_n": "vehicle.road_load.coast_down",
    "f1_n_s_m": "vehicle.road_load.coast_down",
    "f2_n_s2_m2": "vehicle.road_load.coast_down",
    "grade_percent": "vehicle.road_load.grade_percent",
    "temperature_k": "vehicle.air.temperature",
    "pressure_pa": "vehicle.air.pressure",
    "altitude_m": "vehicle.air.altitude",
    "relative_humidity": "vehicle.air.relative_humidity",
    "engine_kg_m2": "vehicle.inertia.engine",
    "driveshaft_kg_m2": "vehicle.inertia.driveshaft",
    "wheels_kg_m2": "vehicle.inertia.wheels",
}
LAUNCH_FIELDS: Mapping[str, str] = {
    "launch_rpm": "launch.launch_rpm",
    "shift_time_s": "launch.shift_time",
    "lockup_gears": "launch.lockup_gears",
    "converter": "launch.converter",
    "stall_k_factor": "launch.converter.k_factor",
    "stall_speed_rpm": "launch.converter.stall_rpm",
    "stall_engine_torque_nm": "launch.converter.stall_rpm",
    "stall_torque_ratio": "launch.converter.stall_torque_ratio",
    "coupling_speed_ratio": "launch.converter.coupling_speed_ratio",
    "speed_ratio": "launch.converter.speed_ratio",
    "k_factor": "launch.converter.k_factor_table",
    "torque_ratio": "launch.converter.torque_ratio_table",
}
# the whole car: engine, drivetrain, vehicle and launch, as most calculations take it
CAR_FIELDS: Mapping[str, str] = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
}


def air_density(air: AirIn, units: UnitSystem) -> float:
    """Density of the request's air [kg/m^3]: ISO 2533 sea level unless stated."""
    with core_fields(VEHICLE_FIELDS, units):
        temperature_k = (
            ISO_SEA_LEVEL_TEMPERATURE_K
            if air.temperature is None
            else to_si(air.temperature, Quantity.TEMPERATURE, units)
        )
        state = air_state(
            temperature_k,
            air.relative_humidity / 100.0,
            pressure_pa=None
            if air.pressure is None
            else to_si(air.pressure, Quantity.PRESSURE, units),
            altitude_m=None
            if air.pressure is not None
            else to_si(air.altitude or 0.0, Quantity.DISTANCE, units),
        )
    return state.density_kg_m3


def _road_load(body: VehicleIn, mass: float, density: float, units: UnitSystem) -> RoadLoad:
    """The road load: from coast-down coefficients, else drag and rolling in ``density``."""
    load = body.road_load
    if load.coast_down is not None:
        f0, f1, f2 = load.coast_down
        return RoadLoad.from_coast_down(
            mass,
            to_si(f0, Quantity.FORCE, units),
            to_si(f1, Quantity.FORCE_PER_SPEED, units),
            to_si(f2, Quantity.FORCE_PER_SPEED_SQUARED, units),
            grade_percent=load.grade_percent,
        )
    if load.drag_area is not None:
        cda = to_si(load.drag_area, Quantity.AREA, units)
    else:
        cda = float(load.drag_coefficient or 0.0) * to_si(
            float(load.frontal_area or 0.0), Quantity.AREA, units
        )
    if load.rolling_coefficient is None:
        return RoadLoad.from_speed_dependent_rolling(
            mass, cda, density, grade_percent=load.grade_percent
        )
    return RoadLoad.from_constant_rolling(
        mass, cda, density, load.rolling_coefficient, grade_percent=load.grade_percent
    )


def build_vehicle(body: VehicleIn, units: UnitSystem) -> Vehicle:
    """The core vehicle of a request's vehicle."""
    with core_fields(VEHICLE_FIELDS, units):
        mass = to_si(body.mass, Quantity.MASS, units)
        density = air_density(body.air, units)  # checked even where coast-down sets drag
        road = _road_load(body, mass, density, units)
        geometry = AxleGeometry.from_front_weight_share(
            to_si(body.wheelbase, Quantity.LENGTH, units),
            to_si(body.cg_height, Quantity.LENGTH, units),
            body.front_weight_share,
        )
        inertia = None
        if body.inertia is not None:
            j = Quantity.INERTIA
            inertia = RotatingInertia(
                to_si(body.inertia.engine, j, units),
                to_si(body.inertia.driveshaft, j, units),
                to_si(body.inertia.wheels, j, units),
            )
        return Vehicle(
            mass_kg=mass,
            road_load=road,
            geometry=geometry,
            layout=DriveLayout(body.drive),
            friction_coefficient=body.friction_coefficient,
            front_torque_share=body.front_torque_share,
            inertia=inertia,
        )


def build_launch(body: LaunchIn, curve: TorqueCurve, units: UnitSystem) -> Launch:
    """The core launch (clutch or converter) of a request's launch."""
    with core_fields(LAUNCH_FIELDS, units):
        converter = None
        if body.converter is not None:
            c = body.converter
            if c.speed_ratio is not None:
                converter = TorqueConverter(
                    speed_ratio=np.asarray(c.speed_ratio, dtype=np.float64),
                    k_factor=to_si(
                        np.asarray(c.k_factor_table, dtype=np.float64), Quantity.K_FACTOR, units
                    ),
                    torque_ratio=np.asarray(c.torque_ratio_table, dtype=np.float64),
                )
            elif c.k_factor is not None:
                converter = TorqueConverter.from_stall(
                    c.stall_torque_ratio,
                    stall_k_factor=to_si(c.k_factor, Quantity.K_FACTOR, units),
                    coupling_speed_ratio=c.coupling_speed_ratio,
                    lockup=False,
                )
            else:
                stall = float(c.stall_rpm or 0.0)
                converter = TorqueConverter.from_stall(
                    c.stall_torque_ratio,
                    stall_speed_rpm=stall,
                    stall_engine_torque_nm=float(curve.torque_at([stall])[0]),
                    coupling_speed_ratio=c.coupling_speed_ratio,
                    lockup=False,
                )
        return Launch(
            coupling=Coupling(body.coupling),
            launch_rpm=body.launch_rpm,
            converter=converter,
            lockup_gears=frozenset(body.lockup_gears),
            shift_time_s=body.shift_time,
        )
