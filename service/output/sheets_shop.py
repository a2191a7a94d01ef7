"""Printable sheets of the shop answers: log check, dyno correction, chassis-dyno conversion.

Each builder reads the JSON document its endpoint answers with (already in the caller's
units, its labels in ``doc["units"]``), so the paper and the JSON agree to the digit.
"""

from __future__ import annotations

from typing import Any

from service.mapping.chassis import MODEL_NOTE
from service.mapping.log_analysis import VERDICT_RULE
from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.inputs import units_line
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt, thin_rows
from service.units import UnitSystem

__all__ = [
    "STANDARDS",
    "answer_report",
    "chassis_report",
    "dyno_correction_report",
    "log_check_report",
]

STANDARDS = {
    "sae_j1349_2004": "SAE J1349 (2004)",
    "sae_j1349_1990": "SAE J1349 (1990)",
    "sae_j607": "SAE J607",
    "din_70020": "DIN 70020",
    "iso_1585": "ISO 1585",
}
# a correction or conversion advises on no rpm, speed or acceleration: these apply
MEASUREMENT_CAUTIONS = (CAUTIONS[0], CAUTIONS[-1])


def answer_report(kind: str, doc: dict[str, Any], units: UnitSystem, **parts: Any) -> Report:
    """A sheet printed from a JSON answer: its sections, then the answer's warnings; the
    cautions given (by default all of them)."""
    notes = tuple(w["message"] for w in doc.get("warnings", ()))
    sections = parts.pop("sections") + ((Section("Warnings", notes=notes),) if notes else ())
    return Report(
        kind=kind,
        reference=doc.get("reference"),
        units=units_line(units),
        short_caution=SHORT_CAUTION,
        sections=sections,
        cautions=parts.pop("cautions", CAUTIONS),
        **parts,
    )


def _logged_shifts_table(logged: list[dict[str, Any]], spd: str) -> Table:
    """Each logged shift: when, how long, where it landed, its target and the verdict."""
    return Table(
        "Shifts",
        (
            Column("Shift", text=True),
            Column("At", "s"),
            Column("Took", "s"),
            Column("Speed", spd),
            Column("From", "rpm"),
            Column("Lands at", "rpm"),
            Column("Target", "rpm"),
            Column("Off", "%"),
            Column("Verdict", text=True),
        ),
        tuple(
            (
                f"{s['from_gear']}-{s['to_gear']}",
                fmt(s["start_time"], 2),
                fmt(s["duration"], 2),
                fmt(s["speed_before"], 1),
                fmt(s["rpm_before"]),
                fmt(s["rpm_after"]),
                fmt(s["target_rpm"]),
                fmt(s["deviation_percent"], 0),
                s["verdict"].replace("_", " "),
            )
            for s in logged
        ),
        VERDICT_RULE,
    )


def log_check_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Each logged shift against its target: early, about right or late."""
    spd = doc["units"]["speed"]
    log = doc["log"]
    facts = (
        (
            "Log",
            f"{log['samples']} samples over {fmt(log['duration'], 2)} s, analysed from "
            f"{fmt(log['analysed_from'], 2)} to {fmt(log['analysed_until'], 2)} s",
        ),
        ("Gears from", "rpm and speed" if doc["gears_from"] == "rpm" else "acceleration dips"),
        ("Tolerance", f"+-{fmt(doc['tolerance_percent'], 1)} % of the target"),
        ("Rev limit", f"{fmt(doc['rev_limit_rpm'])} rpm"),
    )
    segments = Table(
        "Gears held",
        (Column("Gear"), Column("From", "s"), Column("To", "s"), Column("Speed", spd, text=True)),
        tuple(
            (
                str(g["gear"]),
                fmt(g["start_time"], 2),
                fmt(g["end_time"], 2),
                f"{fmt(g['start_speed'], 1)}-{fmt(g['end_speed'], 1)}",
            )
            for g in doc["segments"]
        ),
    )
    shifts = _logged_shifts_table(doc["shifts"], spd)
    verdicts = [s["verdict"] for s in doc["shifts"]]
    figures = tuple(
        KeyFigure(label.capitalize(), str(verdicts.count(v)), "shifts")
        for v, label in (("early", "early"), ("about_right", "about right"), ("late", "late"))
        if v in verdicts
    )
    sections = (Section("Logged pass", facts, (segments, shifts)),)
    return answer_report("Log check", doc, units, sections=sections, key_figures=figures)


def dyno_correction_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Correction factors of every standard; the chosen one applied to the curve."""
    lab = doc["units"]
    applied = next(c for c in doc["corrections"] if c["standard"] == doc["applied"])
    factors = Table(
        "Correction factors for the cell's air",
        (
            Column("Standard", text=True),
            Column("Factor"),
            Column("Dry air", lab["pressure"]),
            Column("Vapour", lab["pressure"]),
            Column("Within validity", text=True),
        ),
        tuple(
            (
                STANDARDS.get(c["standard"], c["standard"]),
                fmt(c["factor"], 4),
                fmt(c["dry_pressure"], 3),
                fmt(c["vapour_pressure"], 3),
                "yes" if c["within_validity"] else "no",
            )
            for c in doc["corrections"]
        ),
    )
    tables = [factors]
    curve = doc["corrected_curve"]
    if curve is not None:
        picked = thin_rows(len(curve["rpm"]))
        tables.append(
            Table(
                f"Curve corrected by {STANDARDS.get(doc['applied'], doc['applied'])}",
                (Column("Engine", "rpm"), Column("Torque", lab["torque"])),
                tuple((fmt(curve["rpm"][k]), fmt(curve["torque"][k], 1)) for k in picked),
            )
        )
    facts = (("Station pressure", f"{fmt(doc['station_pressure'], 3)} {lab['pressure']}"),)
    figures = (
        KeyFigure(
            "Correction factor",
            fmt(applied["factor"], 4),
            "",
            STANDARDS.get(doc["applied"], doc["applied"]),
        ),
    )
    return answer_report(
        "Dyno correction",
        doc,
        units,
        sections=(Section("Correction to standard air", facts, tuple(tables)),),
        key_figures=figures,
        cautions=MEASUREMENT_CAUTIONS,
    )


def _wheel_and_engine_table(c: dict[str, Any], pw: str, tq: str) -> Table:
    """The curve at the wheels and at the engine, thinned to a page."""
    picked = thin_rows(len(c["rpm"]))
    return Table(
        "Wheel and engine",
        (
            Column("Engine", "rpm"),
            Column("Wheel power", pw),
            Column("Engine power", pw),
            Column("Wheel torque", tq),
            Column("Engine torque", tq),
        ),
        tuple(
            (
                fmt(c["rpm"][k]),
                fmt(c["wheel_power"][k], 1),
                fmt(c["engine_power"][k], 1),
                fmt(c["wheel_torque"][k], 1),
                fmt(c["engine_torque"][k], 1),
            )
            for k in picked
        ),
    )


def chassis_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Wheel and engine curves by the driveline efficiency; the curve in every gear."""
    lab = doc["units"]
    pw, tq = lab["power"], lab["torque"]
    c, peaks = doc["curve"], doc["peaks"]
    curve = _wheel_and_engine_table(c, pw, tq)
    gears = Table(
        "In every gear",
        (Column("Gear"), Column("Efficiency"), Column("Factor"), Column("Peak wheel power", pw)),
        tuple(
            (
                str(g["gear"]),
                fmt(g["efficiency"], 3),
                fmt(g["factor"], 4),
                fmt(g["peak_wheel_power"], 1),
            )
            for g in doc["gears"] or ()
        ),
    )
    where = "the wheels" if doc["measured_at"] == "wheels" else "the engine"
    gear = "" if doc["measured_gear"] is None else f" in gear {doc['measured_gear']}"
    facts = (
        ("Measured", f"at {where}{gear}"),
        (
            "Driveline",
            f"efficiency {fmt(doc['efficiency'], 3)} ({fmt(doc['loss_percent'], 1)} % loss)",
        ),
        ("Model", MODEL_NOTE),
    )
    figures = (
        KeyFigure(
            "Wheel power", fmt(peaks["wheel_power"], 1), pw, f"at {fmt(peaks['power_rpm'])} rpm"
        ),
        KeyFigure("Engine power", fmt(peaks["engine_power"], 1), pw, "estimated"),
        KeyFigure(
            "Wheel torque", fmt(peaks["wheel_torque"], 1), tq, f"at {fmt(peaks['torque_rpm'])} rpm"
        ),
        KeyFigure("Engine torque", fmt(peaks["engine_torque"], 1), tq, "estimated"),
    )
    return answer_report(
        "Chassis dyno conversion",
        doc,
        units,
        sections=(Section("Conversion", facts, (curve, gears) if gears.rows else (curve,)),),
        key_figures=figures,
        cautions=MEASUREMENT_CAUTIONS,
    )
