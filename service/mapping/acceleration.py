"""Acceleration-run requests to core inputs in SI, the run simulated and kept whole
(printable reports and charts take the same document plus the core objects behind it), and
its results to a response document and a printable summary in the caller's units."""

from __future__ import annotations

import dataclasses
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from core import (
    Coupling,
    OptimalShifts,
    RunReport,
    ShiftCriterion,
    TimedDistance,
    TimedSpeed,
    drive_model,
    optimal_shift_rpm,
    planned_shift_rpm,
    run_report,
    sample_trace,
)
from core.runs.drive_model import DriveModel
from core.runs.report import QUARTER_MILE_M
from core.runs.simulate import RunShift
from core.units import STANDARD_GRAVITY_M_S2 as G  # accelerations are reported in g
from service.mapping.documents import notice_text, notices_out, rounded
from service.mapping.inputs import (
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
    rollout_m,
)
from service.mapping.vehicle import CAR_FIELDS, build_launch, build_vehicle
from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.sheets import printable, title_line, wrap_text
from service.schemas.acceleration import AccelerationRunRequest, RunOptions
from service.units import Quantity, UnitSystem, from_si, to_si, unit_label, unit_labels

__all__ = [
    "RUN_FIELDS",
    "SEARCH_BUDGET",
    "RunOutcome",
    "caller_named",
    "compute_acceleration_run",
    "run_document",
    "run_summary",
]

# core parameter -> request field, for errors and warnings
RUN_FIELDS = {
    **CAR_FIELDS,
    "shift_rpm": "shifts.rpm",
    "start_speed_m_s": "run.start_speed",
    "start_gear": "run.start_gear",
}
# simulated runs the shift search may spend: fixed, so the same request gets the same answer
SEARCH_BUDGET = {Coupling.CLUTCH: 160, Coupling.CONVERTER: 160}


def _speed(v: float | None, units: UnitSystem) -> float | None:
    return None if v is None else round(from_si(v, Quantity.SPEED, units), 2)


def _distance(d: TimedDistance, units: UnitSystem) -> dict[str, Any]:
    return {
        "name": d.name,
        "distance": round(from_si(d.distance_m, Quantity.DISTANCE, units), 3),
        "elapsed": None if d.elapsed_s is None else round(d.elapsed_s, 3),
        "speed": _speed(d.speed_m_s, units),
        "trap_speed": _speed(d.trap_speed_m_s, units),
    }


def _interval(s: TimedSpeed, units: UnitSystem) -> dict[str, Any]:
    return {
        "name": s.name,
        "start": _speed(s.from_m_s, units),
        "end": _speed(s.to_m_s, units),
        "elapsed": None if s.elapsed_s is None else round(s.elapsed_s, 3),
        "less_rollout": None if s.less_rollout_s is None else round(s.less_rollout_s, 3),
    }


def _shift(s: RunShift, units: UnitSystem) -> dict[str, Any]:
    return {
        "from_gear": s.from_gear,
        "to_gear": s.to_gear,
        "time": round(s.time_s, 3),
        "speed": _speed(s.speed_m_s, units),
        "distance": round(from_si(s.distance_m, Quantity.DISTANCE, units), 2),
        "rpm_before": round(s.rpm_before, 1),
        "rpm_after": round(s.rpm_after, 1),
    }


def _optimal_document(optimal: OptimalShifts) -> dict[str, Any]:
    """The shift search: its rpm, time, gain over the plan, and each seed's time."""
    return {
        "shift_rpm": rounded(optimal.shift_rpm, 1),
        "elapsed": round(optimal.time_s, 3),
        "plan_elapsed": round(optimal.baseline_time_s, 3),
        "gain": round(optimal.baseline_time_s - optimal.time_s, 3),
        "evaluations": optimal.evaluations,
        "won_by": optimal.won_by,
        "seeds": [{"name": n, "elapsed": round(t, 3)} for n, t in optimal.seeds],
    }


def run_document(
    report: RunReport,
    model: DriveModel,
    optimal: OptimalShifts | None,
    criterion: str,
    units: UnitSystem,
    trace_points: int,
    fields: Mapping[str, str],
) -> dict[str, Any]:
    """The body of an acceleration-run response, without reference and summary."""
    run = report.run
    trace = sample_trace(run, trace_points, report.finish_time_s)
    finish = (
        _distance(report.finish, units)
        if isinstance(report.finish, TimedDistance)
        else _interval(report.finish, units)
    )
    return {
        "units": unit_labels(units),
        "shift_criterion": criterion,
        "shift_rpm": rounded(run.shift_rpm, 1),
        "start_gear": run.start_gear,
        "finish": finish,
        "distances": [_distance(d, units) for d in report.distances],
        "speeds": [_interval(s, units) for s in report.speeds],
        "shifts": [_shift(s, units) for s in run.shifts],
        "top_speed": {
            "speed": _speed(report.top.speed_m_s, units),
            "gear": report.top.gear,
            "limited_by": report.top.limited_by,
        },
        "traction_limit": round(from_si(model.traction_limit_n, Quantity.FORCE, units), 1),
        "traction_limited_to": _speed(report.traction_limited_to_m_s, units),
        "trace": {
            "time": rounded(trace.time_s, 3),
            "speed": rounded(from_si(trace.speed_m_s, Quantity.SPEED, units), 2),
            "distance": rounded(from_si(trace.distance_m, Quantity.DISTANCE, units), 2),
            "gear": trace.gear,
            "rpm": rounded(trace.engine_rpm, 0),
            "acceleration": rounded(trace.acceleration_m_s2 / G, 4),
        },
        "optimal_shifts": None if optimal is None else _optimal_document(optimal),
        "warnings": notices_out(run.notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def _finish_lines(report: RunReport, units: UnitSystem) -> list[str]:
    """The finish, first of all."""
    spd = unit_labels(units)["speed"]
    finish = report.finish
    if isinstance(finish, TimedDistance):
        length = from_si(finish.distance_m, Quantity.DISTANCE, units)
        where = f"{length:.6g} {unit_labels(units)['distance']}"
        if abs(finish.distance_m - QUARTER_MILE_M) < 1e-9:
            where = "the 1/4 mile"
        if finish.elapsed_s is None:
            return [f"Finish at {where}: not reached."]
        trap = (
            ""
            if finish.trap_speed_m_s is None
            else f", trap {_speed(finish.trap_speed_m_s, units):.1f} {spd}"
        )
        return [
            f"Finish at {where}: {finish.elapsed_s:.3f} s, "
            f"{_speed(finish.speed_m_s, units):.1f} {spd} at the line{trap}."
        ]
    target = f"{_speed(finish.to_m_s, units):.1f} {spd}"
    if finish.elapsed_s is None:
        return [f"Finish at {target}: not reached."]
    return [f"Finish at {target}: {finish.elapsed_s:.3f} s."]


def _before_finish(report: RunReport) -> tuple[list[TimedDistance], list[TimedSpeed]]:
    """The timed distances and speed intervals reached, none past the finish."""
    finish = report.finish
    distances = [d for d in report.distances if d.elapsed_s is not None]
    speeds = [s for s in report.speeds if s.elapsed_s is not None]
    if isinstance(finish, TimedDistance):
        distances = [d for d in distances if d.distance_m <= finish.distance_m * (1 + 1e-12)]
        line = finish.speed_m_s
        speeds = [s for s in speeds if line is not None and s.to_m_s <= line]
    else:
        distances = [
            d for d in distances if d.speed_m_s is not None and d.speed_m_s <= finish.to_m_s
        ]
        speeds = [s for s in speeds if s.to_m_s <= finish.to_m_s * (1 + 1e-12)]
    return distances, speeds


def run_summary(
    report: RunReport, optimal: OptimalShifts | None, units: UnitSystem, reference: str | None
) -> str:
    """The run as a printable sheet of at most 80 columns."""
    spd = unit_labels(units)["speed"]
    lines = [title_line("GEARWORK ACCELERATION RUN", reference), ""]
    lines += _finish_lines(report, units)
    run = report.run
    if run.speed_m_s[0] > 0.0:
        lines.append(
            f"Rolling start at {_speed(float(run.speed_m_s[0]), units):.1f} {spd} "
            f"in gear {run.start_gear}."
        )
    lines.append("")
    distances, speeds = _before_finish(report)
    lines.append(f"{'Distance':<10} {'Elapsed s':>9} {'Speed':>9} {'Trap':>9}  ({spd})")
    for d in distances:
        trap = "" if d.trap_speed_m_s is None else f"{_speed(d.trap_speed_m_s, units):9.1f}"
        lines.append(
            f"{d.name:<10} {d.elapsed_s:>9.2f} {_speed(d.speed_m_s, units) or 0.0:>9.1f} {trap:>9}"
        )
    lines.append("")
    for s in speeds:
        extra = "" if s.less_rollout_s is None else f" ({s.less_rollout_s:.2f} s less rollout)"
        lines.append(f"{s.name:<14} {s.elapsed_s:6.2f} s{extra}")
    lines.append("")
    for sh in report.run.shifts:
        if sh.time_s > report.finish_time_s:
            break  # past the finish
        lines.append(
            f"Shift {sh.from_gear}-{sh.to_gear} at {sh.rpm_before:5.0f} rpm, "
            f"{_speed(sh.speed_m_s, units):6.1f} {spd}, {sh.time_s:5.2f} s; "
            f"lands at {sh.rpm_after:5.0f} rpm"
        )
    top = report.top
    lines.append(
        f"Top speed {_speed(top.speed_m_s, units):.1f} {spd} in gear {top.gear} "
        f"({'drag' if top.limited_by == 'drag' else 'rev limit'})."
    )
    if optimal is not None:
        rpm = ", ".join(f"{n:.0f}" for n in np.asarray(optimal.shift_rpm).tolist())
        lines += wrap_text(
            f"Quickest shifts found: {rpm} rpm, {optimal.time_s:.3f} s against "
            f"{optimal.baseline_time_s:.3f} s with the plan."
        )
    for n in report.run.notices:
        lines += wrap_text(notice_text(n, units), "- ")
    lines.append("")
    lines += wrap_text("Caution: " + SHORT_CAUTION)
    return printable(lines)


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
    rollout = rollout_m(run.rollout, u)
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
