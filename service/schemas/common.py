"""Models shared by several endpoints: units, warnings, problems, the base config."""

from __future__ import annotations

import typing
from collections.abc import Callable, Mapping, Sequence
from typing import Annotated, Any, Self

from pydantic import BaseModel, ConfigDict, Field, model_validator

from service.bounds import check_bounds
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
    "UnitsRequest",
    "schema_rules",
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


def _given(fields: Sequence[str], all_fields: Sequence[str] = ()) -> dict[str, Any]:
    """A schema: ``fields`` present and not null (and, listed in ``all_fields`` but not in
    ``fields``, absent or null)."""
    return {
        "required": list(fields),
        "properties": {
            name: {"not": {"type": "null"}} if name in fields else {"type": "null"}
            for name in (all_fields or fields)
        },
    }


def schema_rules(
    *forms: tuple[str, ...],
    example: Mapping[str, Any] | None = None,
    any_form: Sequence[tuple[str, ...]] = (),
    exclusive: Sequence[tuple[str, ...]] = (),
) -> Callable[[dict[str, Any]], None]:
    """A ``json_schema_extra`` stating in the schema what a model validator enforces.

    Each form is a set of fields given together; exactly one form may be given (``oneOf``):
    a form's fields are present and not null, every other form's fields absent or null.
    ``any_form`` lists forms of which at least one is given (``anyOf``); each tuple of
    ``exclusive`` names fields that may not all be given together (``not``). ``example``
    adds an example request.
    """
    fields = sorted({name for form in forms for name in form})

    def extra(schema: dict[str, Any]) -> None:
        if forms:
            schema["oneOf"] = [_given(form, fields) for form in forms]
        if any_form:
            schema["anyOf"] = [_given(form) for form in any_form]
        if exclusive:
            schema["allOf"] = [{"not": _given(group)} for group in exclusive]
        if example is not None:
            schema["examples"] = [dict(example)]

    return extra


def _numeric(annotation: Any) -> bool:
    """Whether a field's type holds numbers (float or int, in a list or a union)."""
    if annotation in (float, int):
        return True
    return any(_numeric(arg) for arg in typing.get_args(annotation))


def _unbool(value: Any) -> Any:
    """JSON `true`/`false` as text, so a number field reports them as not numbers."""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return [_unbool(v) for v in value]
    return value


_NUMERIC_FIELDS: dict[type[BaseModel], tuple[str, ...]] = {}


def _numeric_fields(model: type[BaseModel]) -> tuple[str, ...]:
    """The fields of a model class that hold numbers (worked out once per class)."""
    names = _NUMERIC_FIELDS.get(model)
    if names is None:
        names = _NUMERIC_FIELDS[model] = tuple(
            name for name, info in model.model_fields.items() if _numeric(info.annotation)
        )
    return names


class ApiModel(BaseModel):
    """Base of every request and response model: unknown fields rejected, finite numbers,
    and `true`/`false` never taken for 1 and 0."""

    model_config = ConfigDict(extra="forbid", allow_inf_nan=False, frozen=True)

    @model_validator(mode="before")
    @classmethod
    def _no_bool_numbers(cls, data: Any) -> Any:
        if not isinstance(data, dict):
            return data
        fixed = None
        for name in _numeric_fields(cls):
            value = data.get(name)
            if isinstance(value, bool) or (
                isinstance(value, list) and bool in set(map(type, value))
            ):
                fixed = dict(data) if fixed is None else fixed
                fixed[name] = _unbool(value)
        return data if fixed is None else fixed


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
        description="Unit system of every input and output quantity, limits and messages "
        "included: `metric` (N*m, kW, km/h, N, mm, kg, m, m^2, kPa, degC, kg*m^2) or `us` "
        "(lbf*ft, hp, mph, lbf, in, lb, ft, ft^2, inHg, degF, lb*ft^2). Engine speed is rpm "
        "in both. Every limit is one physical limit, checked after conversion to SI.",
    ),
]


class UnitsRequest(ApiModel):
    """Base of a request body that carries `units`: every SI limit is checked in them.

    A value outside its limit raises :class:`service.bounds.BoundsError` (a 422 naming each
    field with its index and quoting the limit in the caller's unit) once every field has
    validated.
    """

    units: UnitsField

    @model_validator(mode="after")
    def _si_limits(self) -> Self:
        check_bounds(self, self.units)
        return self


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
    inertia: str = Field(description="Unit of rotating inertias.", examples=["kg*m^2"])
    k_factor: str = Field(description="Unit of converter K-factors.", examples=["rpm/sqrt(N*m)"])
    force_per_speed: str = Field(
        description="Unit of the coast-down term F1.", examples=["N/(km/h)"]
    )
    force_per_speed_squared: str = Field(
        description="Unit of the coast-down term F2.", examples=["N/(km/h)^2"]
    )
    odometer: str = Field(description="Unit of odometer distances.", examples=["km"])
    density: str = Field(description="Unit of air densities.", examples=["kg/m^3"])


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
