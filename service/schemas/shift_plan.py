"""Request and response of POST /v1/shift-plan."""

from __future__ import annotations

from typing import Any, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.common import (
    DEFAULT_SHIFT_RULE,
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    with_default_shift_criterion,
)
from service.schemas.examples import SHIFT_PLAN_EXAMPLE
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.job import JobField
from service.schemas.quantities import RoadSpeed
from service.schemas.vehicle import LaunchIn, VehicleIn

__all__ = [
    "CruiseOut",
    "CurveTableOut",
    "EngineOut",
    "GearOut",
    "GearTableOut",
    "PerformanceOut",
    "PlanTopSpeedOut",
    "ShiftOut",
    "ShiftPlanRequest",
    "ShiftPlanResponse",
    "TableOptions",
    "TireOut",
]


class TableOptions(ApiModel):
    """How the per-gear tables are sampled."""

    rpm_step: float | None = Field(
        None,
        ge=1,
        le=10000,
        description="Row spacing [rpm], from the curve's first point to the rev limit; "
        "default the curve's own points. At most 2000 rows.",
    )


class ShiftPlanRequest(UnitsRequest):
    """A torque curve and a drivetrain."""

    model_config = ConfigDict(json_schema_extra={"examples": [SHIFT_PLAN_EXAMPLE]})

    reference: Reference
    job: JobField
    engine: EngineIn
    drivetrain: DrivetrainIn
    table: TableOptions = Field(default_factory=TableOptions)
    vehicle: VehicleIn | None = Field(
        None,
        description="Describe the car for net-acceleration shifts, top speed, "
        "gradeability and cruise rpm.",
    )
    launch: LaunchIn | None = Field(None, description="Clutch or converter (with `vehicle`).")
    shift_criterion: Literal["tractive_force", "net_acceleration"] | None = Field(
        None,
        description="`tractive_force`: the wheel-force crossover; `net_acceleration` (needs "
        "`vehicle`): road load and rotating inertia counted, which moves shifts earlier. "
        + DEFAULT_SHIFT_RULE,
    )
    cruise_speeds: list[RoadSpeed] = Field(
        default_factory=list,
        max_length=10,
        description="Road speeds [km/h | mph] at which to report the rpm in every gear.",
    )

    @model_validator(mode="before")
    @classmethod
    def _default_criterion(cls, data: Any) -> Any:
        return with_default_shift_criterion(data)

    @model_validator(mode="after")
    def _needs_vehicle(self) -> Self:
        if self.vehicle is None and (
            self.shift_criterion == "net_acceleration" or self.launch is not None
        ):
            raise ValueError("`net_acceleration` and `launch` need `vehicle`")
        return self


class GearTableOut(ApiModel):
    """One gear's rows as columns of equal length."""

    rpm: list[float] = Field(description="Engine speed [rpm], the same rows in every gear.")
    speed: list[float] = Field(description="Road speed [km/h | mph].")
    wheel_torque: list[float] = Field(description="Torque at the driven wheels [N*m | lbf*ft].")
    tractive_force: list[float] = Field(description="Force at the contact patch [N | lbf].")
    wheel_power: list[float] = Field(description="Power at the wheels [kW | hp].")
    engine_rpm: list[float] | None = Field(
        None,
        description="With a torque converter only: engine speed on each row [rpm], `rpm` then "
        "being the gearbox input (turbine) speed; the wheel columns count the converter's "
        "torque ratio.",
    )
    torque_ratio: list[float] | None = Field(
        None,
        description="With a torque converter only: its torque ratio at the speed ratio it "
        "runs at on each row (1 when locked).",
    )


class GearOut(ApiModel):
    """One forward gear."""

    gear: int = Field(description="Gear number, 1 for first.")
    ratio: float = Field(description="Transmission ratio of the gear.")
    overall_ratio: float = Field(description="Gear * final drive * extra reduction.")
    efficiency: float = Field(description="Driveline efficiency applied (1 for chassis).")
    max_speed: float = Field(description="Road speed at the rev limit [km/h | mph].")
    table: GearTableOut


class ShiftOut(ApiModel):
    """One gear change."""

    from_gear: int
    to_gear: int
    shift_rpm: float = Field(description="Engine speed at the shift [rpm].")
    shift_speed: float = Field(description="Road speed at the shift [km/h | mph].")
    reason: Literal["crossover", "rev_limit", "drag_limit", "traction_limit"] = Field(
        description="`crossover`: the next gear's tractive force (or net acceleration) "
        "overtakes this gear's; `rev_limit`: it never does before the rev limit; "
        "`drag_limit` (net-acceleration plans): this gear stops accelerating first; "
        "`traction_limit` (net-acceleration plans): both gears are held at the tires' grip, "
        "so the gear with the lighter rotating parts takes over as soon as it can."
    )
    rpm_after: float = Field(description="Engine speed right after the shift [rpm].")
    rpm_drop: float = Field(description="shift_rpm - rpm_after [rpm].")
    force_before: float = Field(description="Tractive force just before the shift [N | lbf].")
    force_after: float = Field(description="Tractive force just after the shift [N | lbf].")
    crossings: int = Field(
        description="Points in the gears' shared range where the next gear overtakes."
    )
    intersections: int = Field(
        description="How many times the two gears' curves intersect in the shared range, "
        "either way (overtaking, or falling back)."
    )
    overtake_rpm: list[float] = Field(
        description="Engine speed in this gear at each point where the next gear overtakes "
        "[rpm]; empty when it never does."
    )
    coincident_rpm: list[float] | None = Field(
        None,
        min_length=2,
        max_length=2,
        description="[low, high] band of engine speed in this gear where both gears give the "
        "same force, if any [rpm].",
    )


class CurveTableOut(ApiModel):
    """The interpolated curve on the table rows, shared by every gear."""

    rpm: list[float] = Field(description="Engine speed [rpm].")
    torque: list[float] = Field(description="Curve torque [N*m | lbf*ft].")
    power: list[float] = Field(description="Curve power [kW | hp].")


class EngineOut(ApiModel):
    """What was used of the engine curve."""

    source: Literal["engine", "chassis"]
    efficiency_applied: bool = Field(
        description="False for a chassis curve: it is already net of driveline losses."
    )
    rev_limit_rpm: float = Field(description="Rev limit used [rpm].")
    curve_rpm_min: float = Field(description="First point of the curve [rpm].")
    peak_torque: float = Field(description="Highest torque [N*m | lbf*ft].")
    peak_torque_rpm: float = Field(description="Where torque peaks [rpm].")
    peak_power: float = Field(description="Highest power [kW | hp].")
    peak_power_rpm: float = Field(description="Where power peaks [rpm].")
    table: CurveTableOut


class TireOut(ApiModel):
    """The tire as used."""

    size: str | None = Field(None, description="Normalised size code, when given as one.")
    diameter: float | None = Field(None, description="Free overall diameter [mm | in].")
    rolling_radius: float = Field(description="Effective rolling radius [mm | in].")
    circumference: float = Field(description="Rolling circumference [mm | in].")
    revs_per_mile: float
    revs_per_km: float


class CruiseOut(ApiModel):
    """Engine speed in every gear at one road speed."""

    speed: float = Field(description="[km/h | mph]")
    rpm: list[float] = Field(description="Engine speed in each gear [rpm] (no slip).")


class PlanTopSpeedOut(ApiModel):
    """Top speed, its gear and what limits it."""

    speed: float = Field(description="[km/h | mph]")
    gear: int
    limited_by: Literal["drag", "rev_limit"]


class PerformanceOut(ApiModel):
    """What the described car does: top speed, gradeability, cruise rpm, grip."""

    top_speed: PlanTopSpeedOut
    gradeability: list[float] = Field(
        description="Steepest steady climb per gear [%], 100*tan(theta) from the exact balance "
        "W*(sin(theta) + fr*cos(theta)) + drag = drive force, with the driven tires' grip on "
        "the slope (weight transfer from grade and drive force); never above 1143 % (85 deg)."
    )
    gradeability_speed: list[float] = Field(
        description="Road speed at which each gear's gradeability is reached [km/h | mph]."
    )
    gradeability_limited_by: list[Literal["drive", "grip", "cap"]] = Field(
        description="What sets each gear's gradeability: the drive force, the tires' grip on "
        "the slope, or the 85 degree cap."
    )
    cruise: list[CruiseOut]
    traction_limit: float = Field(
        description="Traction-limited tractive force on the road's grade [N | lbf]: Gillespie "
        "ch. 2 with the rolling-resistance term of the load transfer, rolling resistance "
        "taken at rest."
    )
    force_crossover_rpm: list[float] = Field(
        description="Wheel-force crossover shift rpm per gear change, for comparison [rpm]."
    )


class ShiftPlanResponse(ApiModel):
    """Gear tables, shifts, warnings, cautions and a printable summary."""

    reference: str | None = Field(description="The caller's reference, echoed.")
    units: UnitLabels
    engine: EngineOut
    tire: TireOut
    gears: list[GearOut]
    shifts: list[ShiftOut]
    shift_criterion: Literal["tractive_force", "net_acceleration"]
    performance: PerformanceOut | None = Field(description="Present when `vehicle` is given.")
    warnings: list[NoticeOut]
    cautions: list[str] = Field(description="Safety cautions that go with the advice.")
    summary: str = Field(description="Plain-text summary, at most 80 columns, printable.")
