"""Comparison requests to core setups and back: the base setup and each variant's, in SI
(naming a variant's own field on error), their figures computed, and the response document
in the caller's units, with each setup's engine curve and each variant's change against
the base."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

import numpy as np

from core.choice.setups import Setup, SetupFigures, setup_figures
from core.engine.curves import RPM_TO_RAD_S
from core.notices import Notice
from core.runs.performance import ShiftCriterion
from service.mapping.documents import (
    notices_out,
    rounded,
    seconds_out,
    speed_out,
    tire_document,
)
from service.mapping.inputs import (
    build_curve,
    build_drivetrain,
    build_tire,
    check_ratio_floor,
    core_fields,
    renamed_fields,
    renamed_path,
)
from service.mapping.vehicle import CAR_FIELDS, build_launch, build_vehicle
from service.output.cautions import CAUTIONS
from service.schemas.comparison import OVERRIDES, ComparisonRequest, VariantIn
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "COMPARISON_FIELDS",
    "Comparison",
    "NamedSetup",
    "build_setups",
    "compare_setups",
    "comparison_document",
    "curve_notices",
    "has_own_curve",
    "numbers_delta",
    "peak_numbers",
    "setup_numbers",
]

COMPARISON_FIELDS: Mapping[str, str] = {
    **CAR_FIELDS,
    "start_speed_m_s": "vehicle",  # a car that cannot move off from rest
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


@dataclass(frozen=True)
class NamedSetup:
    """A setup of a comparison with its label, what it replaces and its field paths."""

    name: str
    changes: tuple[str, ...]
    setup: Setup
    renames: Mapping[str, str]


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


@dataclass(frozen=True)
class Comparison:
    """The setups compared, the figures of each and the cruise speeds [m/s] used."""

    setups: Sequence[NamedSetup]
    figures: Sequence[SetupFigures]
    cruise_speeds_m_s: Sequence[float]


def compare_setups(body: ComparisonRequest) -> Comparison:
    """The figures of the base setup and of each variant (core errors become 422 problems
    naming the variant's own field where it replaced the base's)."""
    setups = build_setups(body)
    speeds = [to_si(v, Quantity.SPEED, body.units) for v in body.cruise_speeds]
    criterion = ShiftCriterion(body.shift_criterion)
    figures = []
    for named in setups:
        with renamed_fields(named.renames), core_fields(COMPARISON_FIELDS, body.units):
            figures.append(
                setup_figures(named.setup, criterion=criterion, cruise_speeds_m_s=speeds)
            )
    return Comparison(setups, figures, speeds)


def has_own_curve(named: NamedSetup) -> bool:
    """Whether a setup brings its own engine curve (the base always does)."""
    return not named.changes or "curve" in named.changes


def peak_numbers(fig: SetupFigures, units: UnitSystem) -> dict[str, float]:
    """The curve's peaks in the caller's units, unrounded (what a delta is taken of)."""
    plan = fig.plan
    return {
        "peak_torque": float(from_si(plan.peak_torque_nm, Quantity.TORQUE, units)),
        "peak_torque_rpm": plan.peak_torque_rpm,
        "peak_power": float(from_si(plan.peak_power_w, Quantity.POWER, units)),
        "peak_power_rpm": plan.peak_power_rpm,
    }


def engine_document(named: NamedSetup, fig: SetupFigures, units: UnitSystem) -> dict[str, Any]:
    """A setup's ``engine`` block: source, peaks, and its curve's points if its own."""
    curve = named.setup.curve
    peaks = peak_numbers(fig, units)
    points = None
    if has_own_curve(named):
        power_w = curve.torque_nm * curve.rpm * RPM_TO_RAD_S
        points = {
            "rpm": rounded(np.asarray(curve.rpm), 1),
            "torque": rounded(from_si(np.asarray(curve.torque_nm), Quantity.TORQUE, units), 3),
            "power": rounded(from_si(np.asarray(power_w), Quantity.POWER, units), 3),
        }
    return {
        "source": curve.source.value,
        "peak_torque": round(peaks["peak_torque"], 2),
        "peak_torque_rpm": round(peaks["peak_torque_rpm"], 0),
        "peak_power": round(peaks["peak_power"], 2),
        "peak_power_rpm": round(peaks["peak_power_rpm"], 0),
        "curve": points,
    }


def curve_notices(setups: Sequence[NamedSetup]) -> list[list[Notice]]:
    """Per setup, a warning when its own curve was measured elsewhere than the base's (one
    at the crank, the other at the wheels): their peak deltas mix the two."""
    base = setups[0].setup.curve.source
    out: list[list[Notice]] = []
    for i, named in enumerate(setups):
        mine = named.setup.curve.source
        if i == 0 or not has_own_curve(named) or mine is base:
            out.append([])
            continue
        out.append(
            [
                Notice(
                    "curve_source_differs",
                    f"{named.name}: its curve was measured at the {_where(mine)} and the "
                    f"base's at the {_where(base)}; the peak deltas compare the two as "
                    "measured.",
                    f"variants[{i - 1}].curve",
                )
            ]
        )
    return out


def _where(source: object) -> str:
    return "wheels" if getattr(source, "value", "") == "chassis" else "crankshaft"


Number = float | None


def _minus(a: Number, b: Number, digits: int) -> Number:
    return None if a is None or b is None else round(a - b, digits) + 0.0  # no -0.0


def _renamed(items: list[dict[str, Any]], renames: Mapping[str, str]) -> list[dict[str, Any]]:
    for item in items:
        if item.get("field") is not None:
            item["field"] = renamed_path(item["field"], renames)
    return items


def _timed(fig: SetupFigures, name: str) -> tuple[Number, Number]:
    if fig.report is None:
        return None, None
    for d in fig.report.distances:
        if d.name == name:
            return d.elapsed_s, d.trap_speed_m_s
    return None, None


def setup_numbers(fig: SetupFigures, units: UnitSystem) -> dict[str, Any]:
    """The figures a delta is taken of, unrounded, in the caller's units."""
    speed = Quantity.SPEED
    sixty, _ = _timed(fig, "60 ft")
    eighth, eighth_trap = _timed(fig, "1/8 mile")
    quarter, quarter_trap = _timed(fig, "1/4 mile")
    z60 = z100 = None
    top = None
    if fig.report is not None:
        z60 = next(s.elapsed_s for s in fig.report.speeds if s.name == "0-60 mph")
        z100 = next((s.elapsed_s for s in fig.report.speeds if s.name == "0-100 km/h"), None)
        top = from_si(fig.report.top.speed_m_s, speed, units)
    return {
        "speed_at_rev_limit": from_si(fig.speed_at_rev_limit_m_s, speed, units).tolist(),
        "shift_rpm": [s.shift_rpm for s in fig.shifts],
        "rpm_after": [s.rpm_after for s in fig.shifts],
        "cruise_top_gear_rpm": [float(row[-1]) for row in fig.cruise_rpm],
        "top_speed": top,
        "sixty_ft": sixty,
        "eighth_mile_elapsed": eighth,
        "eighth_mile_trap_speed": None
        if eighth_trap is None
        else from_si(eighth_trap, speed, units),
        "quarter_mile_elapsed": quarter,
        "quarter_mile_trap_speed": None
        if quarter_trap is None
        else from_si(quarter_trap, speed, units),
        "zero_to_60_mph": z60,
        "zero_to_100_kmh": z100,
        **peak_numbers(fig, units),
    }


def numbers_delta(mine: dict[str, Any], base: dict[str, Any]) -> dict[str, Any]:
    out: dict[str, Any] = {}
    for key, value in mine.items():
        digits = 1 if "rpm" in key else 3
        if isinstance(value, list):
            other = base[key]
            out[key] = [
                _minus(v, other[i] if i < len(other) else None, digits)
                for i, v in enumerate(value)
            ]
        else:
            out[key] = _minus(value, base[key], digits)
    out["cruise_top_gear_rpm"] = [0.0 if v is None else v for v in out["cruise_top_gear_rpm"]]
    return out


def _run(fig: SetupFigures, numbers: dict[str, Any]) -> dict[str, Any] | None:
    if fig.report is None:
        return None
    z60 = next(s for s in fig.report.speeds if s.name == "0-60 mph")
    z100 = next((s for s in fig.report.speeds if s.name == "0-100 km/h"), None)
    top = fig.report.top
    speed = numbers["top_speed"]
    return {
        "sixty_ft": seconds_out(numbers["sixty_ft"]),
        "eighth_mile": {
            "elapsed": seconds_out(numbers["eighth_mile_elapsed"]),
            "trap_speed": _round(numbers["eighth_mile_trap_speed"], 2),
        },
        "quarter_mile": {
            "elapsed": seconds_out(numbers["quarter_mile_elapsed"]),
            "trap_speed": _round(numbers["quarter_mile_trap_speed"], 2),
        },
        "zero_to_60_mph": seconds_out(z60.elapsed_s),
        "zero_to_60_mph_less_rollout": seconds_out(z60.less_rollout_s),
        "zero_to_100_kmh": None if z100 is None else seconds_out(z100.elapsed_s),
        "zero_to_100_kmh_less_rollout": None if z100 is None else seconds_out(z100.less_rollout_s),
        "top_speed": {"speed": round(speed, 2), "gear": top.gear, "limited_by": top.limited_by},
    }


def _round(value: Number, digits: int) -> Number:
    return None if value is None else round(value, digits)


def comparison_document(
    comparison: Comparison, units: UnitSystem, fields: Mapping[str, str]
) -> dict[str, Any]:
    """The body of a comparison response, without reference, criterion and summary."""
    setups, figures = comparison.setups, comparison.figures
    base = setup_numbers(figures[0], units)
    out = []
    own_notices = curve_notices(setups)
    for named, fig, own in zip(setups, figures, own_notices, strict=True):
        s, numbers = named.setup, setup_numbers(fig, units)
        ratios = s.drivetrain.overall_ratios.tolist()
        out.append(
            {
                "name": named.name,
                "changes": list(named.changes),
                "final_drive_ratio": s.drivetrain.final_drive_ratio,
                "gear_ratios": s.drivetrain.gear_ratios.tolist(),
                "rev_limit_rpm": round(fig.plan.rev_limit_rpm, 1),
                "engine": engine_document(named, fig, units),
                "tire": tire_document(s.tire, units),
                "gears": [
                    {
                        "gear": i + 1,
                        "ratio": float(s.drivetrain.gear_ratios[i]),
                        "overall_ratio": round(n, 4),
                        "speed_at_rev_limit": round(v, 2),
                    }
                    for i, (n, v) in enumerate(
                        zip(ratios, numbers["speed_at_rev_limit"], strict=True)
                    )
                ],
                "shifts": [
                    {
                        "from_gear": p.from_gear,
                        "to_gear": p.to_gear,
                        "shift_rpm": round(p.shift_rpm, 1),
                        "shift_speed": speed_out(p.shift_speed_m_s, units),
                        "rpm_after": round(p.rpm_after, 1),
                        "rpm_drop": round(p.rpm_drop, 1),
                        "reason": p.reason.value,
                    }
                    for p in fig.shifts
                ],
                "cruise": [
                    {
                        "speed": speed_out(v, units),
                        "rpm": rounded(row, 0),
                        "top_gear_rpm": round(float(row[-1]), 0),
                    }
                    for v, row in zip(comparison.cruise_speeds_m_s, fig.cruise_rpm, strict=True)
                ],
                "run": _run(fig, numbers),
                "delta": None if not named.changes else numbers_delta(numbers, base),
                "warnings": _renamed(notices_out(fig.notices, fields, units), named.renames)
                + notices_out(own, fields, units),
            }
        )
    return {"units": unit_labels(units), "setups": out, "cautions": list(CAUTIONS)}
