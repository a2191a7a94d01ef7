"""A range given once in SI for a quantity the caller gives in their own units.

A request field that carries a unit is annotated with :class:`SiLimits` instead of pydantic's
``ge``/``le``, so 5000 m is the same limit as 16404.1 ft and 110 kPa the same as 32.48 inHg;
:mod:`service.bounds` checks a validated request against them. In the OpenAPI document a
limited number carries ``x-si-limits`` (the limits in SI), ``x-limits`` (the same limits in
each unit system) and, as ``minimum``/``maximum``, the loosest of them, so a generator or a
fuzzer knows the envelope.
"""

from __future__ import annotations

import functools
import math
from collections.abc import Callable
from dataclasses import dataclass

from pydantic import BaseModel, GetJsonSchemaHandler
from pydantic.json_schema import JsonSchemaValue
from pydantic_core import CoreSchema

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

__all__ = ["SiLimits"]

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
