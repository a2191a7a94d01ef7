"""Request and response of POST /v1/road-load/coast-down."""

from __future__ import annotations

from typing import Annotated, Any, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from core.car.coast_down import MAX_RUNS, MIN_SAMPLES
from service.schemas.common import ApiModel, NoticeOut, Reference, UnitLabels, UnitsRequest
from service.schemas.job import JobField
from service.schemas.quantities import AirPressure, AirTemperature, Mass, RoadSpeed
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
# an invented 1,180 kg hatchback, two runs sampled every 4 s
COAST_DOWN_EXAMPLE: dict[str, Any] = {
    "units": "metric",
    "reference": "CD-HATCH-1",
    "mass": 1180,
    "runs": [
        {
            "direction": "out",
            "time": [4.0 * i for i in range(35)],
            "speed": [
                114.9,
                109.4,
                103.9,
                99.0,
                94.2,
                89.8,
                85.8,
                81.6,
                78.1,
                74.3,
                71.1,
                67.9,
                65.1,
                61.6,
                58.8,
                55.9,
                53.3,
                50.7,
                48.7,
                46.0,
                43.9,
                41.5,
                39.1,
                36.8,
                34.9,
                32.6,
                31.2,
                29.1,
                27.1,
                25.1,
                23.6,
                21.7,
                19.8,
                18.2,
                16.4,
            ],
        },
        {
            "direction": "back",
            "time": [4.0 * i for i in range(37)],
            "speed": [
                115.2,
                109.3,
                104.2,
                99.3,
                94.7,
                90.6,
                86.8,
                82.4,
                78.8,
                75.6,
                72.3,
                69.1,
                65.4,
                63.2,
                60.1,
                57.6,
                55.1,
                52.7,
                50.3,
                47.8,
                45.4,
                43.5,
                41.2,
                39.5,
                37.4,
                35.7,
                33.3,
                31.5,
                29.7,
                28.1,
                26.2,
                24.5,
                22.8,
                21.1,
                19.5,
                18.1,
                16.7,
            ],
        },
    ],
    "conditions": {"temperature": 27.0, "pressure": 99.1, "relative_humidity": 40},
}

Seconds = Annotated[float, Field(ge=0, le=1800)]


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

    temperature: AirTemperature = Field(description="Air temperature [degC | degF].")
    pressure: AirPressure = Field(description="Station pressure [kPa | inHg].")
    relative_humidity: float = Field(0.0, ge=0, le=100, description="Relative humidity [%].")


class CoastDownRequest(UnitsRequest):
    """Logged coast-downs of one car, its mass and the test weather."""

    model_config = ConfigDict(json_schema_extra={"examples": [COAST_DOWN_EXAMPLE]})

    reference: Reference
    mass: Mass = Field(description="Test mass with driver and fuel [kg | lb].")
    equivalent_mass: Mass | None = Field(
        None,
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
    job: JobField


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
