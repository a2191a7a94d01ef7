"""Printable acceleration-run report: inputs, timed distances and speeds, shifts, the trace.

Every figure comes from the same document POST /v1/acceleration-run answers with.
"""

from __future__ import annotations

from typing import Any

from core import CurveSource
from service.mapping.acceleration import RunOutcome
from service.mapping.documents import tire_document
from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.inputs import (
    curve_facts,
    drivetrain_facts,
    launch_facts,
    units_line,
    vehicle_facts,
)
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt, thin_rows
from service.units import unit_labels

__all__ = ["acceleration_run_report"]

_CRITERIA = {
    "net_acceleration": "the net-acceleration plan (road load and rotating inertia counted)",
    "tractive_force": "the wheel-force crossover plan",
    "custom": "the caller's shift rpms",
}


def _run_facts(outcome: RunOutcome, lab: dict[str, str]) -> list[tuple[str, str]]:
    body, doc = outcome.body, outcome.document
    run = body.run
    rpm = ", ".join(fmt(n) for n in doc["shift_rpm"])
    facts = [("Shifts", f"{_CRITERIA[body.shifts.criterion]}: {rpm or 'none'} rpm")]
    start = (
        "standing start"
        if run.start_speed == 0
        else f"rolling start at {run.start_speed:g} {lab['speed']}"
    )
    if run.start_speed == 0:
        rollout = (
            f"one-foot ({'12 in' if body.units.value == 'us' else '304.8 mm'}) rollout"
            if run.rollout is None
            else f"{run.rollout:g} {lab['length']} rollout"
        )
        start += f", clock after a {rollout}"
    if run.finish_speed is not None:
        finish = f"at {run.finish_speed:g} {lab['speed']}"
    elif run.finish_distance is not None:
        finish = f"at {run.finish_distance:g} {lab['distance']}"
    else:
        finish = "at the 1/4 mile"
    facts.append(("Run", f"{start}; finish {finish}"))
    return facts


def _distance_table(doc: dict[str, Any], lab: dict[str, str]) -> Table:
    rows = tuple(
        (d["name"], fmt(d["elapsed"], 2), fmt(d["speed"], 1), fmt(d["trap_speed"], 1))
        for d in doc["distances"]
        if d["elapsed"] is not None
    )
    return Table(
        "Timed distances",
        (
            Column("Distance", text=True),
            Column("Elapsed", "s"),
            Column("Speed", lab["speed"]),
            Column("Trap", lab["speed"]),
        ),
        rows,
        "From the clock start; trap speed is the average over the last 66 ft.",
    )


def _speed_table(doc: dict[str, Any]) -> Table:
    rows = tuple(
        (s["name"], fmt(s["elapsed"], 2), fmt(s["less_rollout"], 2))
        for s in doc["speeds"]
        if s["elapsed"] is not None
    )
    return Table(
        "Speed intervals",
        (Column("Interval", text=True), Column("Elapsed", "s"), Column("Less rollout", "s")),
        rows,
        "From first motion; less rollout: as road tests often publish it.",
    )


def _shift_table(doc: dict[str, Any], lab: dict[str, str]) -> Table:
    rows = tuple(
        (
            f"{s['from_gear']}-{s['to_gear']}",
            fmt(s["time"], 2),
            fmt(s["speed"], 1),
            fmt(s["distance"], 1),
            fmt(s["rpm_before"]),
            fmt(s["rpm_after"]),
        )
        for s in doc["shifts"]
    )
    return Table(
        "Shifts during the run",
        (
            Column("Shift", text=True),
            Column("Time", "s"),
            Column("Speed", lab["speed"]),
            Column("Distance", lab["distance"]),
            Column("From", "rpm"),
            Column("Lands at", "rpm"),
        ),
        rows,
    )


def _trace_table(doc: dict[str, Any], lab: dict[str, str]) -> Table:
    trace = doc["trace"]
    picked = thin_rows(len(trace["time"]))
    rows = tuple(
        (
            fmt(trace["time"][k], 2),
            fmt(trace["speed"][k], 1),
            fmt(trace["distance"][k], 1),
            str(int(trace["gear"][k])),
            fmt(trace["rpm"][k]),
            fmt(trace["acceleration"][k], 3),
        )
        for k in picked
    )
    return Table(
        "The run over time",
        (
            Column("Time", "s"),
            Column("Speed", lab["speed"]),
            Column("Distance", lab["distance"]),
            Column("Gear"),
            Column("Engine", "rpm"),
            Column("Acceleration", "g"),
        ),
        rows,
        "Distance from first motion; acceleration net of road load.",
    )


def _result_facts(doc: dict[str, Any], lab: dict[str, str]) -> tuple[tuple[str, str], ...]:
    top = doc["top_speed"]
    limiter = "drag" if top["limited_by"] == "drag" else "the rev limit"
    facts = [
        (
            "Top speed",
            f"{fmt(top['speed'], 1)} {lab['speed']} in gear {top['gear']}, limited by {limiter}",
        ),
        ("Traction limit", f"{fmt(doc['traction_limit'])} {lab['force']} at the driven tires"),
    ]
    if doc["traction_limited_to"] is not None:
        facts.append(
            (
                "Wheelspin",
                f"the tires limited the drive up to {fmt(doc['traction_limited_to'], 1)} "
                f"{lab['speed']}",
            )
        )
    best = doc["optimal_shifts"]
    if best is not None:
        rpm = ", ".join(fmt(n) for n in best["shift_rpm"])
        facts.append(
            (
                "Quickest shifts",
                f"{rpm} rpm: {fmt(best['elapsed'], 3)} s against {fmt(best['plan_elapsed'], 3)}"
                f" s with the plan ({best['evaluations']} runs searched; best start: "
                f"{best['won_by'].replace('_', ' ')})",
            )
        )
    return tuple(facts)


def _key_figures(doc: dict[str, Any], lab: dict[str, str], us: bool) -> tuple[KeyFigure, ...]:
    """The finish (time and trap), the caller's customary sprint, top speed."""
    figures = []
    timed = [d for d in doc["distances"] if d["elapsed"] is not None]
    finish = next((d for d in timed if d["name"] == "1/4 mile"), timed[-1] if timed else None)
    if finish is not None:
        figures.append(KeyFigure(finish["name"], fmt(finish["elapsed"], 2), "s"))
        if finish["trap_speed"] is not None:
            figures.append(KeyFigure("Trap speed", fmt(finish["trap_speed"], 1), lab["speed"]))
    sprint = "0-60 mph" if us else "0-100 km/h"
    for s in doc["speeds"]:
        if s["name"] == sprint and s["elapsed"] is not None:
            note = f"{fmt(s['less_rollout'], 2)} s less rollout" if s["less_rollout"] else ""
            figures.append(KeyFigure(sprint, fmt(s["elapsed"], 2), "s", note))
    top = doc["top_speed"]
    figures.append(
        KeyFigure("Top speed", fmt(top["speed"], 1), lab["speed"], f"in gear {top['gear']}")
    )
    return tuple(figures[:4])


def acceleration_run_report(outcome: RunOutcome) -> Report:
    """The report of a simulated acceleration run."""
    body, doc, model, units = outcome.body, outcome.document, outcome.model, outcome.body.units
    lab = unit_labels(units)
    applied = model.curve.source is CurveSource.ENGINE
    tire = tire_document(model.tire, units)
    inputs = curve_facts(body.engine.curve, model.curve, model.rev_limit_rpm, applied, units)
    inputs += drivetrain_facts(model.drivetrain, tire, applied, units)
    inputs += vehicle_facts(body.vehicle, units)
    inputs += launch_facts(body.launch, units)
    inputs += _run_facts(outcome, lab)
    sections = [  # results first: what the reader came for; then what they rest on
        Section(
            "Times",
            tables=(_distance_table(doc, lab), _speed_table(doc), _shift_table(doc, lab)),
        ),
        Section("Result", _result_facts(doc, lab)),
        Section("Inputs", tuple(inputs)),
    ]
    if doc["warnings"]:
        sections.append(Section("Warnings", notes=tuple(w["message"] for w in doc["warnings"])))
    return Report(
        kind="Acceleration run",
        reference=body.reference,
        units=units_line(units),
        short_caution=SHORT_CAUTION,
        sections=tuple(sections),
        cautions=CAUTIONS,
        chart_caption=(
            f"Road speed [{lab['speed']}] against time from first motion [s], by gear; "
            "diamonds mark the shifts, drops the timed distances."
        ),
        key_figures=_key_figures(doc, lab, units.value == "us"),
        appendix=(Section("The run over time", tables=(_trace_table(doc, lab),)),),
    )
