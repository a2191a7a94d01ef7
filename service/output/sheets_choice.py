"""Printable sheets of the gear-choice answers: comparison, final-drive sweep, gear spacing,
speedometer correction.

Each builder reads the JSON document its endpoint answers with (already in the caller's
units, its labels in ``doc["units"]``), so the paper and the JSON agree to the digit.
"""

from __future__ import annotations

from typing import Any

from service.output.cautions import (
    CAUTIONS,
    SHORT_CAUTION,
    SPEEDOMETER_CAUTIONS,
    SPEEDOMETER_SHORT_CAUTION,
)
from service.output.inputs import units_line
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt, join_numbers
from service.units import UnitSystem

__all__ = ["comparison_report", "spacing_report", "speedometer_report", "sweep_report"]

_OBJECTIVES = {
    "quarter_mile_et": "quickest 1/4 mile",
    "eighth_mile_et": "quickest 1/8 mile",
    "zero_to_60_mph": "quickest 0-60 mph",
    "zero_to_100_kmh": "quickest 0-100 km/h",
    "top_speed": "highest top speed",
    "cruise_rpm": "lowest cruise rpm",
}


def _warnings(doc: dict[str, Any]) -> list[Section]:
    notes = tuple(w["message"] for w in doc.get("warnings", ()))
    return [Section("Warnings", notes=notes)] if notes else []


def _report(kind: str, doc: dict[str, Any], units: UnitSystem, **parts: Any) -> Report:
    return Report(
        kind=kind,
        reference=doc.get("reference"),
        units=units_line(units),
        short_caution=parts.pop("short_caution", SHORT_CAUTION),
        cautions=parts.pop("cautions", CAUTIONS),
        **parts,
    )


def _setups_table(setups: list[dict[str, Any]], lab: dict[str, str], us: bool) -> Table:
    """Reach, cruise rpm and, with a car, the timed run of every setup."""
    sprint, sprint_key = (
        ("0-60 mph", "zero_to_60_mph") if us else ("0-100 km/h", "zero_to_100_kmh")
    )
    cruise = [c["speed"] for c in setups[0]["cruise"]]
    cols = [
        Column("Setup", text=True),
        Column("Final drive"),
        Column("Tire dia.", lab["length"]),
        Column("Top gear at limit", lab["speed"]),
    ]
    cols += [Column(f"Top gear at {fmt(v)}", "rpm") for v in cruise[:2]]
    if setups[0]["run"] is not None:
        cols += [
            Column("60 ft", "s"),
            Column(sprint, "s"),
            Column("1/4 mile", "s"),
            Column("Trap", lab["speed"]),
            Column("Top speed", lab["speed"]),
        ]

    def row(s: dict[str, Any]) -> tuple[str, ...]:
        cells = [
            s["name"],
            fmt(s["final_drive_ratio"], 2),
            fmt(s["tire"]["diameter"], 1),
            fmt(s["gears"][-1]["speed_at_rev_limit"], 1),
        ]
        cells += [fmt(c["top_gear_rpm"]) for c in s["cruise"][:2]]
        run = s["run"]
        if run is not None:
            q = run["quarter_mile"]
            cells += [
                fmt(run["sixty_ft"], 2),
                fmt(run.get(sprint_key), 2),
                fmt(q["elapsed"], 2),
                fmt(q["trap_speed"], 1),
                fmt(run["top_speed"]["speed"], 1),
            ]
        return tuple(cells)

    return Table("Setups", tuple(cols), tuple(row(s) for s in setups))


def comparison_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Setups side by side: reach, cruise rpm, the timed run, shifts; changes against base."""
    lab, setups = doc["units"], doc["setups"]
    has_run = setups[0]["run"] is not None
    setup_table = _setups_table(setups, lab, units is UnitSystem.US)
    shift_rows = tuple(
        (s["name"], " ".join(f"{fmt(x['shift_rpm'])}>{fmt(x['rpm_after'])}" for x in s["shifts"]))
        for s in setups
    )
    shifts = Table(
        "Shifts 1-2, 2-3, ...: rpm at the shift > rpm after it",
        (Column("Setup", text=True), Column("Shifts", "rpm", text=True)),
        shift_rows,
    )
    changes = tuple((s["name"], "; ".join(s["changes"]) or "as base") for s in setups[1:])
    figures = []
    if has_run:
        best = min(setups, key=lambda s: s["run"]["quarter_mile"]["elapsed"] or 1e9)
        q = best["run"]["quarter_mile"]
        figures.append(KeyFigure("Quickest 1/4 mile", fmt(q["elapsed"], 2), "s", best["name"]))
    fastest = max(setups, key=lambda s: s["gears"][-1]["speed_at_rev_limit"])
    figures.append(
        KeyFigure(
            "Most reach",
            fmt(fastest["gears"][-1]["speed_at_rev_limit"], 1),
            lab["speed"],
            f"{fastest['name']}, top gear at the limit",
        )
    )
    # each setup's warnings, every sentence once after the setups it concerns
    said: dict[str, list[str]] = {}
    for setup in setups:
        for w in setup.get("warnings", ()):
            said.setdefault(w["message"], []).append(setup["name"])
    notes = tuple(f"{', '.join(dict.fromkeys(names))}: {text}" for text, names in said.items())
    sections = [
        Section("Setups compared", changes, (setup_table, shifts)),
        *([Section("Warnings", notes=notes)] if notes else []),
    ]
    return _report(
        "Setup comparison", doc, units, sections=tuple(sections), key_figures=tuple(figures)
    )


def sweep_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Candidate final drives ranked by the objective; the best listed and the optimum."""
    lab, unit = doc["units"], doc["objective_unit"]
    cands = sorted(doc["candidates"], key=lambda c: c["rank"])[:20]
    has_run = any(c["quarter_mile"] is not None for c in cands)
    cols = [Column("Rank"), Column("Final drive"), Column("Objective", unit)]
    if has_run:
        cols += [
            Column("1/4 mile", "s"),
            Column("Trap", lab["speed"]),
            Column("Top", lab["speed"]),
        ]
    cols += [Column("Cruise", "rpm"), Column("Meets", text=True)]

    def row(c: dict[str, Any]) -> tuple[str, ...]:
        cells = [str(c["rank"]), fmt(c["final_drive_ratio"], 3), fmt(c["objective_value"], 3)]
        if has_run:
            q = c["quarter_mile"] or {}
            top = c["top_speed"] or {}
            cells += [
                fmt(q.get("elapsed"), 2),
                fmt(q.get("trap_speed"), 1),
                fmt(top.get("speed"), 1),
            ]
        why = ", ".join(r["code"].replace("_", " ") for r in c["rejected_because"])
        cells += [fmt(c["cruise_rpm"]), "yes" if c["meets_constraints"] else f"no: {why}"[:40]]
        return tuple(cells)

    facts = [
        ("Objective", _OBJECTIVES.get(doc["objective"], doc["objective"])),
        ("Shifts", join_numbers([s["shift_rpm"] for s in doc["shifts"]], 4) + " rpm"),
    ]
    figures = []
    best, opt = doc["best"], doc["optimum"]
    if best is not None:
        figures.append(
            KeyFigure(
                "Best listed ratio",
                fmt(best["final_drive_ratio"], 2),
                "",
                f"{fmt(best['objective_value'], 3)} {unit}",
            )
        )
    else:
        facts.append(("Best", "no listed ratio meets every constraint"))
    if opt is not None:
        figures.append(
            KeyFigure(
                "Continuous optimum",
                fmt(opt["final_drive_ratio"], 3),
                "",
                f"{fmt(opt['objective_value'], 3)} {unit}, constraints ignored",
            )
        )
    note = (
        f"The {len(cands)} best of {len(doc['candidates'])} candidates."
        if len(doc["candidates"]) > 20
        else ""
    )
    table = Table("Candidates by rank", tuple(cols), tuple(row(c) for c in cands), note)
    sections = (Section("Final-drive sweep", tuple(facts), (table,)), *_warnings(doc))
    return _report("Final-drive sweep", doc, units, sections=sections, key_figures=tuple(figures))


def spacing_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Each gear set: ratios and steps, where every shift lands against the peaks."""
    tables = []
    for s in doc["sets"]:
        rows = tuple(
            (
                f"{x['from_gear']}-{x['to_gear']}",
                fmt(x["step"], 3),
                fmt(x["shift_rpm"]),
                fmt(x["landing_rpm"]),
                fmt(x["rpm_drop"]),
                fmt(x["drop_percent"], 1),
                fmt(x.get("from_torque_peak_rpm")),
                fmt(x.get("from_power_peak_rpm")),
            )
            for x in s["shifts"]
        )
        tables.append(
            Table(
                f"{s['name'].capitalize()}: {join_numbers(s['gear_ratios'])} "
                f"(spread {fmt(s['spread'], 2)})",
                (
                    Column("Shift", text=True),
                    Column("Step"),
                    Column("At", "rpm"),
                    Column("Lands at", "rpm"),
                    Column("Drop", "rpm"),
                    Column("Drop", "%"),
                    Column("From torque peak", "rpm"),
                    Column("From power peak", "rpm"),
                ),
                rows,
            )
        )
    facts = (("Progression", f"largest factor {fmt(doc['max_progression_factor'], 3)}"),)
    sections = (Section("Gear sets", facts, tuple(tables)), *_warnings(doc))
    return _report("Gear spacing", doc, units, sections=sections)


def _setup_fact(side: dict[str, Any], lab: dict[str, str]) -> str:
    tire = side["tire"]
    name = tire.get("size") or f"diameter {fmt(tire['diameter'], 2)} {lab['length']}"
    text = (
        f"{name}: {fmt(tire['revs_per_mile'], 1)} revs/mile, {fmt(tire['revs_per_km'], 1)} revs/km"
    )
    if side.get("final_drive_ratio") is not None:
        text += f"; final drive {fmt(side['final_drive_ratio'], 2)}"
    return text


def speedometer_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Indicated against true speed and distance; the calibration factor and driven gear."""
    lab = doc["units"]
    facts = [
        ("Before", _setup_fact(doc["original"], lab)),
        ("After", _setup_fact(doc["new"], lab)),
        ("Reads", f"{doc['reads']} by {fmt(abs(doc['reading_error_percent']), 2)} %"),
    ]
    gear = doc.get("driven_gear")
    if gear is not None:
        facts.append(
            (
                "Driven gear",
                f"{gear['original_teeth']} teeth now; {fmt(gear['exact_teeth'], 2)} would read "
                f"true; {gear['nearest_teeth']} leaves {fmt(gear['residual_error_percent'], 2)} %",
            )
        )
    speed = Table(
        "Speed",
        (
            Column("Indicated", lab["speed"]),
            Column("True", lab["speed"]),
            Column("Error", lab["speed"]),
        ),
        tuple(
            (fmt(s["indicated"], 1), fmt(s["true"], 1), fmt(s["error"], 1)) for s in doc["speeds"]
        ),
    )
    odo = Table(
        "Odometer",
        (Column("Indicated", "as read"), Column("True", "as read"), Column("Error", "as read")),
        tuple(
            (fmt(d["indicated"], 1), fmt(d["true"], 1), fmt(d["error"], 1))
            for d in doc["distances"]
        ),
    )
    figures = (
        KeyFigure(
            "Reading error", f"{doc['reading_error_percent']:+.2f}", "%", f"reads {doc['reads']}"
        ),
        KeyFigure(
            "Calibration factor", fmt(doc["correction_factor"], 4), "", "indicated per true"
        ),
    )
    sections = (Section("Speedometer and odometer", tuple(facts), (speed, odo)), *_warnings(doc))
    return _report(
        "Speedometer correction",
        doc,
        units,
        sections=sections,
        key_figures=figures,
        cautions=SPEEDOMETER_CAUTIONS,
        short_caution=SPEEDOMETER_SHORT_CAUTION,
    )
