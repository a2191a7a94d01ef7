"""Printable shift-plan report: the inputs, gears, shifts, per-gear tables and cautions.

Every figure comes from the same document POST /v1/shift-plan answers with, so the paper
and the JSON agree to the digit. Tables are thinned to a page and split by gear to fit 80
columns.
"""

from __future__ import annotations

from typing import Any

from service.mapping.shift_plan import PlanOutcome
from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.inputs import (
    curve_facts,
    drivetrain_facts,
    launch_facts,
    units_line,
    vehicle_facts,
)
from service.output.model import (
    Column,
    KeyFigure,
    Report,
    Section,
    Table,
    fmt,
    gear_groups,
    thin_rows,
)
from service.schemas.vehicle import LaunchIn
from service.units import unit_labels

__all__ = ["shift_plan_report"]

_WHY = {
    "crossover": "crossover",
    "rev_limit": "rev limit",
    "drag_limit": "tops out",
    "traction_limit": "both on grip",
}


def _gear_table(doc: dict[str, Any], lab: dict[str, str]) -> Table:
    rows = tuple(
        (
            str(g["gear"]),
            fmt(g["ratio"], 3),
            fmt(g["overall_ratio"], 3),
            fmt(g["efficiency"], 3),
            fmt(g["max_speed"], 1),
        )
        for g in doc["gears"]
    )
    return Table(
        "Gears",
        (
            Column("Gear"),
            Column("Ratio"),
            Column("Overall"),
            Column("Efficiency"),
            Column("Speed at limit", lab["speed"]),
        ),
        rows,
    )


def _shift_table(doc: dict[str, Any], lab: dict[str, str]) -> Table:
    rows = tuple(
        (
            f"{s['from_gear']}-{s['to_gear']}",
            fmt(s["shift_rpm"]),
            fmt(s["shift_speed"], 1),
            fmt(s["rpm_after"]),
            fmt(s["rpm_drop"]),
            fmt(s["force_before"]),
            fmt(s["force_after"]),
            _WHY.get(s["reason"], s["reason"]),
        )
        for s in doc["shifts"]
    )
    return Table(
        "Shifts",
        (
            Column("Shift", text=True),
            Column("At", "rpm"),
            Column("Speed", lab["speed"]),
            Column("Lands at", "rpm"),
            Column("Drop", "rpm"),
            Column("Force before", lab["force"]),
            Column("Force after", lab["force"]),
            Column("Why", text=True),
        ),
        rows,
        "Lands at: engine speed right after the shift; forces at the contact patch.",
    )


def _by_gear_tables(doc: dict[str, Any], lab: dict[str, str]) -> list[Table]:
    """Road speed and tractive force in each gear on the table rows, a page of rows."""
    gears = doc["gears"]
    engine = doc["engine"]["table"]
    picked = thin_rows(len(engine["rpm"]))
    rpm = [fmt(engine["rpm"][k]) for k in picked]
    torque = [fmt(engine["torque"][k], 1) for k in picked]
    power = [fmt(engine["power"][k], 1) for k in picked]
    thinned = "" if len(picked) == len(engine["rpm"]) else " (rows thinned to a page)"
    tables = []
    for group in gear_groups(len(gears)):
        span = f"gears {group[0] + 1}-{group[-1] + 1}" if len(gears) > 6 else "every gear"
        speed_cols = [Column(f"Gear {i + 1}", lab["speed"]) for i in group]
        speed_rows = tuple(
            (rpm[r], torque[r], power[r], *(fmt(gears[i]["table"]["speed"][k], 1) for i in group))
            for r, k in enumerate(picked)
        )
        tables.append(
            Table(
                f"Curve and road speed by gear, {span}{thinned}",
                (
                    Column("Engine", "rpm"),
                    Column("Torque", lab["torque"]),
                    Column("Power", lab["power"]),
                    *speed_cols,
                ),
                speed_rows,
            )
        )
        force_cols = [Column(f"Gear {i + 1}", lab["force"]) for i in group]
        force_rows = tuple(
            (rpm[r], *(fmt(gears[i]["table"]["tractive_force"][k]) for i in group))
            for r, k in enumerate(picked)
        )
        tables.append(
            Table(
                f"Tractive force by gear, {span}{thinned}",
                (Column("Engine", "rpm"), *force_cols),
                force_rows,
            )
        )
    return tables


def _cruise_cell(rpm: float | None, limit: float) -> str:
    """Cruise rpm, flagged with ``*`` above the rev limit (that gear cannot hold it)."""
    if rpm is None:
        return "-"
    return f"{fmt(rpm)}*" if rpm > limit else fmt(rpm)


def _performance(doc: dict[str, Any], lab: dict[str, str]) -> Section | None:
    perf = doc["performance"]
    limit = float(doc["engine"]["rev_limit_rpm"])
    if perf is None:
        return None
    top = perf["top_speed"]
    limiter = "drag" if top["limited_by"] == "drag" else "the rev limit"
    facts = (
        (
            "Top speed",
            f"{fmt(top['speed'], 1)} {lab['speed']} in gear {top['gear']}, limited by {limiter}",
        ),
        ("Traction limit", f"{fmt(perf['traction_limit'])} {lab['force']} at the driven tires"),
    )
    n = len(perf["gradeability"])
    tables = []
    for group in gear_groups(n, 8):
        tables.append(
            Table(
                "Steepest steady climb by gear",
                tuple(Column(f"Gear {i + 1}", "%") for i in group),
                (tuple(fmt(perf["gradeability"][i], 1) for i in group),),
            )
        )
    for group in gear_groups(n, 8):
        if perf["cruise"]:
            tables.append(
                Table(
                    "Engine speed at cruise",
                    (
                        Column("Speed", lab["speed"]),
                        *(Column(f"Gear {i + 1}", "rpm") for i in group),
                    ),
                    tuple(
                        (fmt(c["speed"], 1), *(_cruise_cell(c["rpm"][i], limit) for i in group))
                        for c in perf["cruise"]
                    ),
                    f"* above the {fmt(limit)} rpm rev limit: that gear cannot hold the speed."
                    if any(r is not None and r > limit for c in perf["cruise"] for r in c["rpm"])
                    else "",
                )
            )
    return Section("Performance of the described car", facts, tuple(tables))


def _key_figures(doc: dict[str, Any], lab: dict[str, str]) -> tuple[KeyFigure, ...]:
    """Shift rpm, peak power, speed at the limit in top gear and, with a car, top speed."""
    shifts, engine = doc["shifts"], doc["engine"]
    figures = []
    if shifts:
        rpms = [s["shift_rpm"] for s in shifts]
        low, high = min(rpms), max(rpms)
        value = fmt(low) if round(low) == round(high) else f"{fmt(low)}-{fmt(high)}"
        figures.append(KeyFigure("Shift at", value, "rpm", f"{len(shifts)} shifts"))
        drops = [s["rpm_drop"] for s in shifts if s["rpm_drop"] is not None]
        if drops:
            span = f"{fmt(min(drops))}-{fmt(max(drops))}"
            figures.append(KeyFigure("Lands", span, "rpm lower"))
    figures.append(
        KeyFigure(
            "Peak power",
            fmt(engine["peak_power"]),
            lab["power"],
            f"at {fmt(engine['peak_power_rpm'])} rpm",
        )
    )
    perf = doc["performance"]
    if perf is not None:
        top = perf["top_speed"]
        figures.append(
            KeyFigure("Top speed", fmt(top["speed"], 1), lab["speed"], f"in gear {top['gear']}")
        )
    else:
        last = doc["gears"][-1]
        figures.append(
            KeyFigure(
                "Top gear at limit",
                fmt(last["max_speed"], 1),
                lab["speed"],
                f"gear {last['gear']} at {fmt(engine['rev_limit_rpm'])} rpm",
            )
        )
    return tuple(figures)


def shift_plan_report(outcome: PlanOutcome) -> Report:
    """The report of a computed shift plan."""
    body, doc, units = outcome.body, outcome.document, outcome.body.units
    lab = unit_labels(units)
    inputs = curve_facts(
        body.engine.curve,
        outcome.curve,
        outcome.plan.rev_limit_rpm,
        outcome.plan.efficiency_applied,
        units,
    )
    inputs += drivetrain_facts(
        outcome.drivetrain, doc["tire"], outcome.plan.efficiency_applied, units
    )
    rule = (
        "net acceleration (road load and rotating inertia counted)"
        if body.shift_criterion == "net_acceleration"
        else "where the next gear's tractive force overtakes this gear's, else the rev limit"
    )
    inputs.append(("Shift rule", rule))
    if body.vehicle is not None:
        inputs += vehicle_facts(body.vehicle, units)
        inputs += launch_facts(body.launch or LaunchIn(), units)
    sections = [
        Section("Inputs", tuple(inputs)),
        Section("Gears and shifts", tables=(_gear_table(doc, lab), _shift_table(doc, lab))),
    ]
    perf = _performance(doc, lab)
    if perf is not None:
        sections.append(perf)
    if doc["warnings"]:
        sections.append(Section("Warnings", notes=tuple(w["message"] for w in doc["warnings"])))
    caption = (
        f"Tractive force in each gear against road speed [{lab['speed']}, {lab['force']}]; "
        "diamonds mark the shifts"
        + ("; road load and the traction limit of the described car." if body.vehicle else ".")
    )
    return Report(
        kind="Shift plan",
        reference=body.reference,
        units=units_line(units),
        short_caution=SHORT_CAUTION,
        sections=tuple(sections),
        cautions=CAUTIONS,
        chart_caption=caption,
        key_figures=_key_figures(doc, lab),
        appendix=(Section("Tables by gear", tables=tuple(_by_gear_tables(doc, lab))),),
    )
