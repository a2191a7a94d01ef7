"""Request and response of POST /v1/comparison: a base setup beside up to eight variants."""

from __future__ import annotations

from typing import Annotated, Any, Literal, Self

from pydantic import ConfigDict, Field, model_validator

from service.schemas.acceleration import TopSpeedOut
from service.schemas.common import (
    DEFAULT_SHIFT_RULE,
    ApiModel,
    NoticeOut,
    Reference,
    UnitLabels,
    UnitsRequest,
    schema_rules,
    with_default_shift_criterion,
)
from service.schemas.inputs import CurveIn, DrivetrainIn, EngineIn, TireIn
from service.schemas.job import JobField
from service.schemas.quantities import Mass, RoadSpeed
from service.schemas.request_examples import COMPARISON_EXAMPLE
from service.schemas.shift_plan import TireOut
from service.schemas.vehicle import ConverterIn, LaunchIn, VehicleIn

__all__ = [
    "MAX_VARIANTS",
    "ComparisonCruiseOut",
    "ComparisonRequest",
    "ComparisonResponse",
    "ComparisonRunOut",
    "ComparisonShiftOut",
    "CruiseSpeed",
    "CurvePointsOut",
    "GearReachOut",
    "SetupDeltaOut",
    "SetupEngineOut",
    "SetupOut",
    "StripTimeOut",
    "VariantIn",
]

MAX_VARIANTS = 8

Ratio = Annotated[float, Field(ge=0.01, le=50)]
CruiseSpeed = Annotated[RoadSpeed, Field(description="Road speed [km/h | mph].")]
Label = Annotated[
    str | None,
    Field(
        None,
        min_length=1,
        max_length=32,
        pattern=r"^[\x20-\x7E]*$",
        description="Label shown for this variant; default `variant 1`, `variant 2`, ... "
        "Printable ASCII, at most 32 characters.",
        examples=["3.91 gears"],
    ),
]
OVERRIDES = (
    "final_drive_ratio",
    "gear_ratios",
    "tire",
    "rev_limit_rpm",
    "mass",
    "converter",
    "curve",
)


class VariantIn(ApiModel):
    """The base setup with some of its inputs replaced; at least one must be given."""

    name: Label
    final_drive_ratio: Ratio | None = Field(None, description="Replaces the final drive ratio.")
    gear_ratios: list[Ratio] | None = Field(
        None,
        min_length=1,
        max_length=12,
        description="Replaces the forward gear ratios (first gear first, descending); "
        "with a per-gear `drivetrain.efficiency` the count must stay the same.",
    )
    tire: TireIn | None = Field(None, description="Replaces the driven tire.")
    rev_limit_rpm: float | None = Field(
        None, gt=0, le=30000, description="Replaces the rev limit [rpm]."
    )
    mass: Mass | None = Field(None, description="Replaces the vehicle's test mass [kg | lb].")
    converter: ConverterIn | None = Field(
        None,
        description="Launch through this torque converter instead (keeping the lock-up "
        "gears and shift time of `launch`).",
    )
    curve: CurveIn | None = Field(
        None,
        description="Replaces the engine curve: a pull after a tune, or another dyno "
        "session, set beside the base's (before) curve. The rev limit stays the base's "
        "unless `rev_limit_rpm` is given.",
    )

    @model_validator(mode="after")
    def _changes_something(self) -> Self:
        if all(getattr(self, name) is None for name in OVERRIDES):
            raise ValueError(f"give at least one of {', '.join(f'`{n}`' for n in OVERRIDES)}")
        return self


class ComparisonRequest(UnitsRequest):
    """A base setup and the variants to set beside it (another axle, tire or gear set, or
    another engine curve: before and after a tune)."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=COMPARISON_EXAMPLE))

    reference: Reference
    job: JobField
    engine: EngineIn
    drivetrain: DrivetrainIn
    vehicle: VehicleIn | None = Field(
        None,
        description="Describe the car for the timed run (60 ft, 1/8 and 1/4 mile, 0-60 mph) "
        "and top speed.",
    )
    launch: LaunchIn | None = Field(None, description="Clutch or converter (with `vehicle`).")
    shift_criterion: Literal["tractive_force", "net_acceleration"] | None = Field(
        None,
        description="Shift at the wheel-force crossover, or (needs `vehicle`) where net "
        "acceleration crosses, road load and rotating inertia counted. " + DEFAULT_SHIFT_RULE,
    )
    cruise_speeds: list[CruiseSpeed] = Field(
        default_factory=list,
        max_length=10,
        description="Road speeds [km/h | mph] at which to give the rpm in every gear.",
    )
    variants: list[VariantIn] = Field(
        min_length=1, max_length=MAX_VARIANTS, description="One to eight variants."
    )

    @model_validator(mode="before")
    @classmethod
    def _default_criterion(cls, data: Any) -> Any:
        return with_default_shift_criterion(data)

    @model_validator(mode="after")
    def _needs_vehicle(self) -> Self:
        if self.vehicle is None:
            if self.shift_criterion == "net_acceleration" or self.launch is not None:
                raise ValueError("`net_acceleration` and `launch` need `vehicle`")
            if any(v.mass is not None or v.converter is not None for v in self.variants):
                raise ValueError("variants changing `mass` or `converter` need `vehicle`")
        return self


class GearReachOut(ApiModel):
    """One gear's ratio and reach."""

    gear: int = Field(description="Gear number, 1 for first.")
    ratio: float = Field(description="Transmission ratio.")
    overall_ratio: float = Field(description="Gear * final drive * extra reduction.")
    speed_at_rev_limit: float = Field(description="Road speed at the rev limit [km/h | mph].")


class ComparisonShiftOut(ApiModel):
    """One gear change."""

    from_gear: int
    to_gear: int
    shift_rpm: float = Field(description="Engine speed at the shift [rpm].")
    shift_speed: float = Field(description="Road speed at the shift [km/h | mph].")
    rpm_after: float = Field(description="Engine speed right after the shift [rpm].")
    rpm_drop: float = Field(description="shift_rpm - rpm_after [rpm].")
    reason: Literal["crossover", "rev_limit", "drag_limit", "traction_limit"]


class ComparisonCruiseOut(ApiModel):
    """Engine speed at one steady road speed."""

    speed: float = Field(description="[km/h | mph]")
    rpm: list[float] = Field(description="Engine speed in each gear, no slip [rpm].")
    top_gear_rpm: float = Field(description="Engine speed in top gear [rpm].")


class StripTimeOut(ApiModel):
    """Elapsed time and trap speed over a strip distance."""

    elapsed: float | None = Field(description="From the clock start [s]; null if not reached.")
    trap_speed: float | None = Field(description="Average over the last 66 ft [km/h | mph].")


class ComparisonRunOut(ApiModel):
    """The timed standing-start run and top speed of a described car."""

    sixty_ft: float | None = Field(description="60 ft elapsed time [s].")
    eighth_mile: StripTimeOut
    quarter_mile: StripTimeOut
    zero_to_60_mph: float | None = Field(description="0-60 mph from first motion [s].")
    zero_to_60_mph_less_rollout: float | None = Field(
        description="0-60 mph less the time to roll out [s]."
    )
    zero_to_100_kmh: float | None = Field(None, description="0-100 km/h from first motion [s].")
    zero_to_100_kmh_less_rollout: float | None = Field(
        None, description="0-100 km/h less the time to roll out [s]."
    )
    top_speed: TopSpeedOut


class CurvePointsOut(ApiModel):
    """A setup's own engine curve, to draw beside the base's."""

    rpm: list[float] = Field(description="Engine speed [rpm].")
    torque: list[float] = Field(description="Torque [N*m | lbf*ft].")
    power: list[float] = Field(description="Power [kW | hp].")


class SetupEngineOut(ApiModel):
    """The engine curve a setup uses, by its peaks."""

    source: Literal["engine", "chassis"] = Field(
        description="Measured at the crankshaft or at the wheels."
    )
    peak_torque: float = Field(description="[N*m | lbf*ft]")
    peak_torque_rpm: float = Field(description="[rpm]")
    peak_power: float = Field(description="[kW | hp]")
    peak_power_rpm: float = Field(description="[rpm]")
    curve: CurvePointsOut | None = Field(
        description="The curve's points: for the base, and for a variant with its own "
        "`curve`; null for a variant using the base's curve."
    )


class SetupDeltaOut(ApiModel):
    """This setup minus the base; null where either lacks the figure."""

    peak_torque: float = Field(description="[N*m | lbf*ft]")
    peak_torque_rpm: float = Field(description="[rpm]")
    peak_power: float = Field(description="[kW | hp]")
    peak_power_rpm: float = Field(description="[rpm]")

    speed_at_rev_limit: list[float | None] = Field(description="Per gear [km/h | mph].")
    shift_rpm: list[float | None] = Field(description="Per gear change [rpm].")
    rpm_after: list[float | None] = Field(description="Per gear change [rpm].")
    cruise_top_gear_rpm: list[float] = Field(description="Per cruise speed [rpm].")
    top_speed: float | None = Field(description="[km/h | mph]")
    sixty_ft: float | None = Field(description="[s]")
    eighth_mile_elapsed: float | None = Field(description="[s]")
    eighth_mile_trap_speed: float | None = Field(description="[km/h | mph]")
    quarter_mile_elapsed: float | None = Field(description="[s]")
    quarter_mile_trap_speed: float | None = Field(description="[km/h | mph]")
    zero_to_60_mph: float | None = Field(description="[s]")
    zero_to_100_kmh: float | None = Field(None, description="[s]")


class SetupOut(ApiModel):
    """One setup's figures."""

    name: str = Field(description="`base`, or the variant's label.")
    changes: list[str] = Field(description="The base inputs this setup replaces.")
    final_drive_ratio: float
    gear_ratios: list[float]
    rev_limit_rpm: float = Field(description="Rev limit used [rpm].")
    engine: SetupEngineOut
    tire: TireOut
    gears: list[GearReachOut]
    shifts: list[ComparisonShiftOut]
    cruise: list[ComparisonCruiseOut]
    run: ComparisonRunOut | None = Field(description="Present when `vehicle` is given.")
    delta: SetupDeltaOut | None = Field(description="Against the base; null for the base.")
    warnings: list[NoticeOut]


class ComparisonResponse(ApiModel):
    """The base and every variant side by side, with deltas against the base."""

    reference: str | None
    units: UnitLabels
    shift_criterion: Literal["tractive_force", "net_acceleration"]
    setups: list[SetupOut] = Field(description="The base first, then each variant.")
    cautions: list[str]
    summary: str = Field(description="Plain-text summary, at most 80 columns, printable.")
