"""Request and response of POST /v1/acceleration-run."""

from __future__ import annotations

from typing import Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import (
    DEFAULT_SHIFT_RULE,
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
from service.schemas.quantities import (
    RoadSpeed,
    RoadSpeedOrZero,
    Rollout,
    RunDistance,
)
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "AccelerationRunRequest",
    "AccelerationRunResponse",
    "DistanceOut",
    "OptimalShiftsOut",
    "RunOptions",
    "RunShiftOut",
    "SeedOut",
    "ShiftChoiceIn",
    "SpeedIntervalIn",
    "SpeedOut",
    "TopSpeedOut",
    "TraceOut",
]


class SpeedIntervalIn(ApiModel):
    """An extra speed interval to time, e.g. 50-70 mph passing."""

    start: RoadSpeedOrZero = Field(description="From speed [km/h | mph].")
    end: RoadSpeed = Field(description="To speed [km/h | mph].")

    @model_validator(mode="after")
    def _ordered(self) -> Self:
        if self.end <= self.start:
            raise ValueError("`end` must be above `start`")
        return self


class RunOptions(ApiModel):
    """Start, finish and what to report."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(exclusive=[("finish_distance", "finish_speed")])
    )

    start_speed: RoadSpeedOrZero = Field(
        0.0, description="0 for a standing start, else a rolling start [km/h | mph]."
    )
    start_gear: int | None = Field(
        None,
        ge=1,
        le=12,
        description="Gear to start in (1 = first), at most the top gear, and one that is "
        "below its rev limit at the start speed; default the lowest gear that can pull the "
        "start speed below its shift rpm.",
    )
    rollout: Rollout | None = Field(
        None,
        description="Standing start: distance rolled before the clock starts [mm | in]; "
        "default one foot (304.8 mm, 12 in), about what a tire rolls before the beam clears "
        "(common practice).",
    )
    finish_distance: RunDistance | None = Field(
        None,
        description="Finish distance from the clock start [m | ft]; default 1/4 mile "
        "(a standing mile is 1609.344 m, 5280 ft).",
    )
    finish_speed: RoadSpeed | None = Field(
        None, description="Finish at this speed instead [km/h | mph]."
    )
    extra_distances: list[RunDistance] = Field(
        default_factory=list,
        max_length=10,
        description="More distances to time [m | ft], each at most 5000 m (16404 ft).",
    )
    extra_speed_intervals: list[SpeedIntervalIn] = Field(default_factory=list, max_length=10)
    trace_points: int = Field(200, ge=10, le=2000, description="Points in the sampled trace.")

    @model_validator(mode="after")
    def _finish(self) -> Self:
        if self.finish_distance is not None and self.finish_speed is not None:
            raise ValueError("give `finish_distance` or `finish_speed`, not both")
        return self


class ShiftChoiceIn(ApiModel):
    """Where to shift during the run."""

    criterion: Literal["net_acceleration", "tractive_force", "custom"] = Field(
        "net_acceleration",
        description="`net_acceleration`: the plan with road load and rotating inertia "
        "counted; `tractive_force`: the wheel-force crossover plan; `custom`: `rpm`. "
        + DEFAULT_SHIFT_RULE,
    )
    rpm: list[float] | None = Field(
        None,
        min_length=1,
        max_length=11,
        description="Custom: engine rpm at which to leave each gear, first gear first.",
    )
    optimise: bool = Field(
        False,
        description="Also search the shift rpms that minimise the time to the finish "
        "(bounded compute budget) and report them beside the plan's.",
    )

    @model_validator(mode="after")
    def _custom(self) -> Self:
        if (self.criterion == "custom") != (self.rpm is not None):
            raise ValueError("`rpm` is given with, and only with, `criterion: custom`")
        if self.rpm is not None and any(not 0 < n <= 30000 for n in self.rpm):
            raise ValueError("`rpm` values must lie in (0, 30000]")
        return self


class AccelerationRunRequest(UnitsRequest):
    """A curve, a drivetrain, a vehicle and a launch."""

    model_config = ConfigDict(json_schema_extra={"examples": [ACCELERATION_RUN_EXAMPLE]})

    reference: Reference
    job: JobField
    engine: EngineIn
    drivetrain: DrivetrainIn
    vehicle: VehicleIn
    launch: LaunchIn = Field(default_factory=LaunchIn)
    shifts: ShiftChoiceIn = Field(default_factory=ShiftChoiceIn)
    run: RunOptions = Field(default_factory=RunOptions)


class DistanceOut(ApiModel):
    """Elapsed time over a distance from the clock start."""

    name: str
    distance: float = Field(description="Distance [m | ft].")
    elapsed: float | None = Field(description="Elapsed time [s]; null if not reached.")
    speed: float | None = Field(description="Speed at the line [km/h | mph].")
    trap_speed: float | None = Field(description="Average over the last 66 ft [km/h | mph].")


class SpeedOut(ApiModel):
    """Elapsed time between two speeds."""

    name: str
    start: float = Field(description="From speed [km/h | mph].")
    end: float = Field(description="To speed [km/h | mph].")
    elapsed: float | None = Field(description="From first motion (or `start`) [s].")
    less_rollout: float | None = Field(description="Standing start, less the rollout time [s].")


class RunShiftOut(ApiModel):
    """One upshift in the run."""

    from_gear: int
    to_gear: int
    time: float = Field(description="Since first motion [s].")
    speed: float = Field(description="As the shift begins [km/h | mph].")
    distance: float = Field(description="From the start [m | ft].")
    rpm_before: float
    rpm_after: float


class TopSpeedOut(ApiModel):
    """Top speed, its gear and what limits it."""

    speed: float = Field(description="[km/h | mph].")
    gear: int
    limited_by: Literal["drag", "rev_limit"]


class TraceOut(ApiModel):
    """The run sampled evenly in time."""

    time: list[float] = Field(description="[s]")
    speed: list[float] = Field(description="[km/h | mph]")
    distance: list[float] = Field(description="[m | ft]")
    gear: list[int]
    rpm: list[float] = Field(description="Engine speed [rpm].")
    acceleration: list[float] = Field(
        description="Net acceleration at each instant [g]: negative while coasting through "
        "a shift, zero while the rev limiter holds the car."
    )


class SeedOut(ApiModel):
    """One starting plan of the shift search."""

    name: Literal["net_acceleration", "tractive_force", "custom", "rev_limit"]
    elapsed: float = Field(description="Finish time with it [s].")


class OptimalShiftsOut(ApiModel):
    """Shift rpms that minimise the time to the finish, beside the plan's."""

    shift_rpm: list[float]
    elapsed: float = Field(description="Finish time with them [s].")
    plan_elapsed: float = Field(description="Finish time with the plan's shifts [s].")
    gain: float = Field(description="plan_elapsed - elapsed [s].")
    evaluations: int = Field(description="Simulated runs spent in the search, seeds included.")
    won_by: Literal["net_acceleration", "tractive_force", "custom", "rev_limit", "search"] = Field(
        description="Which plan the answer is: the search starts from the quickest of the "
        "run's own plan, shifting at the rev limit, the wheel-force crossover and the "
        "net-acceleration plan, so it is never slower than any of them; `search` when it "
        "improved on all of them."
    )
    seeds: list[SeedOut] = Field(description="Each distinct starting plan and its time.")


class AccelerationRunResponse(ApiModel):
    """Timed distances and speeds, shifts, top speed, the trace, warnings and cautions."""

    reference: str | None
    units: UnitLabels
    shift_criterion: Literal["net_acceleration", "tractive_force", "custom"]
    shift_rpm: list[float] = Field(description="Shift rpm used for each gear change [rpm].")
    start_gear: int = Field(description="Gear the run started in (1 = first).")
    finish: DistanceOut | SpeedOut
    distances: list[DistanceOut]
    speeds: list[SpeedOut]
    shifts: list[RunShiftOut]
    top_speed: TopSpeedOut
    traction_limit: float = Field(
        description="Traction-limited tractive force on the road's grade [N | lbf]: Gillespie "
        "ch. 2 with the rolling-resistance term of the load transfer, rolling resistance "
        "taken at rest."
    )
    traction_limited_to: float | None = Field(
        description="Highest speed at which the tires limited the drive, where the drive "
        "force falls to the traction limit (found by root finding) [km/h | mph]."
    )
    trace: TraceOut
    optimal_shifts: OptimalShiftsOut | None
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str
