"""Tires: rolling radius and circumference from a diameter, a size code or a revs count.

Size codes understood:

* ISO metric (ISO 4000-1 / ETRTO designation): ``225/45R17``, ``P215/65R15``,
  ``LT265/75R16``, ``T125/70D16``, with an optional load index and speed symbol
  (``225/45ZR17 94W``) that is ignored. Overall diameter = rim + 2 * width * aspect.
  An omitted aspect ratio (``165R15``) is taken as 82 % (ETRTO convention).
* Flotation (inch) sizes: ``31x10.50R15``, ``33X12.50-15LT``: overall diameter, section
  width and rim in inches.

A size code gives the free (unloaded) diameter; a tire rolls on a slightly smaller
effective radius. Pass ``rolling_factor`` (e.g. 0.97) to account for it, or give the
maker's revolutions per mile or per km, which already include it.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from core.errors import TireSizeError
from core.units import INCH_M, MILE_M

__all__ = [
    "OMITTED_ASPECT_RATIO",
    "Tire",
    "tire_from_diameter",
    "tire_from_revs_per_km",
    "tire_from_revs_per_mile",
    "tire_from_size",
]

OMITTED_ASPECT_RATIO = 82.0
MIN_DIAMETER_M = 0.2
MAX_DIAMETER_M = 3.0

_METRIC = re.compile(
    r"^(?P<prefix>P|LT|T|ST)?\s*(?P<width>\d{3})\s*(?:/\s*(?P<aspect>\d{2,3}))?\s*"
    r"(?P<construction>ZR|R|RF|D|B|-)\s*(?P<rim>\d{2}(?:\.\d)?)"
    r"(?:\s*(?P<service>\d{2,3}(?:/\d{2,3})?\s*\(?[A-Z]\)?))?\s*(?:LT|XL|C)?$"
)
_FLOTATION = re.compile(
    r"^(?P<diameter>\d{2}(?:\.\d{1,2})?)\s*[xX]\s*(?P<width>\d{1,2}(?:\.\d{1,2})?)\s*"
    r"(?P<construction>R|D|B|-)?\s*(?P<rim>\d{2}(?:\.\d)?)"
    r"(?:\s*(?:LT|C))?(?:\s*(?P<service>\d{2,3}(?:/\d{2,3})?\s*[A-Z]))?$"
)


@dataclass(frozen=True)
class Tire:
    """A tire as the gearing sees it.

    Attributes
    ----------
    rolling_radius_m : float
        Effective rolling radius [m]: road distance per wheel radian.
    free_diameter_m : float or None
        Unloaded overall diameter [m] where known from a size or a diameter.
    designation : str or None
        The normalised size code when built from one.
    """

    rolling_radius_m: float
    free_diameter_m: float | None = None
    designation: str | None = None

    @property
    def circumference_m(self) -> float:
        """Road distance per wheel revolution [m]."""
        return 2.0 * math.pi * self.rolling_radius_m

    @property
    def revs_per_km(self) -> float:
        """Wheel revolutions per kilometre [1/km]."""
        return 1000.0 / self.circumference_m

    @property
    def revs_per_mile(self) -> float:
        """Wheel revolutions per mile [1/mi]."""
        return MILE_M / self.circumference_m


def _checked_factor(rolling_factor: float) -> float:
    if not math.isfinite(rolling_factor) or not 0.85 <= rolling_factor <= 1.0:
        raise TireSizeError(
            f"`rolling_factor` must be between 0.85 and 1, got {rolling_factor}",
            parameter="rolling_factor",
        )
    return rolling_factor


def _checked_diameter(diameter_m: float, parameter: str) -> float:
    if not math.isfinite(diameter_m) or not MIN_DIAMETER_M <= diameter_m <= MAX_DIAMETER_M:
        raise TireSizeError(
            f"`{parameter}` must give a diameter between {MIN_DIAMETER_M * 1e3:g} mm and "
            f"{MAX_DIAMETER_M * 1e3:g} mm, got {diameter_m * 1e3:.4g} mm",
            parameter=parameter,
        )
    return diameter_m


def tire_from_diameter(diameter_m: float, *, rolling_factor: float = 1.0) -> Tire:
    """A tire of a given overall diameter.

    Parameters
    ----------
    diameter_m : float
        Overall (free) diameter [m], 0.2 to 3.
    rolling_factor : float
        Effective rolling radius as a fraction of the free radius, 0.85 to 1.

    Returns
    -------
    Tire

    Examples
    --------
    >>> round(tire_from_diameter(0.6604).circumference_m, 4)
    2.0747
    """
    d = _checked_diameter(diameter_m, "diameter_m")
    return Tire(0.5 * d * _checked_factor(rolling_factor), d, None)


def tire_from_size(code: str, *, rolling_factor: float = 1.0) -> Tire:
    """A tire from an ISO metric or flotation size code.

    Parameters
    ----------
    code : str
        Size code, e.g. ``"245/40R18 97Y"``, ``"LT265/75R16"`` or ``"31x10.50R15"``.
    rolling_factor : float
        Effective rolling radius as a fraction of the free radius, 0.85 to 1.

    Returns
    -------
    Tire

    Raises
    ------
    TireSizeError
        When the code matches neither form or gives an impossible diameter.

    Examples
    --------
    >>> round(tire_from_size("225/45R17").free_diameter_m / 0.0254, 4)
    24.9724
    >>> tire_from_size("31x10.50R15").designation
    '31x10.50R15'
    """
    if len(code) > 40:
        raise TireSizeError("`size` must be at most 40 characters", parameter="size")
    text = " ".join(code.strip().upper().split())
    factor = _checked_factor(rolling_factor)
    metric = _METRIC.match(text)
    if metric is not None:
        width_mm = float(metric["width"])
        aspect = float(metric["aspect"]) if metric["aspect"] else OMITTED_ASPECT_RATIO
        rim_in = float(metric["rim"])
        if not 20.0 <= aspect <= 120.0:
            raise TireSizeError(
                f"`size` aspect ratio must be between 20 and 120, got {aspect:g}",
                parameter="size",
            )
        diameter_m = rim_in * INCH_M + 2.0 * width_mm * aspect / 100.0 / 1000.0
        prefix = metric["prefix"] or ""
        aspect_txt = f"/{metric['aspect']}" if metric["aspect"] else ""
        construction = metric["construction"]
        name = f"{prefix}{metric['width']}{aspect_txt}{construction}{metric['rim']}"
    else:
        flotation = _FLOTATION.match(text)
        if flotation is None:
            raise TireSizeError(
                f"`size` {code!r} is neither an ISO metric size (e.g. 225/45R17) nor a "
                "flotation size (e.g. 31x10.50R15)",
                parameter="size",
            )
        diameter_in = float(flotation["diameter"])
        rim_in = float(flotation["rim"])
        if rim_in >= diameter_in:
            raise TireSizeError(
                f"`size` rim ({rim_in:g} in) must be smaller than the overall diameter "
                f"({diameter_in:g} in)",
                parameter="size",
            )
        diameter_m = diameter_in * INCH_M
        construction = flotation["construction"] or "-"
        name = f"{flotation['diameter']}x{flotation['width']}{construction}{flotation['rim']}"
    d = _checked_diameter(diameter_m, "size")
    return Tire(0.5 * d * factor, d, name)


def tire_from_revs_per_km(revs_per_km: float) -> Tire:
    """A tire from its revolutions per kilometre (effective, as makers publish).

    Parameters
    ----------
    revs_per_km : float
        Wheel revolutions per km [1/km].

    Returns
    -------
    Tire
    """
    if not math.isfinite(revs_per_km) or revs_per_km <= 0.0:
        raise TireSizeError(
            f"`revs_per_km` must be finite and > 0, got {revs_per_km}", parameter="revs_per_km"
        )
    circumference = 1000.0 / revs_per_km
    _checked_diameter(circumference / math.pi, "revs_per_km")
    return Tire(circumference / (2.0 * math.pi), None, None)


def tire_from_revs_per_mile(revs_per_mile: float) -> Tire:
    """A tire from its revolutions per mile (effective, as makers publish).

    Parameters
    ----------
    revs_per_mile : float
        Wheel revolutions per mile [1/mi].

    Returns
    -------
    Tire

    Examples
    --------
    >>> round(tire_from_revs_per_mile(800).circumference_m, 4)
    2.0117
    """
    if not math.isfinite(revs_per_mile) or revs_per_mile <= 0.0:
        raise TireSizeError(
            f"`revs_per_mile` must be finite and > 0, got {revs_per_mile}",
            parameter="revs_per_mile",
        )
    circumference = MILE_M / revs_per_mile
    _checked_diameter(circumference / math.pi, "revs_per_mile")
    return Tire(circumference / (2.0 * math.pi), None, None)
