"""Input models shared by every calculation: engine curve, drivetrain, tire."""

from __future__ import annotations

from typing import Annotated, Literal, Self

from pydantic import Field, model_validator

from core.curves import MIN_RPM
from service.schemas.common import ApiModel

__all__ = ["CurveIn", "DrivetrainIn", "EngineIn", "TireIn"]

MAX_CURVE_POINTS = 2000
MAX_GEARS = 12

Rpm = Annotated[float, Field(ge=MIN_RPM, le=30000, description="Engine speed [rpm].")]
CurveValue = Annotated[float, Field(ge=0, le=100000)]
Ratio = Annotated[float, Field(ge=0.01, le=50)]
Efficiency = Annotated[float, Field(gt=0, le=1)]


class CurveIn(ApiModel):
    """A measured curve: torque or power at strictly increasing engine speeds."""

    rpm: list[Rpm] = Field(
        min_length=3,
        max_length=MAX_CURVE_POINTS,
        description="Engine speeds [rpm], strictly increasing, 3 to 2000 points.",
    )
    torque: list[CurveValue] | None = Field(
        None,
        max_length=MAX_CURVE_POINTS,
        description="Torque at each rpm [N*m | lbf*ft]. Give `torque` or `power`, not both.",
    )
    power: list[CurveValue] | None = Field(
        None,
        max_length=MAX_CURVE_POINTS,
        description="Power at each rpm [kW | hp]. Give `torque` or `power`, not both.",
    )
    source: Literal["engine", "chassis"] = Field(
        "engine",
        description="`engine`: measured at the crankshaft; driveline efficiency is applied. "
        "`chassis`: measured at the wheels and referred to engine rpm, already net of "
        "driveline losses; efficiency is not applied again.",
    )
    interpolation: Literal["pchip", "linear"] = Field(
        "pchip",
        description="Between points: monotone piecewise cubic (`pchip`, no overshoot) or "
        "straight lines (`linear`). The curve is never extrapolated.",
    )

    @model_validator(mode="after")
    def _one_series(self) -> Self:
        if (self.torque is None) == (self.power is None):
            raise ValueError("give exactly one of `torque` or `power`")
        return self


class EngineIn(ApiModel):
    """The engine: its curve and rev limit."""

    curve: CurveIn
    rev_limit_rpm: float | None = Field(
        None,
        ge=MIN_RPM,
        le=30000,
        description="Rev limit [rpm]; default the curve's last point. Above the last point "
        "it is clipped to it, with a warning.",
    )


class TireIn(ApiModel):
    """The driven tire, by exactly one of diameter, size code, or revolutions per distance."""

    diameter: float | None = Field(None, gt=0, le=5000, description="Overall diameter [mm | in].")
    size: str | None = Field(
        None,
        min_length=4,
        max_length=40,
        description="ISO metric size (e.g. `245/40R18`, `P215/65R15`, `LT265/75R16`; a "
        "trailing load index and speed symbol are ignored) or flotation size (e.g. "
        "`31x10.50R15`).",
        examples=["245/40R18"],
    )
    revs_per_mile: float | None = Field(
        None, gt=0, le=10000, description="Maker's revolutions per mile [1/mi]."
    )
    revs_per_km: float | None = Field(
        None, gt=0, le=10000, description="Maker's revolutions per kilometre [1/km]."
    )
    rolling_factor: float = Field(
        1.0,
        ge=0.85,
        le=1.0,
        description="Effective rolling radius as a fraction of the free radius, for "
        "`diameter` and `size` (loaded tires roll about 2-3 % small, common practice).",
    )

    @model_validator(mode="after")
    def _one_description(self) -> Self:
        given = [
            name
            for name in ("diameter", "size", "revs_per_mile", "revs_per_km")
            if getattr(self, name) is not None
        ]
        if len(given) != 1:
            raise ValueError(
                "give exactly one of `diameter`, `size`, `revs_per_mile` or `revs_per_km`"
            )
        return self


class DrivetrainIn(ApiModel):
    """Gear ratios, final drive, optional extra reduction, losses and tire."""

    gear_ratios: list[Ratio] = Field(
        min_length=1,
        max_length=MAX_GEARS,
        description="Forward gear ratios, first gear first, strictly descending; 1 to 12.",
        examples=[[3.10, 2.05, 1.48, 1.16, 0.94, 0.79]],
    )
    final_drive_ratio: Ratio = Field(description="Final drive (axle) ratio.")
    extra_reduction: Ratio = Field(
        1.0, description="Further fixed reduction in series (transfer case, drop gear)."
    )
    efficiency: Efficiency | list[Efficiency] = Field(
        1.0,
        description="Driveline efficiency, one value or one per gear, in (0, 1]; 1 means "
        "lossless (typical 0.85 to 0.92, common practice). Ignored for a chassis curve.",
    )
    tire: TireIn
