"""What a chart shows, in the caller's units: tractive force by gear, a timed run.

The drawing (``service.output.png_chart``) takes these plain records and never converts a unit; the
numbers come from core on a fixed, small grid so a chart costs the same for any request.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core import ConverterDrive, gear_tables, sample_trace
from core.runs.milestones import STANDARD_ROLLOUT_M, time_at_distance
from service.mapping.calculations import PlanOutcome, RunOutcome
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "GearCurve",
    "GearSegment",
    "RunChart",
    "RunMark",
    "ShiftMark",
    "TractiveForceChart",
    "run_chart",
    "tractive_force_chart",
]

FloatArray = NDArray[np.float64]
CURVE_POINTS = 81  # rows per gear curve: smooth at print size, cheap to draw
ROAD_LOAD_POINTS = 41
TRACE_POINTS = 241
_STRIP_MARKS = ("60 ft", "330 ft", "1/8 mile", "1000 ft", "1/4 mile")
FOOTER = "Calculated from the data supplied, not measured. gearwork"


@dataclass(frozen=True)
class GearCurve:
    """Tractive force of one gear over its road-speed range."""

    gear: int
    speed: FloatArray
    force: FloatArray


@dataclass(frozen=True)
class ShiftMark:
    """A gear change on the force chart: the force before and after at the shift speed."""

    from_gear: int
    to_gear: int
    speed: float
    force_before: float
    force_after: float
    rpm: float


@dataclass(frozen=True)
class TractiveForceChart:
    """Everything the tractive-force chart draws."""

    title: str
    subtitle: str
    speed_label: str
    force_label: str
    gears: tuple[GearCurve, ...]
    shifts: tuple[ShiftMark, ...]
    road_load: tuple[FloatArray, FloatArray] | None
    traction_limit: float | None
    footer: str = FOOTER


@dataclass(frozen=True)
class GearSegment:
    """The part of a run spent in one gear."""

    gear: int
    time: FloatArray
    speed: FloatArray


@dataclass(frozen=True)
class RunMark:
    """A labelled point on the run: a shift or a timed distance."""

    label: str
    time: float
    speed: float


@dataclass(frozen=True)
class RunChart:
    """Everything the run chart draws."""

    title: str
    subtitle: str
    time_label: str
    speed_label: str
    segments: tuple[GearSegment, ...]
    shifts: tuple[RunMark, ...]
    milestones: tuple[RunMark, ...]
    footer: str = FOOTER


def _subtitle(reference: str | None, *parts: str) -> str:
    head = [f"ref {reference}"] if reference else []
    return " | ".join(head + [p for p in parts if p])  # SVG collapses runs of spaces


def _tire_text(designation: str | None, diameter: float, length: str) -> str:
    return designation or f"tire {diameter:.1f} {length}"


def tractive_force_chart(outcome: PlanOutcome) -> TractiveForceChart:
    """The force chart of a computed shift plan (road load and grip when a car is given)."""
    units = outcome.body.units
    labels = unit_labels(units)
    plan, curve, drivetrain, tire = outcome.plan, outcome.curve, outcome.drivetrain, outcome.tire
    efficiency = (
        drivetrain.efficiency if plan.efficiency_applied else np.ones(drivetrain.gear_count)
    )
    rows = np.linspace(curve.rpm_min, plan.rev_limit_rpm, CURVE_POINTS)
    model = outcome.model
    converter = None if model is None else ConverterDrive.of_launch(model.launch)
    tables = gear_tables(curve, drivetrain, tire, rows, efficiency, converter)
    speed = from_si(np.stack([t.speed_m_s for t in tables]), Quantity.SPEED, units)
    force = from_si(np.stack([t.tractive_force_n for t in tables]), Quantity.FORCE, units)
    gears = tuple(GearCurve(t.gear, speed[i], force[i]) for i, t in enumerate(tables))
    shifts = []
    for s in plan.shifts:
        v = from_si(s.shift_speed_m_s, Quantity.SPEED, units)
        i, j = s.from_gear - 1, s.to_gear - 1
        shifts.append(
            ShiftMark(
                s.from_gear,
                s.to_gear,
                v,
                float(np.interp(v, speed[i], force[i])),
                float(np.interp(v, speed[j], force[j])),
                s.shift_rpm,
            )
        )
    road_load = None
    traction = None
    if outcome.model is not None:
        v_si = np.linspace(0.0, float(tables[-1].max_speed_m_s), ROAD_LOAD_POINTS)
        resist = outcome.model.vehicle.road_load.force_n(v_si)
        road_load = (
            from_si(v_si, Quantity.SPEED, units),
            from_si(resist, Quantity.FORCE, units),
        )
        traction = from_si(outcome.model.traction_limit_n, Quantity.FORCE, units)
    criterion = (
        "shifts by net acceleration"
        if outcome.body.shift_criterion == "net_acceleration"
        else "shifts at the force crossover"
    )
    diameter = from_si(2.0 * tire.rolling_radius_m, Quantity.LENGTH, units)
    return TractiveForceChart(
        title="Tractive force by gear",
        subtitle=_subtitle(
            outcome.body.reference,
            _tire_text(tire.designation, diameter, labels["length"]),
            f"final drive {drivetrain.final_drive_ratio:.3g}",
            criterion,
        ),
        speed_label=f"Road speed [{labels['speed']}]",
        force_label=f"Tractive force [{labels['force']}]",
        gears=gears,
        shifts=tuple(shifts),
        road_load=road_load,
        traction_limit=traction,
    )


def _rollout_m(outcome: RunOutcome) -> float:
    run = outcome.body.run
    if run.start_speed != 0.0:
        return 0.0
    if run.rollout is None:
        return STANDARD_ROLLOUT_M
    return to_si(run.rollout, Quantity.LENGTH, outcome.body.units)


def run_chart(outcome: RunOutcome) -> RunChart:
    """Road speed over time of a simulated run, by gear, with the shifts and strip marks."""
    units: UnitSystem = outcome.body.units
    labels = unit_labels(units)
    report = outcome.report
    run = report.run
    trace = sample_trace(run, TRACE_POINTS, report.finish_time_s)
    t = trace.time_s
    v = from_si(trace.speed_m_s, Quantity.SPEED, units)
    change = np.flatnonzero(np.diff(trace.gear)) + 1
    bounds = [0, *change.tolist(), t.size]
    segments = tuple(
        GearSegment(
            int(trace.gear[a]),
            t[a : min(b + 1, t.size)],
            v[a : min(b + 1, t.size)],
        )
        for a, b in itertools.pairwise(bounds)
    )
    end = float(t[-1])
    shifts = tuple(
        RunMark(
            f"{s.from_gear}-{s.to_gear} {s.rpm_before:.0f} rpm",
            s.time_s,
            from_si(s.speed_m_s, Quantity.SPEED, units),
        )
        for s in run.shifts
        if s.time_s <= end
    )
    clock = time_at_distance(run, _rollout_m(outcome)) or 0.0
    marks = []
    for d in report.distances:
        if d.elapsed_s is None or d.speed_m_s is None:
            continue
        if d.name not in _STRIP_MARKS and not d.name.endswith(" m"):
            continue
        if d.name in {"400 m", "1000 m"}:
            continue
        at = clock + d.elapsed_s
        if at <= end * (1.0 + 1e-9):
            speed = from_si(d.speed_m_s, Quantity.SPEED, units)
            marks.append(RunMark(f"{d.name} {d.elapsed_s:.2f} s", at, speed))
    tire = outcome.model.tire
    diameter = from_si(2.0 * tire.rolling_radius_m, Quantity.LENGTH, units)
    return RunChart(
        title="Acceleration run: road speed over time",
        subtitle=_subtitle(
            outcome.body.reference,
            _tire_text(tire.designation, diameter, labels["length"]),
            f"final drive {outcome.model.drivetrain.final_drive_ratio:.3g}",
            f"{outcome.body.launch.coupling} launch",
        ),
        time_label="Time from first motion [s]",
        speed_label=f"Road speed [{labels['speed']}]",
        segments=segments,
        shifts=shifts,
        milestones=tuple(marks[:8]),
    )
