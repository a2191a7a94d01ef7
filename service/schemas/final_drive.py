"""Request and response of POST /v1/final-drive-sweep: candidate axle ratios ranked."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.acceleration import TopSpeedOut
from service.schemas.common import (
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
)
from service.schemas.comparison import StripTimeOut
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.quantities import RoadSpeed, Rollout
from service.schemas.request_examples import SWEEP_EXAMPLE
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "CandidateOut",
    "CruiseLimitIn",
    "CruiseTargetIn",
    "FinalDriveSweepRequest",
    "FinalDriveSweepResponse",
    "Objective",
    "RatioRangeIn",
    "RejectionOut",
    "SweepConstraintsIn",
    "SweepOptimumOut",
    "SweepShiftOut",
]

MAX_CANDIDATES = 200

Ratio = Annotated[float, Field(ge=0.01, le=50)]
Speed = Annotated[RoadSpeed, Field(description="Road speed [km/h | mph].")]
Rpm = Annotated[float, Field(gt=0, le=30000, description="Engine speed [rpm].")]
Objective = Literal[
    "quarter_mile_et",
    "eighth_mile_et",
    "zero_to_60_mph",
    "zero_to_100_kmh",
    "top_speed",
    "cruise_rpm_target",
]
RejectionCode = Literal[
    "cannot_move_off",
    "objective_not_reached",
    "cruise_rpm_too_high",
    "top_speed_too_low",
    "rpm_after_shift_too_low",
]


class RatioRangeIn(ApiModel):
    """Candidates from `low` to `high` in steps of `step`, both ends included."""

    low: Ratio = Field(description="First candidate ratio.")
    high: Ratio = Field(description="Last candidate ratio, >= `low`.")
    step: float = Field(ge=0.001, le=50, description="Spacing; at most 200 candidates in all.")

    @model_validator(mode="after")
    def _ordered(self) -> Self:
        if self.high < self.low:
            raise ValueError("`high` must be >= `low`")
        return self


class CruiseLimitIn(ApiModel):
    """Highway rpm to keep below."""

    speed: Speed
    max_rpm: Rpm = Field(description="Highest top-gear rpm allowed at `speed` [rpm].")


class CruiseTargetIn(ApiModel):
    """The top-gear rpm to aim for at a road speed."""

    speed: Speed
    rpm: Rpm = Field(description="Engine speed wanted in top gear at `speed` [rpm].")


class SweepConstraintsIn(ApiModel):
    """Limits the chosen ratio must keep; each optional."""

    cruise: CruiseLimitIn | None = Field(
        None, description="Top-gear rpm at most `max_rpm` at `speed`."
    )
    min_top_speed: RoadSpeed | None = Field(
        None, description="Top speed at least this [km/h | mph]; needs `vehicle`."
    )
    min_rpm_after_shift: float | None = Field(
        None,
        gt=0,
        le=30000,
        description="Engine speed right after every shift at least this [rpm]. The landing "
        "rpm is shift rpm * next / current ratio, the same for every final drive, so this "
        "passes or fails every candidate alike.",
    )


class FinalDriveSweepRequest(UnitsRequest):
    """A car and the final drive ratios to try in it."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(("ratios",), ("ratio_range",), example=SWEEP_EXAMPLE)
    )

    reference: Reference
    job: JobField
    engine: EngineIn
    drivetrain: DrivetrainIn = Field(
        description="The drivetrain; each candidate replaces its `final_drive_ratio`."
    )
    vehicle: VehicleIn | None = Field(
        None, description="The car: needed for every objective but `cruise_rpm_target`."
    )
    launch: LaunchIn | None = Field(None, description="Clutch or converter (with `vehicle`).")
    ratios: list[Ratio] | None = Field(
        None,
        min_length=1,
        max_length=MAX_CANDIDATES,
        description="Candidate ratios, e.g. what the seller stocks; at most 200. Give "
        "`ratios` or `ratio_range`. Candidates times gears must be at most 1200.",
        examples=[[3.23, 3.42, 3.55, 3.73, 3.91, 4.10]],
    )
    ratio_range: RatioRangeIn | None = Field(None, description="Candidates as a range.")
    objective: Objective = Field(
        "quarter_mile_et",
        description="Rank by 1/4 or 1/8 mile elapsed time, 0-60 mph or 0-100 km/h (from "
        "first motion; least first), top speed (highest first), or the top-gear rpm nearest "
        "`cruise_target` (`cruise_rpm_target`).",
    )
    cruise_target: CruiseTargetIn | None = Field(
        None, description="The target of `cruise_rpm_target`."
    )
    constraints: SweepConstraintsIn = Field(default_factory=SweepConstraintsIn)
    shift_rpm: list[Rpm] | None = Field(
        None,
        min_length=1,
        max_length=11,
        description="Engine rpm at which to leave each gear; default the wheel-force "
        "crossover plan (the same for every final drive).",
    )
    rollout: Rollout | None = Field(
        None,
        description="Distance rolled before the clock starts [mm | in]; default one foot.",
    )

    @model_validator(mode="after")
    def _consistent(self) -> Self:
        if (self.ratios is None) == (self.ratio_range is None):
            raise ValueError("give exactly one of `ratios` or `ratio_range`")
        if self.objective == "cruise_rpm_target" and self.cruise_target is None:
            raise ValueError("`cruise_rpm_target` needs `cruise_target`")
        if self.vehicle is None:
            if self.objective != "cruise_rpm_target" or self.launch is not None:
                raise ValueError(f"`{self.objective}` and `launch` need `vehicle`")
            if self.constraints.min_top_speed is not None:
                raise ValueError("`constraints.min_top_speed` needs `vehicle`")
        return self


class RejectionOut(ApiModel):
    """One constraint a candidate fails."""

    code: RejectionCode
    message: str = Field(description="One plain sentence, in the request's units.")


class CandidateOut(ApiModel):
    """One candidate's figures."""

    final_drive_ratio: float
    rank: int = Field(description="Place by the objective alone, 1 for the best.")
    objective_value: float | None = Field(
        description="Elapsed time [s], top speed [km/h | mph], or distance of the cruise rpm "
        "from its target [rpm]; null where not reached."
    )
    meets_constraints: bool
    rejected_because: list[RejectionOut]
    sixty_ft: float | None = Field(description="60 ft elapsed time [s].")
    eighth_mile: StripTimeOut | None
    quarter_mile: StripTimeOut | None
    zero_to_60_mph: float | None = Field(description="From first motion [s].")
    zero_to_100_kmh: float | None = Field(description="From first motion [s].")
    top_speed: TopSpeedOut | None
    cruise_rpm: float | None = Field(description="Top-gear rpm at `cruise_speed` [rpm].")
    speed_at_rev_limit: list[float] = Field(description="Per gear [km/h | mph].")


class SweepShiftOut(ApiModel):
    """A gear change, the same for every candidate."""

    from_gear: int
    to_gear: int
    shift_rpm: float = Field(description="[rpm]")
    rpm_after: float = Field(description="shift_rpm * next / current ratio [rpm].")


class SweepOptimumOut(ApiModel):
    """The continuous optimum of the objective, constraints ignored."""

    final_drive_ratio: float
    objective_value: float
    bounds: list[float] = Field(
        min_length=2,
        max_length=2,
        description="The bracket searched: the listed ratios either side of the best one.",
    )
    evaluations: int = Field(description="Objective evaluations spent.")


class FinalDriveSweepResponse(ApiModel):
    """Candidates ranked best first, the best one meeting the constraints, the optimum."""

    reference: str | None
    units: UnitLabels
    objective: Objective
    objective_unit: str = Field(description="Unit of `objective_value`: s, rpm or a speed.")
    rev_limit_rpm: float = Field(description="Rev limit used [rpm].")
    cruise_speed: float | None = Field(description="Speed of `cruise_rpm` [km/h | mph].")
    shifts: list[SweepShiftOut]
    candidates: list[CandidateOut] = Field(description="Every candidate, best first.")
    best: CandidateOut | None = Field(
        description="The best listed ratio meeting every constraint; null if none does."
    )
    optimum: SweepOptimumOut | None = Field(
        description="Refined between the listed ratios either side of the best one."
    )
    warnings: list[NoticeOut]
    cautions: list[str]
    summary: str = Field(description="Plain-text summary, at most 80 columns, printable.")
