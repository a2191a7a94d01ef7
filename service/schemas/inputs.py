"""Input models shared by every calculation: engine curve, drivetrain, tire."""

from __future__ import annotations

from typing import Annotated, Any, Literal, Self

from pydantic import ConfigDict, Discriminator, Field, Tag, model_validator

from core.engine.curves import MIN_RPM
from core.units import MILE_M
from service.schemas.common import ApiModel, schema_rules
from service.schemas.quantities import CurvePower, CurveTorque, TireDiameter

__all__ = ["CurveIn", "DrivetrainIn", "EngineIn", "RingPinionIn", "TireIn"]

MAX_CURVE_POINTS = 2000
MAX_GEARS = 12

Rpm = Annotated[float, Field(ge=MIN_RPM, le=30000, description="Engine speed [rpm].")]
Ratio = Annotated[float, Field(ge=0.01, le=50)]
Efficiency = Annotated[float, Field(ge=0.4, le=1)]  # as the chassis-dyno efficiencies
MIN_TIRE_CIRCUMFERENCE_M = 0.1
"""Smallest rolling circumference accepted [m], whichever way the tire is given."""


def _one_or_per_gear(value: Any) -> str:
    """Which member of a value-or-list union a value is, so only that member reports errors."""
    return "per-gear" if isinstance(value, list | tuple) else "one-value"


Efficiencies = Annotated[
    Annotated[Efficiency, Tag("one-value")] | Annotated[list[Efficiency], Tag("per-gear")],
    Discriminator(_one_or_per_gear),
]


class CurveIn(ApiModel):
    """A measured curve: torque or power at strictly increasing engine speeds."""

    model_config = ConfigDict(json_schema_extra=schema_rules(("torque",), ("power",)))

    rpm: list[Rpm] = Field(
        min_length=3,
        max_length=MAX_CURVE_POINTS,
        description="Engine speeds [rpm], strictly increasing, 3 to 2000 points.",
    )
    torque: list[CurveTorque] | None = Field(
        None,
        max_length=MAX_CURVE_POINTS,
        description="Torque at each rpm [N*m | lbf*ft]. Give `torque` or `power`, not both.",
    )
    power: list[CurvePower] | None = Field(
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

    model_config = ConfigDict(
        json_schema_extra=schema_rules(
            ("diameter",), ("size",), ("revs_per_mile",), ("revs_per_km",)
        )
    )

    diameter: TireDiameter | None = Field(None, description="Overall diameter [mm | in].")
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
        None,
        gt=0,
        le=MILE_M / MIN_TIRE_CIRCUMFERENCE_M,
        description="Maker's revolutions per mile [1/mi].",
    )
    revs_per_km: float | None = Field(
        None,
        gt=0,
        le=1000.0 / MIN_TIRE_CIRCUMFERENCE_M,
        description="Maker's revolutions per kilometre [1/km].",
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


class RingPinionIn(ApiModel):
    """The final drive by tooth counts, as stamped on a ring gear (e.g. 41/11)."""

    ring_teeth: int = Field(ge=10, le=120, description="Teeth on the ring gear [-].")
    pinion_teeth: int = Field(ge=4, le=60, description="Teeth on the pinion [-].")

    @property
    def ratio(self) -> float:
        """Final drive ratio, ring over pinion [-]."""
        return self.ring_teeth / self.pinion_teeth


def _final_drive_schema(schema: dict[str, Any]) -> None:
    """The final drive is given by `final_drive_ratio` or `ring_and_pinion`, not both."""
    schema["required"] = [r for r in schema.get("required", []) if r != "final_drive_ratio"]
    schema["oneOf"] = [
        {
            "required": ["final_drive_ratio"],
            "properties": {"ring_and_pinion": {"type": "null"}},
        },
        {
            "required": ["ring_and_pinion"],
            "properties": {
                "ring_and_pinion": {"type": "object"},
                "final_drive_ratio": {"type": "null"},
            },
        },
    ]


class DrivetrainIn(ApiModel):
    """Gear ratios, final drive, optional extra reduction, losses and tire."""

    model_config = ConfigDict(json_schema_extra=_final_drive_schema)

    gear_ratios: list[Ratio] = Field(
        min_length=1,
        max_length=MAX_GEARS,
        description="Forward gear ratios, first gear first, strictly descending; 1 to 12.",
        examples=[[3.10, 2.05, 1.48, 1.16, 0.94, 0.79]],
    )
    final_drive_ratio: Ratio = Field(
        description="Final drive (axle) ratio [-]; or give `ring_and_pinion` instead."
    )
    ring_and_pinion: RingPinionIn | None = Field(
        None,
        description="The final drive by tooth counts instead of `final_drive_ratio`: the "
        "ratio is ring / pinion (41/11 = 3.727).",
    )
    extra_reduction: Ratio = Field(
        1.0, description="Further fixed reduction in series (transfer case, drop gear)."
    )
    efficiency: Efficiencies = Field(
        1.0,
        description="Driveline efficiency [-], one value or one per gear, 0.4 to 1; 1 means "
        "lossless (typical 0.85 to 0.92, common practice). Ignored for a chassis curve.",
    )
    tire: TireIn

    @model_validator(mode="before")
    @classmethod
    def _ratio_from_teeth(cls, data: Any) -> Any:
        """Fill `final_drive_ratio` from the tooth counts when they are given."""
        if not isinstance(data, dict) or data.get("ring_and_pinion") is None:
            return data
        if data.get("final_drive_ratio") is not None:
            raise ValueError("give `final_drive_ratio` or `ring_and_pinion`, not both")
        teeth = data["ring_and_pinion"]
        ring = teeth.get("ring_teeth") if isinstance(teeth, dict) else None
        pinion = teeth.get("pinion_teeth") if isinstance(teeth, dict) else None
        numbers = all(
            isinstance(x, int | float) and not isinstance(x, bool) and float(x).is_integer()
            for x in (ring, pinion)
        )
        ratio = ring / pinion if numbers and pinion > 0 else 1.0  # type: ignore[operator]
        return {**data, "final_drive_ratio": ratio}
