"""Printable sheets of the track answers: shift window and weather (the coast-down sheet is
``service.output.sheets_coast_down``).

Each builder reads the JSON document its endpoint answers with (already in the caller's
units, its labels in ``doc["units"]``), so the paper and the JSON agree to the digit; the
inputs part is read from the request (``*_inputs``), in the caller's own units.
"""

from __future__ import annotations

import math
from typing import Any

from core import CurveSource
from core.shifts.plan import resolve_rev_limit
from service.mapping.documents import tire_document
from service.mapping.inputs import build_curve, build_drivetrain, build_tire
from service.output.inputs import (
    curve_facts,
    drivetrain_facts,
    launch_facts,
    vehicle_facts,
)
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt
from service.output.sheets_shop import STANDARDS, answer_report
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.shift_window import ShiftWindowRequest
from service.schemas.vehicle import LaunchIn, VehicleIn
from service.schemas.weather import WeatherCorrectionRequest
from service.units import UnitSystem, unit_labels

__all__ = [
    "shift_window_inputs",
    "shift_window_report",
    "track_report",
    "weather_inputs",
    "weather_report",
]

Facts = list[tuple[str, str]]


def track_report(kind: str, doc: dict[str, Any], units: UnitSystem, **parts: Any) -> Report:
    """A track sheet: the document's warnings last, its cautions in full."""
    return answer_report(kind, doc, units, cautions=tuple(doc["cautions"]), **parts)


def _car_facts(
    engine: EngineIn,
    drivetrain_in: DrivetrainIn,
    vehicle: VehicleIn,
    launch: LaunchIn,
    units: UnitSystem,
) -> Facts:
    curve = build_curve(engine.curve, units)
    drivetrain, tire = build_drivetrain(drivetrain_in), build_tire(drivetrain_in.tire, units)
    applied = curve.source is CurveSource.ENGINE
    limit, _ = resolve_rev_limit(curve, engine.rev_limit_rpm)
    facts = curve_facts(engine.curve, curve, limit, applied, units)
    facts += drivetrain_facts(drivetrain, tire_document(tire, units), applied, units)
    return facts + vehicle_facts(vehicle, units) + launch_facts(launch, units)


def _rpm(value: float) -> str:
    return f"{value:,.0f}"


def _window(w: dict[str, Any]) -> str:
    """The window as the driver's line gives it: edges rounded inward to 50 rpm, the top
    of the grid (the rev limit) kept."""
    low = min(math.ceil(w["low_rpm"] / 50.0) * 50.0, w["best_rpm"])
    high = w["high_rpm"]
    if high < w["rpm"][-1] - 0.5:
        high = max(math.floor(high / 50.0) * 50.0, w["best_rpm"])
    return f"{_rpm(low)}-{_rpm(high)}"


def _loss_table(w: dict[str, Any]) -> Table:
    return Table(
        f"Shift {w['from_gear']}-{w['to_gear']}",
        (Column("Shift at", "rpm"), Column("Time lost", "s")),
        tuple(
            (_rpm(r), "-" if x is None else fmt(x, 3))
            for r, x in zip(w["rpm"], w["loss"], strict=True)
        ),
    )


def _windows_table(doc: dict[str, Any]) -> Table:
    return Table(
        "Windows",
        (
            Column("Shift", text=True),
            Column("From", "rpm"),
            Column("To", "rpm"),
            Column("Best", "rpm"),
            Column("Before the finish", text=True),
        ),
        tuple(
            (
                f"{w['from_gear']}-{w['to_gear']}",
                _rpm(w["low_rpm"]) if w["reached"] else "-",
                _rpm(w["high_rpm"]) if w["reached"] else "-",
                _rpm(w["best_rpm"]),
                "yes" if w["reached"] else "no: its rpm does not matter",
            )
            for w in doc["windows"]
        ),
        f"Window: where the shift costs under {doc['tolerance']:g} s to the finish, edges "
        "as interpolated; the lines below round them inward to 50 rpm.",
    )


def shift_window_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Each gear change's window within the tolerance, and its time lost by shift rpm."""
    reached = [w for w in doc["windows"] if w["reached"]]
    facts = (
        ("Finish", doc["finish"]),
        ("Best time", f"{fmt(doc['best_time'], 3)} s with every shift at its best"),
        (
            "Best shift rpm",
            ", ".join(
                f"{w['from_gear']}-{w['to_gear']} {_rpm(x)}"
                for w, x in zip(doc["windows"], doc["best_shift_rpm"], strict=True)
            ),
        ),
        ("Tolerance", f"{doc['tolerance']:g} s"),
        ("Runs simulated", str(doc["evaluations"])),
    )
    figures = [KeyFigure("Best time", fmt(doc["best_time"], 3), "s", doc["finish"])]
    figures += (
        KeyFigure(
            f"Shift {w['from_gear']}-{w['to_gear']}",
            _window(w),
            "rpm",
            f"best {_rpm(w['best_rpm'])}",
        )
        for w in reached[:3]
    )
    sections = (
        Section(
            "Where to shift",
            facts,
            (_windows_table(doc),),
            tuple(w["line"] for w in doc["windows"]),
        ),
        Section("Time lost by shift rpm", tables=tuple(_loss_table(w) for w in reached)),
        Section("Method", notes=(doc["method"],)),
    )
    return track_report(
        "Shift window",
        doc,
        units,
        sections=sections,
        key_figures=tuple(figures),
        chart_caption=(
            "Time lost to the finish [s] against the shift rpm of each gear change, the "
            f"others at their best; shaded where it costs under {doc['tolerance']:g} s."
        ),
    )


def _finish_fact(distance: float | None, units: UnitSystem) -> tuple[str, str]:
    lab = unit_labels(units)
    return ("Finish", "1/4 mile" if distance is None else f"{distance:g} {lab['distance']}")


def shift_window_inputs(body: ShiftWindowRequest) -> Section:
    """The car, the launch, the run and the grid, as the caller gave them."""
    u, run = body.units, body.run
    lab = unit_labels(u)
    facts = _car_facts(body.engine, body.drivetrain, body.vehicle, body.launch, u)
    start = (
        "standing start"
        if run.start_speed == 0.0
        else f"rolling start at {run.start_speed:g} {lab['speed']}"
    )
    finish = (
        _finish_fact(run.finish_distance, u)[1]
        if run.finish_speed is None
        else f"at {run.finish_speed:g} {lab['speed']}"
    )
    facts.append(("Run", f"{start}; finish {finish}"))
    facts.append(("Grid", f"{body.points} shift rpms per gear change"))
    return Section("Inputs", tuple(facts))


def _air_row(name: str, a: dict[str, Any]) -> tuple[str, ...]:
    return (
        name,
        fmt(a["temperature"], 1),
        fmt(a["pressure"], 2),
        fmt(a["relative_humidity"], 0),
        fmt(a["relative_density"], 1),
        f"{a['density_altitude']:,.0f}",
        fmt(a["correction_factor"], 4),
    )


def _air_table(doc: dict[str, Any]) -> Table:
    lab = doc["units"]
    rows = [_air_row("Taken in", doc["taken_in"])]
    if doc["predict_for"] is not None:
        rows.append(_air_row("Predict for", doc["predict_for"]))
    return Table(
        "Air",
        (
            Column("Weather", text=True),
            Column("Temp", lab["temperature"]),
            Column("Pressure", lab["pressure"]),
            Column("RH", "%"),
            Column("Density", "%"),
            Column("Density alt", lab["distance"]),
            Column("CF"),
        ),
        tuple(rows),
        f"Density: of ISO 2533 sea-level air; density altitude: the ISO 2533 altitude of "
        f"the same density; CF: the correction factor of {STANDARDS[doc['standard']]}.",
    )


def _slip_table(slip: dict[str, Any], speed: str) -> Table:
    et, trap = slip["simulated_et"], slip["simulated_trap"]
    return Table(
        "Slip",
        (Column("", text=True), Column("ET", "s"), Column("Trap", speed)),
        (
            ("Taken", fmt(slip["et"], 3), fmt(slip["trap"], 2)),
            ("Simulated, taken weather", fmt(et[0], 3), fmt(trap[0], 2)),
            ("Simulated, other weather", fmt(et[1], 3), fmt(trap[1], 2)),
            ("Predicted", fmt(slip["predicted_et"], 3), fmt(slip["predicted_trap"], 2)),
        ),
        "Predicted ET: the slip's plus the simulated change; trap: the slip's times the "
        "simulated ratio.",
    )


def _weather_figures(doc: dict[str, Any]) -> tuple[KeyFigure, ...]:
    lab, taken, other, slip = doc["units"], doc["taken_in"], doc["predict_for"], doc["slip"]
    altitude = "Density altitude"
    if other is None:
        return (
            KeyFigure(altitude, f"{taken['density_altitude']:,.0f}", lab["distance"]),
            KeyFigure("Air density", fmt(taken["relative_density"], 1), "%", "of sea level"),
            KeyFigure(
                "Correction factor",
                fmt(taken["correction_factor"], 4),
                "",
                STANDARDS[doc["standard"]],
            ),
        )
    figures = [
        KeyFigure(altitude, f"{taken['density_altitude']:,.0f}", lab["distance"], "slip taken in"),
        KeyFigure(altitude, f"{other['density_altitude']:,.0f}", lab["distance"], "predict for"),
    ]
    if slip is not None:
        figures += [
            KeyFigure(
                "Predicted ET", fmt(slip["predicted_et"], 3), "s", f"taken {slip['et']:.3f}"
            ),
            KeyFigure(
                "Predicted trap",
                fmt(slip["predicted_trap"], 2),
                lab["speed"],
                f"taken {slip['trap']:.2f}",
            ),
        ]
    return tuple(figures)


def weather_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """The air as a strip reports it and, with a car, the slip carried to other weather."""
    tables = [_air_table(doc)]
    if doc["slip"] is not None:
        tables.append(_slip_table(doc["slip"], doc["units"]["speed"]))
    sections = (
        Section("Weather", (("Standard", STANDARDS[doc["standard"]]),), tuple(tables)),
        Section("Method", notes=(doc["method"], "Limits: " + doc["limits"])),
    )
    return track_report(
        "Weather correction", doc, units, sections=sections, key_figures=_weather_figures(doc)
    )


def weather_inputs(body: WeatherCorrectionRequest) -> Section:
    """The weathers, the slip and the car, as the caller gave them."""
    u = body.units
    lab = unit_labels(u)

    def weather(w: Any) -> str:
        return (
            f"{w.temperature:g} {lab['temperature']}, {w.pressure:g} {lab['pressure']}, "
            f"{w.relative_humidity:g} % humidity"
        )

    facts: Facts = [("Taken in", weather(body.taken_in))]
    if body.predict_for is not None:
        facts.append(("Predict for", weather(body.predict_for)))
    if body.slip is not None:
        facts.append(("Slip", f"ET {body.slip.et:g} s, trap {body.slip.trap:g} {lab['speed']}"))
    if body.engine is not None and body.drivetrain is not None and body.vehicle is not None:
        facts += _car_facts(body.engine, body.drivetrain, body.vehicle, body.launch, u)
        facts.append(_finish_fact(body.finish_distance, u))
    return Section("Inputs", tuple(facts))
