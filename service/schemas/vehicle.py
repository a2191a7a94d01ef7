"""Vehicle, air and launch inputs of the acceleration model."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from core.car.vehicle import MIN_FRICTION_COEFFICIENT
from service.schemas.common import ApiModel, schema_rules
from service.schemas.inputs import MAX_GEARS
from service.schemas.quantities import (
    AirPressure,
    AirTemperature,
    Altitude,
    CoastDownF0,
    CoastDownF1,
    CoastDownF2,
    DragArea,
    FrontalArea,
    Inertia,
    KFactor,
    Mass,
    VehicleHeight,
    VehicleLength,
    WheelInertia,
)

__all__ = ["AirIn", "ConverterIn", "InertiaIn", "LaunchIn", "RoadLoadIn", "VehicleIn"]


class AirIn(ApiModel):
    """Ambient air, for the density in aerodynamic drag. Default: ISO standard sea level."""

    model_config = ConfigDict(json_schema_extra=schema_rules(exclusive=[("pressure", "altitude")]))

    temperature: AirTemperature | None = Field(
        None,
        description="Air temperature [degC | degF]; default 15 degC, 59 degF (ISO 2533 sea "
        "level).",
    )
    pressure: AirPressure | None = Field(
        None, description="Station (absolute) pressure [kPa | inHg]."
    )
    altitude: Altitude | None = Field(
        None,
        description="Altitude [m | ft], for the ISO 2533 standard pressure when no "
        "`pressure` is given.",
    )
    relative_humidity: float = Field(0.0, ge=0, le=100, description="Relative humidity [%].")

    @model_validator(mode="after")
    def _pressure_or_altitude(self) -> Self:
        if self.pressure is not None and self.altitude is not None:
            raise ValueError("give `pressure` or `altitude`, not both")
        return self


class RoadLoadIn(ApiModel):
    """Resistance: drag (Cd and frontal area, or CdA) plus rolling, or coast-down terms."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(
            any_form=[("drag_area",), ("drag_coefficient", "frontal_area"), ("coast_down",)],
            exclusive=[
                ("drag_area", "drag_coefficient"),
                *(
                    ("coast_down", name)
                    for name in (
                        "drag_coefficient",
                        "frontal_area",
                        "drag_area",
                        "rolling_coefficient",
                    )
                ),
            ],
        )
    )

    drag_coefficient: float | None = Field(None, ge=0, le=3, description="Cd [-].")
    frontal_area: FrontalArea | None = Field(None, description="Frontal area [m^2 | ft^2].")
    drag_area: DragArea | None = Field(
        None, description="Cd times frontal area, CdA [m^2 | ft^2]."
    )
    rolling_coefficient: float | None = Field(
        None,
        ge=0,
        le=0.3,
        description="Constant rolling-resistance coefficient [-]; default 0.0041 + "
        "0.000041 per mph of speed (radial tires, Gillespie ch. 4).",
    )
    coast_down: tuple[CoastDownF0, CoastDownF1, CoastDownF2] | None = Field(
        None,
        description="Road-load coefficients F0, F1, F2 of F = F0 + F1*v + F2*v^2 "
        "[N, N/(km/h), N/(km/h)^2 | lbf, lbf/mph, lbf/mph^2], replacing drag and rolling.",
    )
    grade_percent: float = Field(0.0, ge=-30, le=30, description="Road grade [%], uphill +.")

    @model_validator(mode="after")
    def _one_form(self) -> Self:
        aero = (self.drag_coefficient, self.frontal_area, self.drag_area)
        if self.coast_down is not None:
            if any(x is not None for x in (*aero, self.rolling_coefficient)):
                raise ValueError("`coast_down` replaces drag and rolling terms; give one form")
            return self
        if self.drag_area is None and (self.drag_coefficient is None or self.frontal_area is None):
            raise ValueError(
                "give `drag_area`, or `drag_coefficient` with `frontal_area`, or `coast_down`"
            )
        if self.drag_area is not None and self.drag_coefficient is not None:
            raise ValueError("give `drag_area` or `drag_coefficient`, not both")
        return self


class InertiaIn(ApiModel):
    """Rotating inertias [kg*m^2 | lb*ft^2]; omit for the mass-factor estimate."""

    engine: Inertia = Field(description="Engine, flywheel/converter, clutch [kg*m^2 | lb*ft^2].")
    driveshaft: Inertia = Field(0.0, description="Driveshaft [kg*m^2 | lb*ft^2].")
    wheels: WheelInertia = Field(description="All wheels and tires together [kg*m^2 | lb*ft^2].")


class VehicleIn(ApiModel):
    """The car: mass, axle geometry, grip, road load, rotating parts."""

    mass: Mass = Field(description="Test mass with driver and fuel [kg | lb].")
    front_weight_share: float = Field(
        0.55, ge=0.05, le=0.95, description="Static share of weight on the front axle [-]."
    )
    wheelbase: VehicleLength = Field(description="Wheelbase [mm | in].")
    cg_height: VehicleHeight = Field(description="Centre-of-gravity height [mm | in].")
    drive: Literal["rear", "front", "all"] = Field("rear", description="Driven axles.")
    front_torque_share: float | None = Field(
        None, ge=0, le=1, description="All-wheel drive: share of torque to the front [-]."
    )
    friction_coefficient: float = Field(
        1.0,
        ge=MIN_FRICTION_COEFFICIENT,
        le=5,
        description="Peak tire-road friction coefficient [-]; from 0.05 (glare ice).",
    )
    road_load: RoadLoadIn
    air: AirIn = Field(default_factory=AirIn)
    inertia: InertiaIn | None = Field(
        None, description="Rotating inertias; omitted: mass factor 1.04 + 0.0025*N^2."
    )

    @model_validator(mode="after")
    def _split(self) -> Self:
        if (self.drive == "all") != (self.front_torque_share is not None):
            raise ValueError("`front_torque_share` is given with, and only with, `drive: all`")
        return self


class ConverterIn(ApiModel):
    """A torque converter: stall data, or tables over speed ratio."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(
            ("stall_rpm",), ("k_factor",), ("speed_ratio", "k_factor_table", "torque_ratio_table")
        )
    )

    stall_rpm: float | None = Field(
        None, gt=0, le=15000, description="Stall speed [rpm] on this engine's curve."
    )
    k_factor: KFactor | None = Field(
        None,
        description="K-factor at stall [rpm/sqrt(N*m) | rpm/sqrt(lbf*ft)].",
    )
    stall_torque_ratio: float = Field(2.0, ge=1, le=5, description="Torque ratio at stall.")
    coupling_speed_ratio: float = Field(
        0.87, gt=0.3, lt=1, description="Speed ratio where torque ratio reaches 1."
    )
    speed_ratio: list[float] | None = Field(
        None, min_length=2, max_length=64, description="Table: speed ratios, 0 to 1 ascending."
    )
    k_factor_table: list[KFactor] | None = Field(
        None,
        min_length=2,
        max_length=64,
        description="Table: K-factor at each speed ratio [rpm/sqrt(N*m) | rpm/sqrt(lbf*ft)].",
    )
    torque_ratio_table: list[float] | None = Field(
        None, min_length=2, max_length=64, description="Table: torque ratio at each speed ratio."
    )

    @model_validator(mode="after")
    def _one_description(self) -> Self:
        tables = (self.speed_ratio, self.k_factor_table, self.torque_ratio_table)
        if any(t is not None for t in tables):
            if any(t is None for t in tables) or self.stall_rpm is not None or self.k_factor:
                raise ValueError(
                    "tables need `speed_ratio`, `k_factor_table` and `torque_ratio_table`, "
                    "without `stall_rpm` or `k_factor`"
                )
            return self
        if (self.stall_rpm is None) == (self.k_factor is None):
            raise ValueError("give exactly one of `stall_rpm` or `k_factor`, or the tables")
        return self


class LaunchIn(ApiModel):
    """How the drive is taken up, and how long a shift takes."""

    coupling: Literal["clutch", "converter"] = Field("clutch")
    launch_rpm: float = Field(
        3000.0, ge=300, le=30000, description="Clutch: engine speed held while it slips [rpm]."
    )
    converter: ConverterIn | None = None
    lockup_gears: list[Annotated[int, Field(ge=1, le=MAX_GEARS)]] = Field(
        default_factory=list,
        max_length=MAX_GEARS,
        description="Gears (1 = first) where the converter's lock-up clutch closes.",
    )
    shift_time: float = Field(
        0.25, ge=0, le=5, description="Time without drive during each upshift [s]."
    )

    @model_validator(mode="after")
    def _converter(self) -> Self:
        if (self.coupling == "converter") != (self.converter is not None):
            raise ValueError("`converter` is given with, and only with, `coupling: converter`")
        return self
