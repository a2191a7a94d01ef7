"""Request and response of the dyno endpoints: correction to standard air, file import."""

from __future__ import annotations

from typing import Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import (
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
)
from service.schemas.inputs import CurveIn
from service.schemas.job import JobField
from service.schemas.quantities import (
    AltimeterSetting,
    CellTemperature,
    Elevation,
    StationPressure,
)
from service.schemas.request_examples import DYNO_CORRECTION_EXAMPLE

__all__ = [
    "AmbientIn",
    "CorrectionOut",
    "DynoCorrectionRequest",
    "DynoCorrectionResponse",
    "ImportedCurveResponse",
    "RoadSpeedConversionOut",
]

Standard = Literal["sae_j1349_1990", "sae_j1349_2004", "sae_j607", "din_70020", "iso_1585"]


class AmbientIn(ApiModel):
    """Air in the dyno cell during the run: station pressure, or an altimeter setting with
    the elevation."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(("station_pressure",), ("altimeter_setting", "elevation"))
    )

    temperature: CellTemperature = Field(description="Intake air temperature [degC | degF].")
    relative_humidity: float = Field(ge=0, le=100, description="Relative humidity [%].")
    station_pressure: StationPressure | None = Field(
        None, description="Absolute barometric pressure [kPa | inHg]."
    )
    altimeter_setting: AltimeterSetting | None = Field(
        None, description="Altimeter setting (sea-level reduced) [kPa | inHg]."
    )
    elevation: Elevation | None = Field(
        None, description="Elevation, with `altimeter_setting` [m | ft]."
    )

    @model_validator(mode="after")
    def _pressure(self) -> Self:
        if (self.station_pressure is None) == (self.altimeter_setting is None):
            raise ValueError("give exactly one of `station_pressure` or `altimeter_setting`")
        if (self.altimeter_setting is None) != (self.elevation is None):
            raise ValueError("`elevation` goes with, and only with, `altimeter_setting`")
        return self


class DynoCorrectionRequest(UnitsRequest):
    """Ambient conditions, and optionally the curve to correct."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=DYNO_CORRECTION_EXAMPLE))

    reference: Reference
    job: JobField
    ambient: AmbientIn
    standard: Standard = Field(
        "sae_j1349_2004", description="The standard whose factor is applied to `curve`."
    )
    curve: CurveIn | None = Field(None, description="A measured curve to correct.")


class CorrectionOut(ApiModel):
    """One standard's correction factor."""

    standard: Standard
    factor: float = Field(description="Multiply measured torque and power by this.")
    within_validity: bool = Field(description="Inside the range the standard states.")
    dry_pressure: float = Field(description="Dry-air partial pressure [kPa | inHg].")
    vapour_pressure: float = Field(description="Water-vapour pressure [kPa | inHg].")


class DynoCorrectionResponse(ApiModel):
    """Factors under every standard, and the corrected curve when one was sent."""

    reference: str | None
    units: UnitLabels
    station_pressure: float = Field(description="Station pressure used [kPa | inHg].")
    corrections: list[CorrectionOut]
    applied: Standard
    corrected_curve: CurveIn | None
    warnings: list[NoticeOut]


class RoadSpeedConversionOut(ApiModel):
    """The gear a speed-based export was referred to engine rpm with."""

    overall_ratio: float = Field(description="Gear * final drive * extra reduction.")
    rolling_radius: float = Field(description="Tire rolling radius used [mm | in].")
    rpm_per_speed: float = Field(description="Engine speed per road speed [rpm per km/h | mph].")


class ImportedCurveResponse(ApiModel):
    """A dyno file read into a curve every other endpoint accepts."""

    units: UnitLabels
    curve: CurveIn = Field(
        description="rpm and torque in the caller's units; `source` is `chassis` when the "
        "file's figures were measured at the wheels (wheel columns, or a speed-based export)."
    )
    columns: dict[str, str | None] = Field(
        description="Columns used, as headed in the file: `rpm` (or `road_speed`), then "
        "`torque`, `power` and `force` where used."
    )
    delimiter: str
    encoding: str = Field(
        description="How the file's text was stored (UTF-8, UTF-16, Windows-1252 ...)."
    )
    rows: int = Field(description="Data rows read (summary and blank rows not counted).")
    road_speed_conversion: RoadSpeedConversionOut | None = Field(
        description="For a speed-based export: the gear and tire used; else null."
    )
    warnings: list[NoticeOut]
