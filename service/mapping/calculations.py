"""The shift-plan and acceleration-run computations of a request, kept whole for reports.

The JSON endpoints (``service.routes.shift_plan`` and ``service.routes.acceleration``) answer
with the document these functions build; printable reports and charts take the same
document plus the core objects behind it (curve, drivetrain, tire, plan, drive model, run),
so a report says exactly what the JSON says.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass
from typing import Any

from core import (
    ConverterDrive,
    Coupling,
    DriveModel,
    Drivetrain,
    OptimalShifts,
    RunReport,
    ShiftCriterion,
    ShiftPlan,
    Tire,
    TorqueCurve,
    acceleration_shift_points,
    drive_model,
    optimal_shift_rpm,
    planned_shift_rpm,
    run_report,
    shift_plan,
)
from core.runs.milestones import STANDARD_ROLLOUT_M
from core.runs.report import QUARTER_MILE_M
from service.mapping.acceleration import run_document
from service.mapping.inputs import (
    DRIVETRAIN_FIELDS,
    ENGINE_FIELDS,
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
)
from service.mapping.shift_plan import performance_document, shift_plan_document
from service.mapping.vehicle import LAUNCH_FIELDS, VEHICLE_FIELDS, build_launch, build_vehicle
from service.schemas.acceleration import AccelerationRunRequest, RunOptions
from service.schemas.shift_plan import ShiftPlanRequest
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, to_si, unit_label

__all__ = [
    "PLAN_FIELDS",
    "RUN_FIELDS",
    "SEARCH_BUDGET",
    "PlanOutcome",
    "RunOutcome",
    "compute_acceleration_run",
    "compute_shift_plan",
]

# core parameter -> request field, for errors and warnings
PLAN_FIELDS = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    "rpm_step": "table.rpm_step",
}
RUN_FIELDS = {
    **ENGINE_FIELDS,
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    "shift_rpm": "shifts.rpm",
    "start_speed_m_s": "run.start_speed",
    "start_gear": "run.start_gear",
}
# simulated runs the shift search may spend: fixed, so the same request gets the same answer
SEARCH_BUDGET = {Coupling.CLUTCH: 160, Coupling.CONVERTER: 160}


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


@dataclass(frozen=True)
class RunOutcome:
    """A simulated acceleration run with everything behind it.

    Attributes
    ----------
    body : AccelerationRunRequest
        The request.
    model : DriveModel
        The car (curve, drivetrain, tire, vehicle, launch).
    report : RunReport
        The timed run.
    optimal : OptimalShifts or None
        The shift search, when asked for.
    document : dict
        The JSON endpoint's response body without its summary, in the caller's units.
    """

    body: AccelerationRunRequest
    model: DriveModel
    report: RunReport
    optimal: OptimalShifts | None
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
    with core_fields(PLAN_FIELDS):
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
        with core_fields(PLAN_FIELDS):
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


def caller_named(report: RunReport, run: RunOptions, units: UnitSystem) -> RunReport:
    """The report with the caller's extra distances and speed intervals named in their units
    (``1320 ft``, ``50-70 mph``) rather than in SI; they follow the standard ones."""
    d_unit, v_unit = unit_label(Quantity.DISTANCE, units), unit_label(Quantity.SPEED, units)
    dists, speeds = list(report.distances), list(report.speeds)
    first_d, first_v = (
        len(dists) - len(run.extra_distances),
        len(speeds) - len(run.extra_speed_intervals),
    )
    for k, d in enumerate(run.extra_distances):
        dists[first_d + k] = dataclasses.replace(dists[first_d + k], name=f"{d:g} {d_unit}")
    for k, i in enumerate(run.extra_speed_intervals):
        name = f"{i.start:g}-{i.end:g} {v_unit}"
        speeds[first_v + k] = dataclasses.replace(speeds[first_v + k], name=name)
    return dataclasses.replace(report, distances=tuple(dists), speeds=tuple(speeds))


def compute_acceleration_run(body: AccelerationRunRequest) -> RunOutcome:
    """What POST /v1/acceleration-run computes, kept whole (core errors become 422s)."""
    u, run = body.units, body.run
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    speed = Quantity.SPEED
    rollout = STANDARD_ROLLOUT_M if run.rollout is None else to_si(run.rollout, Quantity.LENGTH, u)
    start = to_si(run.start_speed, speed, u)
    with core_fields(RUN_FIELDS, u):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        crit = body.shifts.criterion
        rpm = (
            body.shifts.rpm if crit == "custom" else planned_shift_rpm(model, ShiftCriterion(crit))
        )
        finish_d = (
            None
            if run.finish_distance is None
            else to_si(run.finish_distance, Quantity.DISTANCE, u)
        )
        finish_v = None if run.finish_speed is None else to_si(run.finish_speed, speed, u)
        if finish_d is None and finish_v is None:
            finish_d = QUARTER_MILE_M
        report = run_report(
            model,
            [] if rpm is None else rpm,
            start_speed_m_s=start,
            start_gear=run.start_gear,
            rollout_m=rollout,
            finish_distance_m=finish_d,
            finish_speed_m_s=finish_v,
            extra_distances_m=[to_si(d, Quantity.DISTANCE, u) for d in run.extra_distances],
            extra_speeds_m_s=[
                (to_si(i.start, speed, u), to_si(i.end, speed, u))
                for i in run.extra_speed_intervals
            ],
        )
        report = caller_named(report, run, u)
        optimal = None
        if body.shifts.optimise:
            optimal = optimal_shift_rpm(
                model,
                report.run.shift_rpm,
                start_speed_m_s=start,
                rollout_m=rollout,
                finish_distance_m=finish_d if finish_v is None else None,
                finish_speed_m_s=finish_v,
                max_evaluations=SEARCH_BUDGET[launch.coupling],
                initial_name=crit,
            )
    doc = run_document(report, model, optimal, crit, u, run.trace_points, RUN_FIELDS)
    document = {"reference": body.reference, **doc}
    return RunOutcome(body, model, report, optimal, document)
