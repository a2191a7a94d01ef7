"""Models shared by several endpoints: units, warnings, problems, the base config."""

from __future__ import annotations

from typing import Annotated, Any

from pydantic import BaseModel, ConfigDict, Field

from service.units import UnitSystem

__all__ = [
    "DEFAULT_SHIFT_RULE",
    "ApiModel",
    "NoticeOut",
    "Problem",
    "ProblemItem",
    "Reference",
    "UnitLabels",
    "UnitsField",
    "with_default_shift_criterion",
]

DEFAULT_SHIFT_RULE = (
    "Default (the same for the shift plan, the acceleration run and the comparison): "
    "`net_acceleration` when `vehicle` describes the car, else `tractive_force`."
)


def with_default_shift_criterion(data: Any, field: str = "shift_criterion") -> Any:
    """A request body with the default shift rule filled in where the caller gave none."""
    if isinstance(data, dict) and data.get(field) is None:
        has_vehicle = data.get("vehicle") is not None
        return {**data, field: "net_acceleration" if has_vehicle else "tractive_force"}
    return data


class ApiModel(BaseModel):
    """Base of every request and response model: unknown fields rejected, finite numbers."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, frozen=True)


Reference = Annotated[
    str | None,
    Field(
        None,
        max_length=64,
        pattern=r"^[\x20-\x7E]*$",
        description="Caller's own reference (e.g. a work-order id), echoed in the response; "
        "printable ASCII, at most 64 characters.",
        examples=["WO-2291"],
    ),
]

UnitsField = Annotated[
    UnitSystem,
    Field(
        UnitSystem.METRIC,
        description="Unit system of every input and output quantity: `metric` (N*m, kW, "
        "km/h, N, mm, kg) or `us` (lbf*ft, hp, mph, lbf, in, lb). Engine speed is rpm.",
    ),
]


class UnitLabels(ApiModel):
    """The unit of every quantity in the response."""

    engine_speed: str = Field(description="Unit of engine speeds.", examples=["rpm"])
    torque: str = Field(description="Unit of torques.", examples=["N*m"])
    power: str = Field(description="Unit of powers.", examples=["kW"])
    speed: str = Field(description="Unit of road speeds.", examples=["km/h"])
    force: str = Field(description="Unit of forces.", examples=["N"])
    length: str = Field(description="Unit of lengths.", examples=["mm"])
    mass: str = Field(description="Unit of masses.", examples=["kg"])
    distance: str = Field(description="Unit of distances run.", examples=["m"])
    area: str = Field(description="Unit of areas.", examples=["m^2"])
    pressure: str = Field(description="Unit of pressures.", examples=["kPa"])
    temperature: str = Field(description="Unit of temperatures.", examples=["degC"])


class NoticeOut(ApiModel):
    """A warning about the inputs or the result."""

    code: str = Field(description="Stable identifier of the warning.")
    message: str = Field(description="One plain sentence.")
    field: str | None = Field(None, description="Request field concerned, if any.")


class ProblemItem(BaseModel):
    """One offending field."""

    field: str | None = Field(None, description="Dotted path of the field, e.g. `a.b[2]`.")
    message: str = Field(description="What is wrong with it.")


class Problem(BaseModel):
    """RFC 9457 problem details."""

    type: str = Field(description="URI identifying the kind of problem.")
    title: str = Field(description="Short summary of the kind of problem.")
    status: int = Field(description="HTTP status code.")
    detail: str = Field(description="What went wrong with this request.")
    instance: str = Field(description="Path of the request.")
    field: str | None = Field(None, description="First offending field, if any.")
    errors: list[ProblemItem] = Field(default_factory=list, description="Offending fields.")
