"""Request and response of POST /v1/shift-window."""

from __future__ import annotations

from typing import Self

from pydantic import ConfigDict, Field, model_validator

from core.shifts.window import DEFAULT_TOLERANCE_S, MAX_POINTS, MIN_POINTS
from service.schemas.common import (
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
)
from service.schemas.examples import ACCELERATION_RUN_EXAMPLE
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.quantities import RoadSpeed, RoadSpeedOrZero, Rollout, RunDistance
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "ShiftWindowFinishIn",
    "ShiftWindowOut",
    "ShiftWindowRequest",
    "ShiftWindowResponse",
]


class ShiftWindowFinishIn(ApiModel):
    """Start and finish of the run the shifts are priced against."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(exclusive=[("finish_distance", "finish_speed")])
    )

    start_speed: RoadSpeedOrZero = Field(
        0.0, description="0 for a standing start, else a rolling start [km/h | mph]."
    )
    rollout: Rollout | None = Field(
        None,
        description="Standing start: distance rolled before the clock starts [mm | in]; "
        "default one foot (common practice).",
    )
    finish_distance: RunDistance | None = Field(
        None, description="Finish distance [m | ft]; default 1/4 mile."
    )
    finish_speed: RoadSpeed | None = Field(
        None, description="Finish at this speed instead [km/h | mph]."
    )

    @model_validator(mode="after")
    def _finish(self) -> Self:
        if self.finish_distance is not None and self.finish_speed is not None:
            raise ValueError("give `finish_distance` or `finish_speed`, not both")
        return self


class ShiftWindowRequest(UnitsRequest):
    """A curve, a drivetrain, a vehicle, a launch, the finish and the tolerance."""

    model_config = ConfigDict(
        json_schema_extra={"examples": [{**ACCELERATION_RUN_EXAMPLE, "points": 9}]}
    )

    reference: Reference
    engine: EngineIn
    drivetrain: DrivetrainIn
    vehicle: VehicleIn
    launch: LaunchIn = Field(default_factory=LaunchIn)
    run: ShiftWindowFinishIn = Field(default_factory=ShiftWindowFinishIn)
    tolerance: float = Field(
        DEFAULT_TOLERANCE_S, gt=0, le=1, description="Time loss accepted in a window [s]."
    )
    points: int = Field(
        21,
        ge=MIN_POINTS,
        le=MAX_POINTS,
        description="Shift rpms tried per gear change, across the usable range.",
    )
    job: JobField


class ShiftWindowOut(ApiModel):
    """One gear change: time lost against shift rpm and the window."""

    from_gear: int
    to_gear: int
    reached: bool = Field(description="False when the change comes after the finish.")
    best_rpm: float = Field(description="Time-optimal shift rpm [rpm].")
    low_rpm: float = Field(description="Lowest rpm within the tolerance [rpm].")
    high_rpm: float = Field(description="Highest rpm within the tolerance [rpm].")
    rpm: list[float] = Field(description="Shift rpms tried [rpm].")
    loss: list[float | None] = Field(
        description="Time lost to the finish at each rpm [s]; null where it is not reached."
    )
    line: str = Field(description="The window in words, for the driver.")


class ShiftWindowResponse(ApiModel):
    """What each shift's rpm costs to the finish."""

    reference: Reference
    units: UnitLabels
    finish: str = Field(description="The finish, in words.")
    best_time: float = Field(description="Time to the finish with the best shifts [s].")
    best_shift_rpm: list[float] = Field(description="Time-optimal shift rpm per change.")
    tolerance: float = Field(description="Loss accepted in a window [s].")
    windows: list[ShiftWindowOut]
    evaluations: int = Field(description="Runs simulated.")
    method: str
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Printable summary, 80 columns.")
