"""Checks of scalar arguments, each raising the caller's core error naming the argument.

One condition per message, naming the argument and the limit, e.g.
"`final_drive_ratio` must be finite and > 0, got -3.7"; the error carries the argument as
its ``parameter``, which the service maps onto the request field.

Examples
--------
>>> from core.errors import VehicleError
>>> require_positive(1200.0, "mass_kg", VehicleError)
1200.0
>>> require_range(float("nan"), "grade", 0.0, 1.0, VehicleError)
Traceback (most recent call last):
...
core.errors.VehicleError: `grade` must be finite, got nan
"""

from __future__ import annotations

import math

from core.errors import GearworkError

__all__ = ["require_finite", "require_non_negative", "require_positive", "require_range"]


def require_finite(value: float, name: str, error: type[GearworkError]) -> float:
    """``value`` as a float, or ``error`` naming ``name`` when it is NaN or infinite."""
    if not math.isfinite(value):
        raise error(f"`{name}` must be finite, got {value}", parameter=name)
    return float(value)


def require_positive(
    value: float, name: str, error: type[GearworkError], *, at_most: float | None = None
) -> float:
    """``value`` as a float, or ``error`` naming ``name`` unless it is finite, > 0 and (given
    ``at_most``) <= ``at_most``."""
    if not math.isfinite(value) or value <= 0.0:
        raise error(f"`{name}` must be finite and > 0, got {value}", parameter=name)
    if at_most is not None and value > at_most:
        raise error(f"`{name}` must be <= {at_most:g}, got {value}", parameter=name)
    return float(value)


def require_non_negative(value: float, name: str, error: type[GearworkError]) -> float:
    """``value`` as a float, or ``error`` naming ``name`` unless it is finite and >= 0."""
    if not math.isfinite(value) or value < 0.0:
        raise error(f"`{name}` must be finite and >= 0, got {value}", parameter=name)
    return float(value)


def require_range(
    value: float, name: str, low: float, high: float, error: type[GearworkError]
) -> float:
    """``value`` as a float, or ``error`` naming ``name`` unless it is finite and
    ``low <= value <= high``."""
    require_finite(value, name, error)
    if not low <= value <= high:
        raise error(f"`{name}` must lie in [{low:g}, {high:g}], got {value:g}", parameter=name)
    return float(value)
