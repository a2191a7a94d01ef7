"""Requests and responses of POST /v1/gear-spacing and POST /v1/speedometer-correction."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import (
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
)
from service.schemas.inputs import EngineIn, TireIn
from service.schemas.job import JobField
from service.schemas.quantities import OdometerDistance, RoadSpeedOrZero
from service.schemas.request_examples import GEAR_SPACING_EXAMPLE, SPEEDOMETER_EXAMPLE
from service.schemas.shift_plan import TireOut

__all__ = [
    "DistanceReadingOut",
    "DrivenGearOut",
    "GearSetOut",
    "GearSpacingRequest",
    "GearSpacingResponse",
    "ShiftLandingOut",
    "SpacingIn",
    "SpeedReadingOut",
    "SpeedometerChangeIn",
    "SpeedometerRequest",
    "SpeedometerResponse",
    "SpeedometerSetupIn",
    "SpeedometerSetupOut",
]

Ratio = Annotated[float, Field(ge=0.01, le=50)]
Rpm = Annotated[float, Field(gt=0, le=30000, description="Engine speed [rpm].")]


class SpacingIn(ApiModel):
    """The ends of a gear set to space."""

    first_ratio: Ratio = Field(description="First-gear ratio.")
    top_ratio: Ratio = Field(description="Top-gear ratio, below `first_ratio`.")
    gear_count: int = Field(ge=2, le=12, description="Forward gears, 2 to 12.")
    progression_factor: float | None = Field(
        None,
        ge=1,
        le=3,
        description="Progressive set: each step is the one before divided by this factor "
        "(1 is geometric); it must stay below the largest usable factor for the ends. "
        "Default 1.1, or the square root of that largest factor when smaller.",
    )

    @model_validator(mode="after")
    def _descending(self) -> Self:
        if self.top_ratio >= self.first_ratio:
            raise ValueError("`top_ratio` must be below `first_ratio`")
        return self


class GearSpacingRequest(UnitsRequest):
    """Ends to space, a gear set to examine, or both; a shift rpm; optionally a curve."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=GEAR_SPACING_EXAMPLE))

    reference: Reference
    job: JobField
    spacing: SpacingIn | None = Field(
        None, description="Space geometric and progressive sets between these ends."
    )
    gear_ratios: list[Ratio] | None = Field(
        None,
        min_length=2,
        max_length=12,
        description="A gear set to examine, first gear first, strictly descending.",
    )
    shift_rpm: list[Rpm] | None = Field(
        None,
        min_length=1,
        max_length=11,
        description="Engine speed at each shift [rpm]: one value for every shift, or one "
        "per shift; default the rev limit of `engine`.",
    )
    engine: EngineIn | None = Field(
        None,
        description="The engine: with it, each landing is measured from the torque and "
        "power peaks.",
    )
    landing_band: Literal["peak_torque_to_peak_power", "curve_range"] = Field(
        "peak_torque_to_peak_power",
        description="Where a shift should land: from the torque peak to the power peak "
        "(common practice), or anywhere on the measured curve.",
    )
    landing_band_rpm: list[Rpm] | None = Field(
        None, min_length=2, max_length=2, description="An explicit band [low, high] [rpm]."
    )

    @model_validator(mode="after")
    def _enough(self) -> Self:
        if self.spacing is None and self.gear_ratios is None:
            raise ValueError("give `spacing`, `gear_ratios` or both")
        if self.shift_rpm is None and self.engine is None:
            raise ValueError("give `shift_rpm`, or `engine` for its rev limit")
        if self.landing_band_rpm is not None and self.engine is None:
            raise ValueError("`landing_band_rpm` needs `engine`")
        return self


class ShiftLandingOut(ApiModel):
    """One upshift: where it lands, and (with a curve) how far from the peaks."""

    from_gear: int
    to_gear: int
    step: float = Field(description="Ratio step, current / next.")
    shift_rpm: float = Field(description="[rpm]")
    landing_rpm: float = Field(description="shift_rpm / step [rpm].")
    rpm_drop: float = Field(description="shift_rpm - landing_rpm [rpm].")
    drop_percent: float = Field(description="The drop as a share of shift_rpm [%].")
    from_torque_peak_rpm: float | None = Field(description="landing - torque peak [rpm].")
    from_torque_peak_percent: float | None = Field(description="The same, of the peak [%].")
    from_power_peak_rpm: float | None = Field(description="landing - power peak [rpm].")
    from_power_peak_percent: float | None = Field(description="The same, of the peak [%].")
    in_band: bool | None = Field(description="Whether the landing lies in the band.")
    landing_torque: float | None = Field(description="Torque at landing [N*m | lbf*ft].")
    landing_power: float | None = Field(description="Power at landing [kW | hp].")


class GearSetOut(ApiModel):
    """One gear set and its shifts."""

    name: Literal["geometric", "progressive", "given"]
    gear_ratios: list[float]
    steps: list[float] = Field(description="current / next ratio of each shift.")
    spread: float = Field(description="first / top ratio.")
    progression_factor: float | None = Field(
        description="Quotient of adjacent steps (geometric 1); null for a given set."
    )
    shifts: list[ShiftLandingOut]
    peak_torque_rpm: float | None = Field(description="With `engine` [rpm].")
    peak_power_rpm: float | None = Field(description="With `engine` [rpm].")
    band_rpm: list[float] | None = Field(description="With `engine`: [low, high] [rpm].")


class GearSpacingResponse(ApiModel):
    """The spaced sets and the given set, each with its landings."""

    reference: str | None
    units: UnitLabels
    max_progression_factor: float | None = Field(
        description="With `spacing`: a progressive factor must stay below this."
    )
    sets: list[GearSetOut]
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Plain-text summary, at most 80 columns, printable.")


class SpeedometerSetupIn(ApiModel):
    """The tire and axle the speedometer is calibrated for."""

    tire: TireIn
    final_drive_ratio: Ratio | None = Field(
        None,
        description="Axle ratio (between the sensor shaft and the wheels); needed when a "
        "transmission-output drive's axle ratio changes.",
    )


class SpeedometerChangeIn(ApiModel):
    """What changed: the tire, the axle ratio or both."""

    tire: TireIn | None = Field(None, description="The new tire; default unchanged.")
    final_drive_ratio: Ratio | None = Field(None, description="The new axle ratio.")

    @model_validator(mode="after")
    def _something(self) -> Self:
        if self.tire is None and self.final_drive_ratio is None:
            raise ValueError("give the new `tire`, the new `final_drive_ratio` or both")
        return self


class SpeedometerRequest(UnitsRequest):
    """The calibrated set-up, the change, and readings to correct."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=SPEEDOMETER_EXAMPLE))

    reference: Reference
    job: JobField
    drive: Literal["transmission_output", "wheel"] = Field(
        "transmission_output",
        description="Where the speedometer takes its signal: the transmission output (tire "
        "and axle ratio matter) or a wheel sensor (only the tire matters).",
    )
    original: SpeedometerSetupIn
    new: SpeedometerChangeIn
    indicated_speeds: list[RoadSpeedOrZero] | None = Field(
        None,
        max_length=20,
        description="Speeds the instrument shows [km/h | mph]; default a few road speeds.",
    )
    indicated_distances: list[OdometerDistance] | None = Field(
        None,
        max_length=20,
        description="Distances the odometer shows [km | mi]; the true "
        "distances come back in the same unit. Default 100, 1000 and 10000.",
    )
    driven_teeth: int | None = Field(
        None,
        ge=1,
        le=200,
        description="Mechanical drive: teeth of the driven gear fitted now, for the gear "
        "that reads true again.",
    )

    @model_validator(mode="after")
    def _axle(self) -> Self:
        if self.new.final_drive_ratio is not None and self.original.final_drive_ratio is None:
            raise ValueError("a new `final_drive_ratio` needs the original one")
        return self


class SpeedometerSetupOut(ApiModel):
    """A tire and axle as used."""

    tire: TireOut
    final_drive_ratio: float | None


class SpeedReadingOut(ApiModel):
    """An indicated speed and the true one."""

    indicated: float = Field(description="[km/h | mph]")
    true: float = Field(description="[km/h | mph]")
    error: float = Field(description="indicated - true [km/h | mph].")


class DistanceReadingOut(ApiModel):
    """An odometer reading and the distance travelled, in the odometer's unit."""

    indicated: float = Field(description="What the odometer shows [km | mi].")
    true: float = Field(description="Distance travelled [km | mi].")
    error: float = Field(description="indicated - true [km | mi].")


class DrivenGearOut(ApiModel):
    """The driven gear that makes a mechanical drive read true again."""

    original_teeth: int
    exact_teeth: float
    nearest_teeth: int
    residual_error_percent: float = Field(description="Error left with nearest_teeth [%].")


class SpeedometerResponse(ApiModel):
    """How the instrument reads now, and the correction it needs."""

    reference: str | None
    units: UnitLabels
    drive: Literal["transmission_output", "wheel"]
    original: SpeedometerSetupOut
    new: SpeedometerSetupOut
    true_per_indicated: float = Field(description="True speed / indicated speed.")
    indicated_per_true: float = Field(description="Indicated speed / true speed.")
    reading_error_percent: float = Field(
        description="100 * (indicated - true) / true [%]; positive when reading high."
    )
    correction_factor: float = Field(
        description="Multiply the instrument's pulses-per-distance setting (or a mechanical "
        "drive's driven/drive teeth ratio) by this to read true."
    )
    reads: Literal["high", "low", "true"]
    speeds: list[SpeedReadingOut]
    distances: list[DistanceReadingOut]
    driven_gear: DrivenGearOut | None
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Plain-text summary, at most 80 columns, printable.")
