"""Request and response of POST /v1/weather-correction."""

from __future__ import annotations

from typing import Any, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import ApiModel, NoticeOut, Reference, UnitLabels, UnitsRequest
from service.schemas.examples import ACCELERATION_RUN_EXAMPLE
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.quantities import CellTemperature, RoadSpeed, RunDistance, StationPressure
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "SlipIn",
    "SlipOut",
    "StripAirOut",
    "StripWeatherIn",
    "WeatherCorrectionRequest",
    "WeatherCorrectionResponse",
]

WEATHER_EXAMPLE: dict[str, Any] = {
    **ACCELERATION_RUN_EXAMPLE,
    "reference": "SLIP-88",
    "taken_in": {"temperature": 31, "pressure": 97.2, "relative_humidity": 55},
    "predict_for": {"temperature": 12, "pressure": 100.4, "relative_humidity": 30},
    "slip": {"et": 16.62, "trap": 138.4},
}

Standard = Literal["sae_j1349_2004", "sae_j1349_1990", "sae_j607", "din_70020", "iso_1585"]


class StripWeatherIn(ApiModel):
    """Weather at the strip, as its weather station reads it."""

    temperature: CellTemperature = Field(description="Air temperature [degC | degF].")
    pressure: StationPressure = Field(
        description="Station (absolute, uncorrected) pressure [kPa | inHg]."
    )
    relative_humidity: float = Field(0.0, ge=0, le=100, description="Relative humidity [%].")


class SlipIn(ApiModel):
    """A time slip taken in the first weather."""

    et: float = Field(gt=0, le=100, description="Elapsed time to the finish [s].")
    trap: RoadSpeed = Field(description="Trap speed [km/h | mph].")


class WeatherCorrectionRequest(UnitsRequest):
    """Weather, and optionally a car and its slip to carry to other weather."""

    model_config = ConfigDict(json_schema_extra={"examples": [WEATHER_EXAMPLE]})

    reference: Reference
    standard: Standard = Field(
        "sae_j1349_2004",
        description="Dyno standard the engine curve refers to; its factor scales power.",
    )
    taken_in: StripWeatherIn = Field(description="Weather the slip was taken in.")
    predict_for: StripWeatherIn | None = Field(
        None, description="Weather to predict the slip for; needs the car."
    )
    slip: SlipIn | None = Field(
        None, description="The slip; omitted, the simulated figures stand in."
    )
    engine: EngineIn | None = Field(
        None, description="Engine curve at the standard's reference air."
    )
    drivetrain: DrivetrainIn | None = None
    vehicle: VehicleIn | None = Field(
        None, description="The car; its road load refers to its own `air`."
    )
    launch: LaunchIn = Field(default_factory=LaunchIn)
    finish_distance: RunDistance | None = Field(
        None, description="Finish distance [m | ft]; default 1/4 mile."
    )
    job: JobField

    @model_validator(mode="after")
    def _car_for_prediction(self) -> Self:
        car = (self.engine, self.drivetrain, self.vehicle)
        if self.predict_for is not None and any(x is None for x in car):
            raise ValueError("`predict_for` needs `engine`, `drivetrain` and `vehicle`")
        return self


class StripAirOut(ApiModel):
    """Air as the strip reports it."""

    temperature: float = Field(description="[degC | degF]")
    pressure: float = Field(description="Station pressure [kPa | inHg].")
    relative_humidity: float = Field(description="[%]")
    density: float = Field(description="Moist-air density [kg/m^3 | lb/ft^3].")
    density_altitude: float = Field(description="ISO 2533 altitude of that density [m | ft].")
    relative_density: float = Field(description="Density over ISO sea level [%].")
    correction_factor: float = Field(description="The standard's factor for this air [-].")


class SlipOut(ApiModel):
    """The slip carried to the other weather."""

    et: float = Field(description="Elapsed time taken in the first weather [s].")
    trap: float = Field(description="Trap speed taken in the first weather [km/h | mph].")
    simulated_et: list[float] = Field(description="Simulated ET in each weather [s].")
    simulated_trap: list[float] = Field(description="Simulated trap in each [km/h | mph].")
    predicted_et: float = Field(description="Predicted ET in the second weather [s].")
    predicted_trap: float = Field(description="Predicted trap speed [km/h | mph].")


class WeatherCorrectionResponse(ApiModel):
    """Density altitude and, with a car, the slip predicted for other weather."""

    reference: Reference
    units: UnitLabels
    standard: Standard
    taken_in: StripAirOut
    predict_for: StripAirOut | None
    slip: SlipOut | None
    method: str
    limits: str
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Printable summary, 80 columns.")
