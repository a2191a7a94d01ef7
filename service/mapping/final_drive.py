"""Final-drive sweep requests to core inputs in SI, the sweep run, and its results to a
response document and a printable summary in the caller's units."""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from numpy.typing import NDArray

from core.choice.sweep import FinalDriveSweep, sweep_final_drives
from core.choice.sweep_spec import (
    CruiseTarget,
    Rejection,
    SweepConstraints,
    SweepObjective,
    final_drive_range,
)
from core.runs.batch_timing import BatchTimedDistance
from service.http.problems import ProblemError
from service.mapping.documents import notices_out, rounded, seconds_out, speed_out
from service.mapping.inputs import (
    build_curve,
    build_drivetrain,
    build_tire,
    check_ratio_floor,
    core_fields,
    rollout_m,
)
from service.mapping.vehicle import CAR_FIELDS, build_launch, build_vehicle
from service.output.cautions import CAUTIONS
from service.output.sheets import cell, summary_sheet, wrap_text
from service.schemas.final_drive import FinalDriveSweepRequest, SweepConstraintsIn
from service.schemas.vehicle import LaunchIn
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "SWEEP_FIELDS",
    "SweptRatios",
    "sweep_candidates",
    "sweep_constraints",
    "sweep_cruise_target",
    "sweep_document",
    "sweep_ratios",
    "sweep_summary",
]

FloatArray = NDArray[np.float64]
Number = float | None
SWEEP_FIELDS: Mapping[str, str] = {
    **CAR_FIELDS,
    "start_speed_m_s": "vehicle",  # a car that cannot move off from rest
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


def sweep_candidates(body: FinalDriveSweepRequest) -> FloatArray:
    """The candidate ratios: the list given, or the range spelled out."""
    if body.ratios is not None:
        return np.asarray(body.ratios, dtype=np.float64)
    r = body.ratio_range
    if r is None:  # the request model requires one of the two
        raise ProblemError(422, "give `ratios` or `ratio_range`", field="ratios")
    with core_fields(SWEEP_FIELDS, body.units):
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


@dataclass(frozen=True)
class SweptRatios:
    """A final-drive sweep with the constraints it was ranked under, in SI."""

    sweep: FinalDriveSweep
    limits: SweepConstraints


def sweep_ratios(body: FinalDriveSweepRequest) -> SweptRatios:
    """What POST /v1/final-drive-sweep computes (core errors become 422 problems)."""
    u = body.units
    check_ratio_floor(body.drivetrain)
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle = None if body.vehicle is None else build_vehicle(body.vehicle, u)
    launch = None if vehicle is None else build_launch(body.launch or LaunchIn(), curve, u)
    limits = sweep_constraints(body.constraints, u)
    rollout = rollout_m(body.rollout, u)
    with core_fields({**SWEEP_FIELDS, "final_drive_ratio": "ratios"}, u):
        sweep = sweep_final_drives(
            curve,
            drivetrain,
            tire,
            sweep_candidates(body),
            SweepObjective(body.objective),
            vehicle=vehicle,
            launch=launch,
            rev_limit_rpm=body.engine.rev_limit_rpm,
            shift_rpm=body.shift_rpm,
            constraints=limits,
            cruise_target=sweep_cruise_target(body),
            rollout_m=rollout,
        )
    return SweptRatios(sweep, limits)


_OBJECTIVE_TEXT = {
    SweepObjective.QUARTER_MILE_ET: "the quickest 1/4 mile",
    SweepObjective.EIGHTH_MILE_ET: "the quickest 1/8 mile",
    SweepObjective.ZERO_TO_60_MPH: "the quickest 0-60 mph",
    SweepObjective.ZERO_TO_100_KMH: "the quickest 0-100 km/h",
    SweepObjective.TOP_SPEED: "the highest top speed",
    SweepObjective.CRUISE_RPM_TARGET: "the cruise rpm nearest the target",
}


_SHORT_REASON = {
    Rejection.CANNOT_MOVE_OFF: "no start",
    Rejection.OBJECTIVE_NOT_REACHED: "not reached",
    Rejection.CRUISE_RPM_TOO_HIGH: "cruise rpm",
    Rejection.TOP_SPEED_TOO_LOW: "top speed",
    Rejection.RPM_AFTER_SHIFT_TOO_LOW: "landing",
}


def _objective_out(sweep: FinalDriveSweep, value: float, units: UnitSystem) -> Number:
    if not math.isfinite(value):
        return None
    if sweep.objective is SweepObjective.TOP_SPEED:
        return speed_out(value, units, 3)
    if sweep.objective is SweepObjective.CRUISE_RPM_TARGET:
        return round(value, 1)
    return round(value, 4)


def _objective_unit(sweep: FinalDriveSweep, units: UnitSystem) -> str:
    if sweep.objective is SweepObjective.TOP_SPEED:
        return unit_labels(units)["speed"]
    return "rpm" if sweep.objective is SweepObjective.CRUISE_RPM_TARGET else "s"


def _rejection_message(
    why: Rejection, c: int, sweep: FinalDriveSweep, limits: SweepConstraints, units: UnitSystem
) -> str:
    spd = unit_labels(units)["speed"]
    if why is Rejection.CANNOT_MOVE_OFF:
        return "The car cannot move off: road load and grade exceed the drive at the start."
    if why is Rejection.OBJECTIVE_NOT_REACHED:
        return f"The run does not reach {_OBJECTIVE_TEXT[sweep.objective].split(' ', 2)[-1]}."
    if why is Rejection.CRUISE_RPM_TOO_HIGH:
        return (
            f"Top gear turns {sweep.cruise_rpm[c]:.0f} rpm at "
            f"{speed_out(sweep.cruise_speed_m_s, units, 1)} {spd}, above the "
            f"{limits.max_cruise_rpm:.0f} rpm allowed."
        )
    if why is Rejection.TOP_SPEED_TOO_LOW and sweep.top_speed is not None:
        return (
            f"Top speed {speed_out(float(sweep.top_speed.speed_m_s[c]), units, 1)} {spd} is below "
            f"the {speed_out(limits.min_top_speed_m_s, units, 1)} {spd} asked for."
        )
    k = int(np.argmin(sweep.landing_rpm))
    return (
        f"Shift {k + 1}-{k + 2} lands at {sweep.landing_rpm[k]:.0f} rpm, below the "
        f"{limits.min_rpm_after_shift or 0.0:.0f} rpm asked for."
    )


def _strip(d: BatchTimedDistance | None, c: int, units: UnitSystem) -> dict[str, Any] | None:
    if d is None:
        return None
    return {
        "elapsed": seconds_out(float(d.elapsed_s[c])),
        "trap_speed": speed_out(float(d.trap_speed_m_s[c]), units),
    }


def _candidate(
    sweep: FinalDriveSweep, c: int, limits: SweepConstraints, units: UnitSystem
) -> dict[str, Any]:
    runs, top = sweep.runs, sweep.top_speed
    cruise = float(sweep.cruise_rpm[c])
    return {
        "final_drive_ratio": float(sweep.final_drive_ratio[c]),
        "rank": int(sweep.rank[c]),
        "objective_value": _objective_out(sweep, float(sweep.objective_value[c]), units),
        "meets_constraints": not sweep.rejections[c],
        "rejected_because": [
            {"code": why.value, "message": _rejection_message(why, c, sweep, limits, units)}
            for why in sweep.rejections[c]
        ],
        "sixty_ft": None
        if runs is None
        else seconds_out(float(runs.distance("60 ft").elapsed_s[c])),
        "eighth_mile": _strip(None if runs is None else runs.distance("1/8 mile"), c, units),
        "quarter_mile": _strip(None if runs is None else runs.distance("1/4 mile"), c, units),
        "zero_to_60_mph": None
        if runs is None
        else seconds_out(float(runs.speed("0-60 mph").elapsed_s[c])),
        "zero_to_100_kmh": None
        if runs is None
        else seconds_out(float(runs.speed("0-100 km/h").elapsed_s[c])),
        "top_speed": None
        if top is None
        else {
            "speed": speed_out(float(top.speed_m_s[c]), units) or 0.0,
            "gear": int(top.gear[c]),
            "limited_by": top.limited_by[c],
        },
        "cruise_rpm": round(cruise, 0) if math.isfinite(cruise) else None,
        "speed_at_rev_limit": rounded(
            from_si(sweep.speed_at_rev_limit_m_s[c], Quantity.SPEED, units), 2
        ),
    }


def sweep_document(
    sweep: FinalDriveSweep, limits: SweepConstraints, units: UnitSystem, fields: Mapping[str, str]
) -> dict[str, Any]:
    """The body of a final-drive sweep response, without reference and summary."""
    rows = {c: _candidate(sweep, c, limits, units) for c in sweep.order.tolist()}
    opt = sweep.optimum
    return {
        "units": unit_labels(units),
        "objective": sweep.objective.value,
        "objective_unit": _objective_unit(sweep, units),
        "rev_limit_rpm": round(sweep.rev_limit_rpm, 1),
        "cruise_speed": speed_out(sweep.cruise_speed_m_s, units),
        "shifts": [
            {
                "from_gear": k + 1,
                "to_gear": k + 2,
                "shift_rpm": round(n, 1),
                "rpm_after": round(a, 1),
            }
            for k, (n, a) in enumerate(
                zip(sweep.shift_rpm.tolist(), sweep.landing_rpm.tolist(), strict=True)
            )
        ],
        "candidates": list(rows.values()),
        "best": None if sweep.best_index is None else rows[sweep.best_index],
        "optimum": None
        if opt is None
        else {
            "final_drive_ratio": round(opt.final_drive_ratio, 4),
            "objective_value": _objective_out(sweep, opt.objective_value, units),
            "bounds": [opt.bounds[0], opt.bounds[1]],
            "evaluations": opt.evaluations,
        },
        "warnings": notices_out(sweep.notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def sweep_summary(
    sweep: FinalDriveSweep, limits: SweepConstraints, units: UnitSystem, reference: str | None
) -> str:
    """The sweep as a printable sheet of at most 80 columns: the 20 best candidates."""
    spd = unit_labels(units)["speed"]
    f = sweep.final_drive_ratio
    unit = _objective_unit(sweep, units)
    shifts = ", ".join(f"{n:.0f}" for n in sweep.shift_rpm.tolist())
    body = wrap_text(
        f"Objective: {_OBJECTIVE_TEXT[sweep.objective]}; {f.size} candidates from "
        f"{f.min():.2f} to {f.max():.2f}; "
        + (f"shifts at {shifts} rpm for every ratio." if shifts else "one gear, no shifts.")
    )
    wants = []
    if limits.max_cruise_rpm is not None:
        cruise_v = speed_out(limits.cruise_speed_m_s, units, 0)
        wants.append(f"top gear at most {limits.max_cruise_rpm:.0f} rpm at {cruise_v:g} {spd}")
    if limits.min_top_speed_m_s is not None:
        wants.append(f"top speed at least {speed_out(limits.min_top_speed_m_s, units, 1)} {spd}")
    if limits.min_rpm_after_shift is not None:
        wants.append(f"every shift lands at {limits.min_rpm_after_shift:.0f} rpm or more")
    if wants:
        body += wrap_text("Constraints: " + "; ".join(wants) + ".")
    runs, top = sweep.runs, sweep.top_speed
    cruise_v = speed_out(sweep.cruise_speed_m_s, units, 0)
    head = f"{'Rank':>4}  {'Ratio':>6}  {'Value ' + unit:>11}"
    head += f"  {'1/4 s':>6}  {'Trap':>6}  {'Top':>6}" if runs is not None else ""
    head += f"  {'rpm@' + format(cruise_v, 'g'):>8}" if cruise_v is not None else ""
    body += ["", head + "  Meets"]
    for c in sweep.order[:20].tolist():
        row = f"{sweep.rank[c]:>4}  {f[c]:>6.3f}  "
        row += cell(_objective_out(sweep, float(sweep.objective_value[c]), units), 11, ".3f")
        if runs is not None and top is not None:
            q = runs.distance("1/4 mile")
            row += f"  {cell(float(q.elapsed_s[c]), 6, '.2f')}"
            row += f"  {cell(speed_out(float(q.trap_speed_m_s[c]), units), 6, '.1f')}"
            row += f"  {cell(speed_out(float(top.speed_m_s[c]), units), 6, '.1f')}"
        if cruise_v is not None:
            row += f"  {cell(float(sweep.cruise_rpm[c]), 8, '.0f')}"
        why = ", ".join(_SHORT_REASON[w] for w in sweep.rejections[c])
        body.append(row + ("  yes" if not why else f"  no: {why}"))
    if f.size > 20:
        body.append(f"... {f.size - 20} more in `candidates`.")
    body.append("")
    best = sweep.best_index
    if best is None:
        body += wrap_text("No listed ratio meets every constraint.")
    else:
        value = _objective_out(sweep, float(sweep.objective_value[best]), units)
        body += wrap_text(
            f"Best listed ratio meeting the constraints: {f[best]:.3f} ({value} {unit})."
        )
    if sweep.optimum is not None:
        o = sweep.optimum
        body += wrap_text(
            f"Continuous optimum, constraints ignored: {o.final_drive_ratio:.3f} "
            f"({_objective_out(sweep, o.objective_value, units)} {unit}), searched between "
            f"{o.bounds[0]:.3f} and {o.bounds[1]:.3f}."
        )
    return summary_sheet("GEARWORK FINAL DRIVE SWEEP", reference, body, sweep.notices, units)
