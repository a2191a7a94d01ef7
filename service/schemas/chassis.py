"""Request and response of POST /v1/chassis-dyno/convert."""

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
from service.schemas.job import JobField
from service.schemas.quantities import CurvePower, CurveTorque, FixedLoss
from service.schemas.request_examples import CHASSIS_EXAMPLE

__all__ = [
    "ChassisConversionRequest",
    "ChassisConversionResponse",
    "ChassisCurveIn",
    "ConvertedCurveOut",
    "DrivelineLossIn",
    "GearCurveOut",
    "PeaksOut",
]

MAX_POINTS = 2000
MAX_GEARS = 12

Rpm = Annotated[float, Field(ge=1, le=30000)]
GearEfficiency = Annotated[float, Field(ge=0.4, le=1)]


class ChassisCurveIn(ApiModel):
    """A curve against engine rpm, at the wheels or at the engine."""

    model_config = ConfigDict(json_schema_extra=schema_rules(("torque",), ("power",)))

    rpm: list[Rpm] = Field(
        min_length=1,
        max_length=MAX_POINTS,
        description="Engine speed [rpm], strictly increasing, 1 to 2000 points (one point "
        "converts a single figure, e.g. a peak).",
    )
    torque: list[CurveTorque] | None = Field(
        None,
        max_length=MAX_POINTS,
        description="Torque at each rpm [N*m | lbf*ft]; at the wheels, as chassis dynos "
        "report it: wheel power over engine angular speed. Give `torque` or `power`.",
    )
    power: list[CurvePower] | None = Field(
        None, max_length=MAX_POINTS, description="Power at each rpm [kW | hp]."
    )
    measured_at: Literal["wheels", "engine"] = Field(
        "wheels",
        description="`wheels`: a chassis-dyno curve, converted to an engine estimate; "
        "`engine`: an engine-dyno curve, converted to what the wheels get.",
    )

    @model_validator(mode="after")
    def _one_series(self) -> Self:
        if (self.torque is None) == (self.power is None):
            raise ValueError("give exactly one of `torque` or `power`")
        return self


class DrivelineLossIn(ApiModel):
    """The driveline's loss: as a per cent, as an efficiency, or per gear; optionally plus a
    fixed part."""

    model_config = ConfigDict(
        json_schema_extra=schema_rules(
            ("loss_percent",), ("efficiency",), ("gear_efficiencies", "measured_gear")
        )
    )

    loss_percent: float | None = Field(
        None,
        ge=0,
        le=60,
        description="Loss as a share of engine power [%]: efficiency = 1 - loss/100 "
        "(typical 10 to 18 % for a manual rear-drive car, common practice).",
    )
    efficiency: float | None = Field(
        None, ge=0.4, le=1, description="Driveline efficiency, wheel over engine power [-]."
    )
    gear_efficiencies: list[GearEfficiency] | None = Field(
        None,
        min_length=1,
        max_length=MAX_GEARS,
        description="Efficiency in each gear, first gear first [-]; with `measured_gear`, "
        "the curve is also re-expressed for every gear by eta_j / eta_k.",
    )
    measured_gear: int | None = Field(
        None, ge=1, le=MAX_GEARS, description="Gear the curve was measured in (1 = first)."
    )
    fixed_loss: FixedLoss | None = Field(
        None,
        description="Fixed part of the loss [kW | hp], with `loss_percent` or `efficiency`: "
        "wheel = engine x (1 - loss_percent/100) - fixed_loss, the common chassis-dyno "
        "convention of a fixed part plus a percentage (common practice).",
    )

    @model_validator(mode="after")
    def _one_form(self) -> Self:
        given = [
            name
            for name in ("loss_percent", "efficiency", "gear_efficiencies")
            if getattr(self, name) is not None
        ]
        if len(given) != 1:
            raise ValueError(
                "give exactly one of `loss_percent`, `efficiency` or `gear_efficiencies`"
            )
        if (self.gear_efficiencies is None) != (self.measured_gear is None):
            raise ValueError("`measured_gear` goes with, and only with, `gear_efficiencies`")
        if self.fixed_loss is not None and self.gear_efficiencies is not None:
            raise ValueError("`fixed_loss` goes with `loss_percent` or `efficiency`")
        return self


class ChassisConversionRequest(UnitsRequest):
    """A curve and the driveline loss."""

    model_config = ConfigDict(json_schema_extra=schema_rules(example=CHASSIS_EXAMPLE))

    reference: Reference
    job: JobField
    curve: ChassisCurveIn
    driveline: DrivelineLossIn


class ConvertedCurveOut(ApiModel):
    """The curve at the engine and at the wheels, on the input's rpm."""

    rpm: list[float] = Field(description="[rpm]")
    engine_torque: list[float] = Field(description="[N*m | lbf*ft]")
    engine_power: list[float] = Field(description="[kW | hp]")
    wheel_torque: list[float] = Field(
        description="Wheel power over engine angular speed [N*m | lbf*ft]."
    )
    wheel_power: list[float] = Field(description="[kW | hp]")


class PeaksOut(ApiModel):
    """Peaks of the converted curve."""

    engine_power: float = Field(description="[kW | hp]")
    wheel_power: float = Field(description="[kW | hp]")
    power_rpm: float = Field(description="Where power peaks [rpm].")
    engine_torque: float = Field(description="[N*m | lbf*ft]")
    wheel_torque: float = Field(description="[N*m | lbf*ft]")
    torque_rpm: float = Field(description="Where torque peaks [rpm].")


class GearCurveOut(ApiModel):
    """The wheel curve in one gear, at the same engine rpm."""

    gear: int
    efficiency: float
    factor: float = Field(description="eta_j / eta_k: this gear's curve over the measured one.")
    wheel_torque: list[float] = Field(description="[N*m | lbf*ft]")
    wheel_power: list[float] = Field(description="[kW | hp]")
    peak_wheel_power: float = Field(description="[kW | hp]")


class ChassisConversionResponse(ApiModel):
    """Engine and wheel curves, peaks, per-gear curves, warnings and a printable summary."""

    reference: str | None
    units: UnitLabels
    measured_at: Literal["wheels", "engine"]
    measured_gear: int | None
    efficiency: float = Field(description="Efficiency of the run's gear [-].")
    loss_percent: float = Field(description="100 * (1 - efficiency) [%].")
    fixed_loss: float = Field(description="Fixed part of the loss [kW | hp]; 0 if none.")
    curve: ConvertedCurveOut
    peaks: PeaksOut
    gears: list[GearCurveOut] | None
    warnings: list[NoticeOut]
    summary: str
