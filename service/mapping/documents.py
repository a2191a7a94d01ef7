"""Pieces every response document shares: rounding, warnings with their request fields,
the tire as used, and road speeds and times in the caller's units."""

from __future__ import annotations

import math
from collections.abc import Iterable, Mapping
from typing import Any

import numpy as np
from numpy.typing import NDArray

from core import Notice, Tire
from service.mapping.inputs import in_callers_units, request_field
from service.units import Quantity, UnitSystem, from_si

__all__ = [
    "notice_text",
    "notices_out",
    "rounded",
    "seconds_out",
    "speed_out",
    "tire_document",
]

FloatArray = NDArray[np.float64]


def rounded(values: FloatArray | float, digits: int = 3) -> Any:
    """Round for display; arrays stay NumPy arrays (orjson writes them directly)."""
    if isinstance(values, np.ndarray):
        return values.round(digits)  # np.round's result, without its dispatch
    return round(float(values), digits)


def notice_text(notice: Notice, units: UnitSystem) -> str:
    """A notice's sentence with the SI speeds, pressures and torques it quotes in the
    caller's units (as errors quote them)."""
    return in_callers_units(notice.message, units)


def notices_out(
    notices: Iterable[Notice], fields: Mapping[str, str], units: UnitSystem
) -> list[dict[str, Any]]:
    """Warnings with the request field each concerns, in the caller's units."""
    return [
        {
            "code": n.code,
            "message": notice_text(n, units),
            "field": request_field(n.parameter, fields),
        }
        for n in notices
    ]


def tire_document(tire: Tire, units: UnitSystem) -> dict[str, Any]:
    """The tire as used, in the caller's length unit."""

    def length(x: float) -> float:
        return rounded(from_si(x, Quantity.LENGTH, units), 2)  # type: ignore[no-any-return]

    return {
        "size": tire.designation,
        "diameter": None if tire.free_diameter_m is None else length(tire.free_diameter_m),
        "rolling_radius": length(tire.rolling_radius_m),
        "circumference": length(tire.circumference_m),
        "revs_per_mile": rounded(tire.revs_per_mile, 2),
        "revs_per_km": rounded(tire.revs_per_km, 2),
    }


def speed_out(v: float | None, units: UnitSystem, digits: int = 2) -> float | None:
    """A road speed [m/s] in the caller's unit, rounded; None for a missing one."""
    if v is None or not math.isfinite(v):
        return None
    return round(from_si(float(v), Quantity.SPEED, units), digits)


def seconds_out(t: float | None) -> float | None:
    """A time [s] to the millisecond; None for a missing one."""
    return None if t is None or not math.isfinite(t) else round(float(t), 3)
