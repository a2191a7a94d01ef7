"""Build the setups of a comparison and the inputs of a final-drive sweep from requests,
in SI, naming the request field on error (a variant's own field when it replaced it)."""

from __future__ import annotations

import re
from collections.abc import Iterator, Mapping
from contextlib import contextmanager
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.choice.setups import Setup
from core.choice.sweep_spec import CruiseTarget, SweepConstraints, final_drive_range
from service.http.problems import ProblemError
from service.mapping.inputs import (
    DRIVETRAIN_FIELDS,
    ENGINE_FIELDS,
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
)
from service.mapping.vehicle import LAUNCH_FIELDS, VEHICLE_FIELDS, build_launch, build_vehicle
from service.schemas.comparison import OVERRIDES, ComparisonRequest, VariantIn
from service.schemas.final_drive import FinalDriveSweepRequest, SweepConstraintsIn
from service.schemas.inputs import DrivetrainIn
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, to_si

__all__ = [
    "COMPARISON_FIELDS",
    "MIN_RATIO",
    "SWEEP_FIELDS",
    "NamedSetup",
    "build_setups",
    "check_ratio_floor",
    "renamed_fields",
    "sweep_candidates",
    "sweep_constraints",
    "sweep_cruise_target",
]

COMPARISON_FIELDS: Mapping[str, str] = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    "start_speed_m_s": "vehicle",  # a car that cannot move off from rest
}
SWEEP_FIELDS: Mapping[str, str] = {
    **COMPARISON_FIELDS,
    "low": "ratio_range.low",
    "high": "ratio_range.high",
    "step": "ratio_range.step",
    "shift_rpm": "shift_rpm",
    "vehicle": "vehicle",
    "cruise_target": "cruise_target",
    "max_cruise_rpm": "constraints.cruise.max_rpm",
    "cruise_speed_m_s": "constraints.cruise.speed",
    "min_top_speed_m_s": "constraints.min_top_speed",
    "min_rpm_after_shift": "constraints.min_rpm_after_shift",
    "speed_m_s": "cruise_target.speed",
}
# a variant's replaced input -> the base request path it replaces
_REPLACED = {
    "final_drive_ratio": "drivetrain.final_drive_ratio",
    "gear_ratios": "drivetrain.gear_ratios",
    "tire": "drivetrain.tire",
    "rev_limit_rpm": "engine.rev_limit_rpm",
    "mass": "vehicle.mass",
    "converter": "launch.converter",
    "curve": "engine.curve",
}

FloatArray = NDArray[np.float64]
MIN_RATIO = 0.01


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


@dataclass(frozen=True)
class NamedSetup:
    """A setup of a comparison with its label, what it replaces and its field paths."""

    name: str
    changes: tuple[str, ...]
    setup: Setup
    renames: Mapping[str, str]


@contextmanager
def renamed_fields(renames: Mapping[str, str]) -> Iterator[None]:
    """Point a problem raised inside the block at the variant's own field when the base
    field it names was replaced by the variant."""
    try:
        yield
    except ProblemError as exc:
        field, detail = exc.field, exc.detail
        for old, new in renames.items():
            if field is not None and re.match(rf"^{re.escape(old)}(?=$|[.\[])", field):
                field = new + field[len(old) :]
            detail = re.sub(rf"`{re.escape(old)}(?=[`.\[])", f"`{new}", detail)
        raise ProblemError(exc.status, detail, field=field, slug=exc.slug) from exc


def _setup(body: ComparisonRequest, variant: VariantIn | None, units: UnitSystem) -> Setup:
    own_curve = None if variant is None else variant.curve
    curve = build_curve(own_curve or body.engine.curve, units)
    drive_in, vehicle_in, launch_in = body.drivetrain, body.vehicle, body.launch
    rev_limit = body.engine.rev_limit_rpm
    if variant is not None:
        update = {
            k: getattr(variant, k)
            for k in ("final_drive_ratio", "gear_ratios", "tire")
            if getattr(variant, k) is not None
        }
        drive_in = drive_in.model_copy(update=update)
        if variant.rev_limit_rpm is not None:
            rev_limit = variant.rev_limit_rpm
        if vehicle_in is not None and variant.mass is not None:
            vehicle_in = vehicle_in.model_copy(update={"mass": variant.mass})
        if variant.converter is not None:
            launch_in = (launch_in or LaunchIn()).model_copy(
                update={"coupling": "converter", "converter": variant.converter}
            )
    vehicle = None if vehicle_in is None else build_vehicle(vehicle_in, units)
    launch = None if vehicle is None else build_launch(launch_in or LaunchIn(), curve, units)
    return Setup(
        curve=curve,
        drivetrain=build_drivetrain(drive_in),
        tire=build_tire(drive_in.tire, units),
        rev_limit_rpm=rev_limit,
        vehicle=vehicle,
        launch=launch,
    )


def build_setups(body: ComparisonRequest) -> list[NamedSetup]:
    """The base setup, then each variant's, as core setups."""
    check_ratio_floor(body.drivetrain)
    out = [NamedSetup("base", (), _setup(body, None, body.units), {})]
    for i, variant in enumerate(body.variants):
        changes = tuple(name for name in OVERRIDES if getattr(variant, name) is not None)
        renames = {_REPLACED[name]: f"variants[{i}].{name}" for name in changes}
        with renamed_fields(renames):
            setup = _setup(body, variant, body.units)
        out.append(NamedSetup(variant.name or f"variant {i + 1}", changes, setup, renames))
    return out


def sweep_candidates(body: FinalDriveSweepRequest) -> FloatArray:
    """The candidate ratios: the list given, or the range spelled out."""
    if body.ratios is not None:
        return np.asarray(body.ratios, dtype=np.float64)
    r = body.ratio_range
    if r is None:  # the request model requires one of the two
        raise ProblemError(422, "give `ratios` or `ratio_range`", field="ratios")
    with core_fields(SWEEP_FIELDS):
        return final_drive_range(r.low, r.high, r.step)


def sweep_constraints(body: SweepConstraintsIn, units: UnitSystem) -> SweepConstraints:
    """The sweep's constraints in SI."""
    speed = Quantity.SPEED
    cruise = body.cruise
    return SweepConstraints(
        max_cruise_rpm=None if cruise is None else cruise.max_rpm,
        cruise_speed_m_s=None if cruise is None else to_si(cruise.speed, speed, units),
        min_top_speed_m_s=None
        if body.min_top_speed is None
        else to_si(body.min_top_speed, speed, units),
        min_rpm_after_shift=body.min_rpm_after_shift,
    )


def sweep_cruise_target(body: FinalDriveSweepRequest) -> CruiseTarget | None:
    """The cruise target in SI, if any."""
    target = body.cruise_target
    if target is None:
        return None
    return CruiseTarget(to_si(target.speed, Quantity.SPEED, body.units), target.rpm)
