"""Build core objects from request models, converting units and naming fields on error."""

from __future__ import annotations

import re
from collections.abc import Iterator, Mapping
from contextlib import contextmanager

import numpy as np

from core import (
    CurveSource,
    Drivetrain,
    GearworkError,
    Interpolation,
    Tire,
    TorqueCurve,
    make_drivetrain,
    tire_from_diameter,
    tire_from_revs_per_km,
    tire_from_revs_per_mile,
    tire_from_size,
    torque_curve_from_power,
    torque_curve_from_torque,
)
from core.runs.milestones import STANDARD_ROLLOUT_M
from service.http.problems import ProblemError
from service.schemas.inputs import CurveIn, DrivetrainIn, TireIn
from service.units import Quantity, UnitSystem, from_si, to_si, unit_label

__all__ = [
    "DRIVETRAIN_FIELDS",
    "ENGINE_FIELDS",
    "MIN_RATIO",
    "build_curve",
    "build_drivetrain",
    "build_tire",
    "check_ratio_floor",
    "core_fields",
    "renamed_fields",
    "renamed_path",
    "request_field",
    "rollout_m",
]

_INDEXED = re.compile(r"^(?P<name>[a-z_]+)(?P<index>(\[\d+\])*)$")

# core parameter name -> request field path, for the inputs every endpoint shares
ENGINE_FIELDS: Mapping[str, str] = {
    "rpm": "engine.curve.rpm",
    "torque_nm": "engine.curve.torque",
    "power_w": "engine.curve.power",
    "rev_limit_rpm": "engine.rev_limit_rpm",
}
DRIVETRAIN_FIELDS: Mapping[str, str] = {
    "gear_ratios": "drivetrain.gear_ratios",
    "final_drive_ratio": "drivetrain.final_drive_ratio",
    "extra_reduction": "drivetrain.extra_reduction",
    "efficiency": "drivetrain.efficiency",
    "diameter_m": "drivetrain.tire.diameter",
    "size": "drivetrain.tire.size",
    "revs_per_mile": "drivetrain.tire.revs_per_mile",
    "revs_per_km": "drivetrain.tire.revs_per_km",
    "rolling_factor": "drivetrain.tire.rolling_factor",
}
MIN_RATIO = 0.01  # no gearbox or axle has a smaller ratio


def request_field(parameter: str | None, fields: Mapping[str, str]) -> str | None:
    """Request path of a core parameter, keeping any index (``rpm[3]``).

    >>> request_field("rpm[3]", ENGINE_FIELDS)
    'engine.curve.rpm[3]'
    """
    if parameter is None:
        return None
    m = _INDEXED.match(parameter)
    if m is None or m["name"] not in fields:
        return parameter
    return fields[m["name"]] + m["index"]


_SI_FIGURE = re.compile(r"(?<![\w.])(-?\d+(?:\.\d+)?(?:e[+-]?\d+)?) (m/s|Pa|N\*m|mm)(?![\w*/^])")
# the unit a core message quotes: the quantity, and SI units per that unit
_SI_QUANTITY = {
    "m/s": (Quantity.SPEED, 1.0),
    "Pa": (Quantity.PRESSURE, 1.0),
    "N*m": (Quantity.TORQUE, 1.0),
    "mm": (Quantity.LENGTH, 0.001),
}


def in_callers_units(message: str, units: UnitSystem) -> str:
    """A core message with its SI speeds, pressures and torques and its lengths in mm in
    the caller's units.

    >>> in_callers_units("speed (26.8224 m/s) too high", UnitSystem.US)
    'speed (60 mph) too high'
    >>> in_callers_units("diameter 50.8 mm", UnitSystem.US)
    'diameter 2 in'
    """

    def convert(m: re.Match[str]) -> str:
        quantity, si_per_unit = _SI_QUANTITY[m[2]]
        value = from_si(float(m[1]) * si_per_unit, quantity, units)
        return f"{value:.4g} {unit_label(quantity, units)}"

    return _SI_FIGURE.sub(convert, message)


@contextmanager
def core_fields(fields: Mapping[str, str], units: UnitSystem | None) -> Iterator[None]:
    """Turn a core error inside the block into a 422 problem naming the request field and
    quoting its SI speeds, pressures and torques in the caller's ``units`` (None only for a
    block whose inputs carry no units, such as ratios)."""
    try:
        yield
    except GearworkError as exc:
        field = request_field(exc.parameter, fields)
        message = exc.message
        for name, path in fields.items():  # speak the caller's field names, not the core's
            message = re.sub(rf"`{name}(?=[`\[])", f"`{path}", message)
        if units is not None:
            message = in_callers_units(message, units)
        raise ProblemError(422, message, field=field) from exc


def renamed_path(field: str, renames: Mapping[str, str]) -> str:
    """A request path with a replaced base field's prefix swapped for the field that
    replaced it (``drivetrain.tire.size`` -> ``variants[0].tire.size``)."""
    for old, new in renames.items():
        if re.match(rf"^{re.escape(old)}(?=$|[.\[])", field):
            field = new + field[len(old) :]
    return field


@contextmanager
def renamed_fields(renames: Mapping[str, str]) -> Iterator[None]:
    """Point a problem raised inside the block at the variant's own field when the base
    field it names was replaced by the variant."""
    try:
        yield
    except ProblemError as exc:
        field = None if exc.field is None else renamed_path(exc.field, renames)
        detail = exc.detail
        for old, new in renames.items():
            detail = re.sub(rf"`{re.escape(old)}(?=[`.\[])", f"`{new}", detail)
        raise ProblemError(exc.status, detail, field=field, slug=exc.slug) from exc


def check_ratio_floor(drivetrain: DrivetrainIn) -> None:
    """Reject ratios below 0.01, naming the field: no gearbox or axle has one, and road
    speeds from such a ratio overflow."""
    named = [(f"drivetrain.gear_ratios[{i}]", r) for i, r in enumerate(drivetrain.gear_ratios)]
    named += [
        ("drivetrain.final_drive_ratio", drivetrain.final_drive_ratio),
        ("drivetrain.extra_reduction", drivetrain.extra_reduction),
    ]
    for field, value in named:
        if value < MIN_RATIO:
            raise ProblemError(
                422, f"`{field}` must be >= {MIN_RATIO:g}, got {value:g}", field=field
            )


def rollout_m(rollout: float | None, units: UnitSystem) -> float:
    """The rollout [m]: the caller's, else the strip's one foot."""
    return STANDARD_ROLLOUT_M if rollout is None else to_si(rollout, Quantity.LENGTH, units)


def build_curve(curve: CurveIn, units: UnitSystem) -> TorqueCurve:
    """The core curve of a request's curve, in SI."""
    interpolation = Interpolation(curve.interpolation)
    source = CurveSource(curve.source)
    rpm = np.asarray(curve.rpm, dtype=np.float64)
    with core_fields(ENGINE_FIELDS, units):
        if curve.torque is not None:
            torque = to_si(np.asarray(curve.torque, dtype=np.float64), Quantity.TORQUE, units)
            return torque_curve_from_torque(
                rpm, torque, interpolation=interpolation, source=source
            )
        power_in = np.asarray(curve.power or [], dtype=np.float64)
        power = to_si(power_in, Quantity.POWER, units)
        return torque_curve_from_power(rpm, power, interpolation=interpolation, source=source)


def build_tire(tire: TireIn, units: UnitSystem) -> Tire:
    """The core tire of a request's tire."""
    with core_fields(DRIVETRAIN_FIELDS, units):
        if tire.diameter is not None:
            d = to_si(tire.diameter, Quantity.LENGTH, units)
            return tire_from_diameter(d, rolling_factor=tire.rolling_factor)
        if tire.size is not None:
            return tire_from_size(tire.size, rolling_factor=tire.rolling_factor)
        if tire.revs_per_mile is not None:
            return tire_from_revs_per_mile(tire.revs_per_mile)
        return tire_from_revs_per_km(float(tire.revs_per_km or 0.0))


def build_drivetrain(drivetrain: DrivetrainIn) -> Drivetrain:
    """The core drivetrain of a request's drivetrain (ratios carry no units)."""
    with core_fields(DRIVETRAIN_FIELDS, None):  # ratios carry no units
        return make_drivetrain(
            drivetrain.gear_ratios,
            drivetrain.final_drive_ratio,
            extra_reduction=drivetrain.extra_reduction,
            efficiency=drivetrain.efficiency,
        )
