"""Limits defined once in SI and checked after conversion from the caller's units.

A request field that carries a unit is annotated with :class:`SiLimits` instead of pydantic's
``ge``/``le``, so 5000 m is the same limit as 16404.1 ft and 110 kPa the same as 32.48 inHg.
:func:`bound_violations` walks a validated request, converts every such value to SI with the
request's ``units`` and names each offending field by its exact path (``run.extra_distances[2]``),
quoting the limit in the caller's unit. Every other bound (ratios, shares, rpm, counts) is the
same number in both systems and stays a plain pydantic constraint.

In the OpenAPI document a limited number carries ``x-si-limits`` (the limits in SI), ``x-limits``
(the same limits in each unit system) and, as ``minimum``/``maximum``, the loosest of them, so
a generator or a fuzzer knows the envelope.
"""

from __future__ import annotations

import functools
import math
import types
import typing
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from typing import Any

import numpy as np
from pydantic import BaseModel, GetJsonSchemaHandler
from pydantic.json_schema import JsonSchemaValue
from pydantic_core import CoreSchema

from service.http.problems import ProblemError
from service.units import (
    NAMED_UNITS,
    Quantity,
    UnitSystem,
    from_named,
    si_label,
    to_named,
    to_si,
    unit_label,
)
from service.units import from_si as _from_si

__all__ = ["BoundsError", "SiLimits", "bound_violations", "check_bounds", "limited_fields"]

_SIG = 6


def _round_sig(x: float, direction: int) -> float:
    """``x`` to six significant digits, rounded toward +inf (1) or -inf (-1)."""
    x = float(f"{x:.12g}")  # drop conversion noise first: -39.99999999999997 is -40
    if x == 0.0 or not math.isfinite(x):
        return x
    scale = 10.0 ** (_SIG - 1 - math.floor(math.log10(abs(x))))
    y = (math.ceil if direction > 0 else math.floor)(x * scale) / scale
    return float(f"{y:.{_SIG}g}")


@dataclass(frozen=True)
class SiLimits:
    """A range in SI for a quantity given in the caller's units.

    ``quantity`` converts by the request's unit system; a field whose sibling ``unit_field``
    names its unit (a log channel) converts by that unit, or by the system's speed unit when
    the sibling is null. ``si_unit`` labels a quantity outside :class:`Quantity`.
    """

    quantity: Quantity | None
    gt: float | None = None
    ge: float | None = None
    lt: float | None = None
    le: float | None = None
    unit_field: str | None = None
    choices: tuple[str, ...] = ()
    si_unit: str = ""

    def _quantity(self) -> Quantity:
        if self.quantity is None:
            raise TypeError("limits without a quantity need `unit_field` and `choices`")
        return self.quantity

    def _unit(self, model: BaseModel | None, units: UnitSystem) -> str:
        named = (
            None if model is None or self.unit_field is None else getattr(model, self.unit_field)
        )
        if named is not None:
            return str(named)
        if self.quantity is None:  # pragma: no cover - a named unit field has a default
            return self.si_unit
        return unit_label(self.quantity, units)

    def _from_si(self, value: float, unit: str, units: UnitSystem) -> float:
        if self.unit_field is not None and unit in NAMED_UNITS:
            return to_named(value, unit)
        return _from_si(value, self._quantity(), units)

    def _to_si(self, value: float, unit: str, units: UnitSystem) -> float:
        if self.unit_field is not None and unit in NAMED_UNITS:
            return from_named(value, unit)
        return to_si(value, self._quantity(), units)

    def problem(self, value: float, model: BaseModel | None, units: UnitSystem) -> str | None:
        """What is wrong with ``value`` (in the caller's unit), or None when it is inside."""
        unit = self._unit(model, units)
        si = self._to_si(value, unit, units)
        got = f"got {value:g} {unit}"
        for limit, above, strict in (
            (self.gt, True, True),
            (self.ge, True, False),
            (self.lt, False, True),
            (self.le, False, False),
        ):
            if limit is None:
                continue
            bad = (
                (si <= limit if strict else si < limit)
                if above
                else (si >= limit if strict else si > limit)
            )
            if bad:
                # the limit quoted is rounded inward, so the number quoted is itself accepted
                shown = _round_sig(self._from_si(limit, unit, units), 1 if above else -1)
                word = (
                    ("above" if strict else "at least")
                    if above
                    else ("below" if strict else "at most")
                )
                return f"must be {word} {shown:g} {unit}, {got}"
        return None

    def _units_and_values(self) -> list[tuple[str, dict[str, float]]]:
        """The limits in each unit the field may be given in."""
        convert: list[tuple[str, Callable[[float], float]]]
        if self.unit_field is not None:
            convert = [(u, functools.partial(to_named, unit=u)) for u in self.choices]
        else:
            q = self._quantity()
            convert = [
                (unit_label(q, s), functools.partial(_from_si, quantity=q, system=s))
                for s in UnitSystem
            ]
        out = []
        for label, f in convert:
            vals = {
                k: float(f(v))
                for k, v in (("gt", self.gt), ("ge", self.ge), ("lt", self.lt), ("le", self.le))
                if v is not None
            }
            out.append((label, vals))
        return out

    def __get_pydantic_json_schema__(
        self, core_schema: CoreSchema, handler: GetJsonSchemaHandler
    ) -> JsonSchemaValue:
        js = handler(core_schema)
        target = js
        for branch in js.get("anyOf", ()):
            if branch.get("type") in {"number", "integer"}:
                target = branch
        per_unit = self._units_and_values()
        low = [
            (v.get("gt", v.get("ge")), "gt" in v) for _, v in per_unit if v.keys() & {"gt", "ge"}
        ]
        high = [
            (v.get("lt", v.get("le")), "lt" in v) for _, v in per_unit if v.keys() & {"lt", "le"}
        ]
        if low:
            value, strict = min(low, key=lambda t: t[0] or 0.0)
            target["exclusiveMinimum" if strict else "minimum"] = _round_sig(float(value or 0), -1)
        if high:
            value, strict = max(high, key=lambda t: t[0] or 0.0)
            target["exclusiveMaximum" if strict else "maximum"] = _round_sig(float(value or 0), 1)
        si_unit = si_label(self.quantity) if self.quantity is not None else self.si_unit
        si = {
            k: v for k, v in (("gt", self.gt), ("ge", self.ge), ("lt", self.lt), ("le", self.le))
        }
        target["x-si-limits"] = {"unit": si_unit, **{k: v for k, v in si.items() if v is not None}}
        target["x-limits"] = {label: _describe(vals, label) for label, vals in per_unit}
        return js


def _describe(vals: dict[str, float], unit: str) -> str:
    """``0 < x <= 16404.1 ft`` from the limits in one unit."""
    parts = []
    if "gt" in vals:
        parts.append(f"{_round_sig(vals['gt'], 1):g} <")
    elif "ge" in vals:
        parts.append(f"{_round_sig(vals['ge'], 1):g} <=")
    parts.append("x")
    if "lt" in vals:
        parts.append(f"< {_round_sig(vals['lt'], -1):g}")
    elif "le" in vals:
        parts.append(f"<= {_round_sig(vals['le'], -1):g}")
    return " ".join(parts) + f" {unit}"


class BoundsError(ProblemError):
    """A 422 naming every field outside its SI limit, in the caller's units."""

    def __init__(self, errors: list[dict[str, str]]) -> None:
        first = errors[0]
        detail = first["message"] + (f" (and {len(errors) - 1} more)" if len(errors) > 1 else "")
        super().__init__(422, detail, field=first["field"], errors=errors)


_MEMBERS: dict[Any, list[tuple[Any, tuple[Any, ...]]]] = {}


def _members(annotation: Any) -> list[tuple[Any, tuple[Any, ...]]]:
    """Union members of an annotation, each stripped of ``Annotated`` with its metadata
    (kept per annotation: a request's fields share a few dozen)."""
    try:
        return _MEMBERS[annotation]
    except KeyError:
        pass
    except TypeError:  # an annotation that cannot be a key: work it out each time
        return _unpack(annotation)
    found = _MEMBERS[annotation] = _unpack(annotation)
    return found


def _unpack(annotation: Any) -> list[tuple[Any, tuple[Any, ...]]]:
    origin = typing.get_origin(annotation)
    if origin is typing.Union or origin is types.UnionType:
        return [m for arg in typing.get_args(annotation) for m in _members(arg)]
    if origin is typing.Annotated:
        inner, *meta = typing.get_args(annotation)
        return [(ann, (*meta, *more)) for ann, more in _members(inner)]
    return [(annotation, ())]


def _pick(value: Any, annotation: Any) -> tuple[Any, tuple[Any, ...]]:
    """The member of ``annotation`` that ``value`` was validated as."""
    for ann, meta in _members(annotation):
        origin = typing.get_origin(ann) or ann
        if isinstance(value, BaseModel) and isinstance(origin, type) and isinstance(value, origin):
            return ann, meta
        if isinstance(value, list | tuple) and origin in {list, tuple}:
            return ann, meta
        if (
            isinstance(value, int | float)
            and not isinstance(value, bool)
            and origin in {float, int}
        ):
            return ann, meta
    return None, ()


def _scan(
    value: Any,
    annotation: Any,
    metadata: tuple[Any, ...],
    path: str,
    model: BaseModel,
    units: UnitSystem,
) -> Iterator[dict[str, str]]:
    ann, meta = _pick(value, annotation)
    if isinstance(value, BaseModel):
        yield from _walk(value, path, units)
    elif isinstance(value, list | tuple):
        args = typing.get_args(ann)
        if typing.get_origin(ann) is list and args and _all_numbers(value):
            yield from _scan_numbers(value, args[0], path, model, units)
            return
        for i, item in enumerate(value):
            item_ann = args[0] if typing.get_origin(ann) is list or len(args) <= i else args[i]
            yield from _scan(item, item_ann, (), f"{path}[{i}]", model, units)
    elif isinstance(value, int | float) and not isinstance(value, bool):
        for limits in (*metadata, *meta):
            if isinstance(limits, SiLimits):
                wrong = limits.problem(float(value), model, units)
                if wrong is not None:
                    yield {"field": path, "message": f"`{path}` {wrong}"}


def _all_numbers(values: list[Any] | tuple[Any, ...]) -> bool:
    """Whether every item is an int or a float (never a bool): a list of plain numbers."""
    kinds = {type(v) for v in values}
    return bool(kinds) and kinds <= {float, int}


def _scan_numbers(
    values: list[Any] | tuple[Any, ...],
    annotation: Any,
    path: str,
    model: BaseModel,
    units: UnitSystem,
) -> Iterator[dict[str, str]]:
    """:func:`_scan` of a list of plain numbers, every item at once: the items are
    converted to SI as one array (the same multiply and add as one at a time, so the same
    numbers) and only an item found outside a limit is looked at on its own, for its
    message."""
    _, meta = _pick(0.0, annotation)
    limits = [m for m in meta if isinstance(m, SiLimits)]
    if not limits:
        return
    raw = np.asarray(values, dtype=np.float64)
    flagged = np.zeros(raw.shape, dtype=bool)
    for lim in limits:
        unit = lim._unit(model, units)
        with np.errstate(over="ignore"):  # a huge value becomes inf, as a float does
            si = lim._to_si(raw, unit, units)  # type: ignore[arg-type]
        for limit, bad in (
            (lim.gt, np.less_equal),
            (lim.ge, np.less),
            (lim.lt, np.greater_equal),
            (lim.le, np.greater),
        ):
            if limit is not None:
                flagged |= bad(si, limit)
    for i in np.flatnonzero(flagged).tolist():
        yield from _scan(values[i], annotation, (), f"{path}[{i}]", model, units)


def _mentions_limits(annotation: Any) -> bool:
    """Whether a type can hold a value with SI limits: an ``SiLimits`` or a model anywhere
    in it (a forward reference counts, to be safe)."""
    if isinstance(annotation, SiLimits | typing.ForwardRef | str):
        return True
    if isinstance(annotation, type) and issubclass(annotation, BaseModel):
        return True
    origin = typing.get_origin(annotation)
    if origin is typing.Literal:
        return False
    if origin is typing.Annotated:
        return any(isinstance(m, SiLimits) for m in annotation.__metadata__) or (
            _mentions_limits(typing.get_args(annotation)[0])
        )
    return any(_mentions_limits(arg) for arg in typing.get_args(annotation))


_LIMITED: dict[type[BaseModel], tuple[tuple[str, Any, tuple[Any, ...]], ...]] = {}


def _limited(model_type: type[BaseModel]) -> tuple[tuple[str, Any, tuple[Any, ...]], ...]:
    """(name, annotation, metadata) of the fields of a model class that can hold a value
    with SI limits (worked out once per class): the only ones :func:`_walk` looks at."""
    fields = _LIMITED.get(model_type)
    if fields is None:
        fields = _LIMITED[model_type] = tuple(
            (name, info.annotation, tuple(info.metadata))
            for name, info in model_type.model_fields.items()
            if any(isinstance(m, SiLimits) for m in info.metadata)
            or _mentions_limits(info.annotation)
        )
    return fields


def _walk(model: BaseModel, path: str, units: UnitSystem) -> Iterator[dict[str, str]]:
    for name, annotation, metadata in _limited(type(model)):
        value = getattr(model, name, None)
        if value is None:
            continue
        here = f"{path}.{name}" if path else name
        yield from _scan(value, annotation, metadata, here, model, units)


def bound_violations(model: BaseModel, units: UnitSystem, path: str = "") -> list[dict[str, str]]:
    """Every value of ``model`` (recursively) outside its SI limit, as problem items."""
    return list(_walk(model, path, units))


def check_bounds(model: BaseModel, units: UnitSystem) -> None:
    """Raise :class:`BoundsError` naming every value outside its SI limit."""
    errors = bound_violations(model, units)
    if errors:
        raise BoundsError(errors)


def limited_fields(model_type: type[BaseModel]) -> Iterator[tuple[str, SiLimits, str]]:
    """Each SI-limited field of a model class itself: (name, limits, shape ``one|item|i``)."""
    for name, info in model_type.model_fields.items():
        for meta in info.metadata:
            if isinstance(meta, SiLimits):
                yield name, meta, "one"
        for ann, meta in _members(info.annotation):
            for m in meta:
                if isinstance(m, SiLimits):
                    yield name, m, "one"
            args = typing.get_args(ann)
            for i, arg in enumerate(args):
                for _, inner in _members(arg):
                    for m in inner:
                        if isinstance(m, SiLimits):
                            yield name, m, "item" if typing.get_origin(ann) is list else str(i)
