"""Limits defined once in SI and checked after conversion from the caller's units.

A request field that carries a unit is annotated with :class:`SiLimits` (from
:mod:`service.si_limits`) instead of pydantic's ``ge``/``le``, so 5000 m is the same limit
as 16404.1 ft and 110 kPa the same as 32.48 inHg. :func:`bound_violations` walks a validated
request, converts every such value to SI with the request's ``units`` and names each
offending field by its exact path (``run.extra_distances[2]``), quoting the limit in the
caller's unit. Every other bound (ratios, shares, rpm, counts) is the same number in both
systems and stays a plain pydantic constraint.
"""

from __future__ import annotations

import types
import typing
from collections.abc import Iterator
from typing import Any

import numpy as np
from numpy.typing import NDArray
from pydantic import BaseModel

from service.http.problems import ProblemError
from service.si_limits import SiLimits
from service.units import UnitSystem

__all__ = ["BoundsError", "SiLimits", "bound_violations", "check_bounds", "limited_fields"]


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


_Member = tuple[Any, tuple[Any, ...], Any, tuple[Any, ...]]
_ORIGINS: dict[int, tuple[Any, list[_Member]]] = {}


def _origins(annotation: Any) -> list[_Member]:
    """:func:`_members` of an annotation, each with its origin and arguments, kept per
    annotation object (held with them, so its id is not reused): hashing a typing form
    walks its metadata in Python."""
    kept = _ORIGINS.get(id(annotation))
    if kept is not None and kept[0] is annotation:
        return kept[1]
    found = _with_origins(annotation)
    _ORIGINS[id(annotation)] = (annotation, found)
    return found


def _with_origins(annotation: Any) -> list[_Member]:
    return [
        (ann, meta, typing.get_origin(ann) or ann, typing.get_args(ann))
        for ann, meta in _members(annotation)
    ]


def _pick(value: Any, annotation: Any) -> _Member:
    """The member of ``annotation`` that ``value`` was validated as, with its origin and
    arguments."""
    if isinstance(value, BaseModel):
        for member in _origins(annotation):
            origin = member[2]
            if isinstance(origin, type) and isinstance(value, origin):
                return member
    elif isinstance(value, list | tuple):
        for member in _origins(annotation):
            if member[2] in {list, tuple}:
                return member
    elif isinstance(value, int | float) and not isinstance(value, bool):
        for member in _origins(annotation):
            if member[2] in {float, int}:
                return member
    return None, (), None, ()


def _scan(
    value: Any,
    annotation: Any,
    metadata: tuple[Any, ...],
    path: str,
    model: BaseModel,
    units: UnitSystem,
) -> Iterator[dict[str, str]]:
    _, meta, origin, args = _pick(value, annotation)
    if isinstance(value, BaseModel):
        yield from _walk(value, path, units)
    elif isinstance(value, list | tuple):
        if origin is list and args and _all_numbers(value):
            yield from _scan_numbers(value, args[0], path, model, units)
            return
        for i, item in enumerate(value):
            item_ann = args[0] if origin is list or len(args) <= i else args[i]
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
    message. When the least and the greatest item are inside every limit, all are (the
    conversion to SI never decreases with the value), and nothing more is looked at."""
    _, meta, _, _ = _pick(0.0, annotation)
    limits = [m for m in meta if isinstance(m, SiLimits)]
    if not limits or _extremes_inside(values, limits, model, units):
        return
    flagged = _outside(np.asarray(values, dtype=np.float64), limits, model, units)
    for i in np.flatnonzero(flagged).tolist():
        yield from _scan(values[i], annotation, (), f"{path}[{i}]", model, units)


def _outside(
    raw: NDArray[np.float64], limits: list[SiLimits], model: BaseModel, units: UnitSystem
) -> NDArray[np.bool_]:
    """Which of the caller's numbers are outside some limit once converted to SI."""
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
    return flagged


def _extremes_inside(
    values: list[Any] | tuple[Any, ...],
    limits: list[SiLimits],
    model: BaseModel,
    units: UnitSystem,
) -> bool:
    """Whether the least and the greatest of plain numbers are inside every limit, in SI
    (False also when they cannot be told so: the items are then looked at one by one)."""
    try:
        extremes = np.array([float(min(values)), float(max(values))])
    except (ArithmeticError, ValueError):
        return False
    return not _outside(extremes, limits, model, units).any()


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
