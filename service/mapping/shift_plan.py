"""Shift-plan requests to core inputs in SI, the plan computed and kept whole (printable
reports and charts take the same document plus the core objects behind it, so a report says
exactly what the JSON says), and core results to response documents in the caller's units
(NumPy arrays kept for orjson)."""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from core import (
    ConverterDrive,
    DriveModel,
    Drivetrain,
    GearTable,
    Notice,
    ShiftPlan,
    Tire,
    TorqueCurve,
    acceleration_shift_points,
    cruise_rpm,
    drive_model,
    shift_plan,
    top_speed,
)
from core.car.gradeability import MAX_GRADE_ANGLE_DEG, GradeLimit, gradeability
from service.mapping.documents import notices_out, rounded, tire_document
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.vehicle import CAR_FIELDS, build_launch, build_vehicle
from service.output.cautions import CAUTIONS
from service.schemas.shift_plan import ShiftPlanRequest
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "PLAN_FIELDS",
    "PlanOutcome",
    "compute_shift_plan",
    "grade_notices",
    "performance_document",
    "shift_plan_document",
]

FloatArray = NDArray[np.float64]
# core parameter -> request field, for errors and warnings
PLAN_FIELDS = {
    **CAR_FIELDS,
    "rpm_step": "table.rpm_step",
}


def _converter_columns(table: GearTable) -> dict[str, Any]:
    """A converter gear's engine rpm and torque ratio per row; nothing without a converter."""
    if table.engine_rpm is None or table.torque_ratio is None:
        return {}
    return {
        "engine_rpm": rounded(table.engine_rpm, 1),
        "torque_ratio": rounded(table.torque_ratio, 4),
    }


def _gear_documents(
    plan: ShiftPlan, drivetrain: Drivetrain, rpm: Any, units: UnitSystem
) -> list[dict[str, Any]]:
    """Each gear with its table; every gear's columns converted and rounded together, one
    array operation per quantity."""
    speed, force, torque, power = Quantity.SPEED, Quantity.FORCE, Quantity.TORQUE, Quantity.POWER
    tables = plan.gears
    v = rounded(from_si(np.stack([g.speed_m_s for g in tables]), speed, units), 2)
    wt = rounded(from_si(np.stack([g.wheel_torque_nm for g in tables]), torque, units), 1)
    tf = rounded(from_si(np.stack([g.tractive_force_n for g in tables]), force, units), 1)
    wp = rounded(from_si(np.stack([g.wheel_power_w for g in tables]), power, units), 2)
    return [
        {
            "gear": g.gear,
            "ratio": ratio,
            "overall_ratio": round(g.overall_ratio, 4),
            "efficiency": g.efficiency,
            "max_speed": round(from_si(g.max_speed_m_s, speed, units), 2),
            "table": {
                "rpm": rpm,
                "speed": v[i],
                "wheel_torque": wt[i],
                "tractive_force": tf[i],
                "wheel_power": wp[i],
                **_converter_columns(g),
            },
        }
        for i, (g, ratio) in enumerate(zip(tables, drivetrain.gear_ratios.tolist(), strict=True))
    ]


def _shift_documents(plan: ShiftPlan, units: UnitSystem) -> list[dict[str, Any]]:
    """Each shift; plain floats (core's fields), rounded without a helper."""
    speed, force = Quantity.SPEED, Quantity.FORCE
    return [
        {
            "from_gear": s.from_gear,
            "to_gear": s.to_gear,
            "shift_rpm": round(s.shift_rpm, 1),
            "shift_speed": round(from_si(s.shift_speed_m_s, speed, units), 2),
            "reason": s.reason.value,
            "rpm_after": round(s.rpm_after, 1),
            "rpm_drop": round(s.rpm_drop, 1),
            "force_before": round(from_si(s.force_before_n, force, units), 1),
            "force_after": round(from_si(s.force_after_n, force, units), 1),
            "crossings": s.crossings,
            "intersections": s.intersections,
            "overtake_rpm": [rounded(x, 1) for x in s.overtake_rpm],
            "coincident_rpm": None
            if s.coincident_rpm is None
            else [round(s.coincident_rpm[0], 1), round(s.coincident_rpm[1], 1)],
        }
        for s in plan.shifts
    ]


def shift_plan_document(
    plan: ShiftPlan,
    curve: TorqueCurve,
    drivetrain: Drivetrain,
    tire: Tire,
    units: UnitSystem,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of a shift-plan response, without reference and summary."""
    torque, power = Quantity.TORQUE, Quantity.POWER
    tables = plan.gears
    rpm = rounded(tables[0].rpm, 1)
    gears = _gear_documents(plan, drivetrain, rpm, units)
    shifts = _shift_documents(plan, units)
    t_peak, p_peak = plan.peak_torque_nm, plan.peak_power_w
    return {
        "units": unit_labels(units),
        "engine": {
            "source": curve.source.value,
            "efficiency_applied": plan.efficiency_applied,
            "rev_limit_rpm": rounded(plan.rev_limit_rpm, 1),
            "curve_rpm_min": rounded(curve.rpm_min, 1),
            "peak_torque": rounded(from_si(t_peak, torque, units), 2),
            "peak_torque_rpm": rounded(plan.peak_torque_rpm, 1),
            "peak_power": rounded(from_si(p_peak, power, units), 2),
            "peak_power_rpm": rounded(plan.peak_power_rpm, 1),
            "table": {
                "rpm": rpm,
                "torque": rounded(from_si(tables[0].engine_torque_nm, torque, units), 2),
                "power": rounded(from_si(tables[0].engine_power_w, power, units), 2),
            },
        },
        "tire": tire_document(tire, units),
        "gears": gears,
        "shifts": shifts,
        "warnings": notices_out(plan.notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def grade_notices(limits: tuple[GradeLimit, ...]) -> list[Notice]:
    """Say where grip, or the stated cap, rather than the drive force sets the gradeability."""
    out = []
    grip = [i + 1 for i, lim in enumerate(limits) if lim is GradeLimit.GRIP]
    capped = [i + 1 for i, lim in enumerate(limits) if lim is GradeLimit.CAP]
    if grip:
        out.append(
            Notice(
                "gradeability_grip_limited",
                f"Gradeability in gear {', '.join(map(str, grip))} is set by the tires' grip on "
                "the slope (weight transfer counted), not by the drive force.",
                "friction_coefficient",
            )
        )
    if capped:
        out.append(
            Notice(
                "gradeability_capped",
                f"Gradeability in gear {', '.join(map(str, capped))} reaches the reported "
                f"maximum of {MAX_GRADE_ANGLE_DEG:g} degrees before drive or grip run out.",
            )
        )
    return out


def performance_document(
    model: DriveModel, plan: ShiftPlan, cruise_speeds_m_s: list[float], units: UnitSystem
) -> tuple[dict[str, Any], list[Notice]]:
    """Top speed, gradeability, cruise rpm and grip of a described car, and its notices."""
    top = top_speed(model)
    grade = gradeability(model)
    doc = {
        "top_speed": {
            "speed": round(from_si(top.speed_m_s, Quantity.SPEED, units), 2),
            "gear": top.gear,
            "limited_by": top.limited_by,
        },
        "gradeability": rounded(grade.grade_percent, 2),
        "gradeability_speed": rounded(from_si(grade.speed_m_s, Quantity.SPEED, units), 2),
        "gradeability_limited_by": [lim.value for lim in grade.limited_by],
        "cruise": [
            {
                "speed": round(from_si(v, Quantity.SPEED, units), 2),
                "rpm": rounded(cruise_rpm(model, v), 0),
            }
            for v in cruise_speeds_m_s
        ],
        "traction_limit": round(from_si(model.traction_limit_n, Quantity.FORCE, units), 1),
        "force_crossover_rpm": [round(s.shift_rpm, 1) for s in plan.shifts],
    }
    return doc, grade_notices(grade.limited_by)


@dataclass(frozen=True)
class PlanOutcome:
    """A computed shift plan with everything behind it.

    Attributes
    ----------
    body : ShiftPlanRequest
        The request.
    curve, drivetrain, tire
        Core inputs, in SI.
    plan : ShiftPlan
        The plan (its shifts by net acceleration when the request asked for that).
    model : DriveModel or None
        The car, when the request described one.
    document : dict
        The JSON endpoint's response body without its summary, in the caller's units.
    """

    body: ShiftPlanRequest
    curve: TorqueCurve
    drivetrain: Drivetrain
    tire: Tire
    plan: ShiftPlan
    model: DriveModel | None
    document: dict[str, Any]


def compute_shift_plan(body: ShiftPlanRequest) -> PlanOutcome:
    """What POST /v1/shift-plan computes, kept whole (core errors become 422 problems)."""
    units = body.units
    curve = build_curve(body.engine.curve, units)
    drivetrain = build_drivetrain(body.drivetrain)
    tire = build_tire(body.drivetrain.tire, units)
    launch = None
    if body.vehicle is not None:
        launch = build_launch(body.launch or LaunchIn(), curve, units)
    converter = ConverterDrive.of_launch(launch)
    with core_fields(PLAN_FIELDS, units):
        plan = shift_plan(
            curve,
            drivetrain,
            tire,
            rev_limit_rpm=body.engine.rev_limit_rpm,
            rpm_step=body.table.rpm_step,
            converter=converter,
        )
    performance = None
    model = None
    if body.vehicle is not None and launch is not None:
        vehicle = build_vehicle(body.vehicle, units)
        with core_fields(PLAN_FIELDS, units):
            model = drive_model(
                curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
            )
            speeds = [to_si(v, Quantity.SPEED, units) for v in body.cruise_speeds]
            performance, grade_notes = performance_document(model, plan, speeds, units)
            if body.shift_criterion == "net_acceleration":
                plan = dataclasses.replace(plan, shifts=acceleration_shift_points(model))
            plan = dataclasses.replace(plan, notices=plan.notices + tuple(grade_notes))
    doc = shift_plan_document(plan, curve, drivetrain, tire, units, PLAN_FIELDS)
    document = {
        "reference": body.reference,
        **doc,
        "shift_criterion": body.shift_criterion,
        "performance": performance,
    }
    return PlanOutcome(body, curve, drivetrain, tire, plan, model, document)
