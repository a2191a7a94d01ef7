"""Request and response of POST /v1/road-load/coast-down."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import Field, model_validator

from core.coastdown import MAX_RUNS, MIN_SAMPLES
from service.schemas.common import ApiModel, NoticeOut, Reference, UnitLabels, UnitsField
from service.schemas.vehicle import RoadLoadIn

__all__ = [
    "CoastDownRequest",
    "CoastDownResponse",
    "CoastDownRunIn",
    "CoastDownRunOut",
    "CoefficientOut",
    "ReferenceConditionsOut",
    "TestConditionsIn",
]

MAX_SAMPLES = 20000

Seconds = Annotated[float, Field(ge=0, le=1800)]
RoadSpeed = Annotated[float, Field(gt=0, le=500)]


class CoastDownRunIn(ApiModel):
    """One coast-down in neutral: time and road speed, sampled by a logger."""

    direction: Literal["out", "back"] = Field(
        "out",
        description="Direction along the road; runs `out` and `back` are averaged "
        "direction by direction, which cancels a steady grade and wind.",
    )
    time: list[Seconds] = Field(
        min_length=MIN_SAMPLES,
        max_length=MAX_SAMPLES,
        description="Sample times [s], strictly increasing, 10 to 20000 samples.",
    )
    speed: list[RoadSpeed] = Field(
        min_length=MIN_SAMPLES,
        max_length=MAX_SAMPLES,
        description="Road speed at each time [km/h | mph], > 0, falling overall.",
    )

    @model_validator(mode="after")
    def _same_length(self) -> Self:
        if len(self.time) != len(self.speed):
            raise ValueError("`speed` must have one value per `time`")
        return self


class TestConditionsIn(ApiModel):
    """Weather during the coast-downs, for the correction to reference conditions."""

    temperature: float = Field(ge=-40, le=140, description="Air temperature [degC | degF].")
    pressure: float = Field(gt=0, le=120, description="Station pressure [kPa | inHg].")
    relative_humidity: float = Field(0.0, ge=0, le=100, description="Relative humidity [%].")


class CoastDownRequest(ApiModel):
    """Logged coast-downs of one car, its mass and the test weather."""

    units: UnitsField
    reference: Reference
    mass: float = Field(gt=0, le=60000, description="Test mass with driver and fuel [kg | lb].")
    equivalent_mass: float | None = Field(
        None,
        gt=0,
        le=80000,
        description="Mass plus rotating parts in neutral [kg | lb]; default 1.03 x `mass` "
        "(common practice).",
    )
    runs: list[CoastDownRunIn] = Field(
        min_length=1, max_length=MAX_RUNS, description="1 to 10 coast-downs."
    )
    conditions: TestConditionsIn | None = Field(
        None,
        description="Test weather; omitted: the coefficients are not corrected to "
        "reference conditions.",
    )


class CoefficientOut(ApiModel):
    """A fitted coefficient with its 95 % confidence interval."""

    value: float = Field(description="Fitted value.")
    low: float = Field(description="Lower end of the 95 % confidence interval.")
    high: float = Field(description="Upper end of the 95 % confidence interval.")


class CoastDownRunOut(ApiModel):
    """One run fitted alone."""

    direction: Literal["out", "back"]
    samples: int
    duration: float = Field(description="Duration [s].")
    start_speed: float = Field(description="First logged speed [km/h | mph].")
    end_speed: float = Field(description="Last logged speed [km/h | mph].")
    coast_down: list[float] = Field(description="F0, F1, F2 of this run alone.")
    residual_rms: float = Field(description="RMS speed residual [km/h | mph].")


class ReferenceConditionsOut(ApiModel):
    """Coefficients corrected to the reference conditions, and how."""

    applied: bool = Field(description="False when no test conditions were given.")
    temperature: float = Field(description="Reference temperature [degC | degF].")
    pressure: float = Field(description="Reference pressure [kPa | inHg].")
    air_density_ratio: float = Field(description="Test over reference air density [-].")
    rolling_factor: float = Field(description="1 + K0 (T - T_ref), on F0 and F1 [-].")
    coast_down: list[float] = Field(description="F0, F1, F2 at reference conditions.")
    method: str


class CoastDownResponse(ApiModel):
    """Fitted road load, its uncertainty and a vehicle road-load block."""

    reference: Reference
    units: UnitLabels
    coefficient_units: list[str] = Field(description="Units of F0, F1, F2.")
    f0: CoefficientOut = Field(description="Speed-independent term [N | lbf].")
    f1: CoefficientOut = Field(description="Term per unit speed [N/(km/h) | lbf/mph].")
    f2: CoefficientOut = Field(description="Term per speed squared [N/(km/h)^2 | lbf/mph^2].")
    equivalent_mass: float = Field(description="Equivalent mass used [kg | lb].")
    residual_rms: float = Field(description="RMS speed residual of all runs [km/h | mph].")
    residual_max: float = Field(description="Largest speed residual [km/h | mph].")
    runs: list[CoastDownRunOut]
    reference_conditions: ReferenceConditionsOut
    drag_area: float = Field(description="2 F2 / rho at reference, CdA [m^2 | ft^2].")
    rolling_coefficient: float = Field(
        description="F0 / (m g) at reference [-]; includes driveline drag in neutral."
    )
    road_load: RoadLoadIn = Field(
        description="Ready `vehicle.road_load` block: the coefficients at reference."
    )
    method: str
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Printable summary, 80 columns.")
