"""Printable sheets of the track answers: coast-down road load, shift window, weather.

Each builder reads the JSON document its endpoint answers with (already in the caller's
units, its labels in ``doc["units"]``), so the paper and the JSON agree to the digit; the
inputs part is read from the request (``*_inputs``), in the caller's own units.
"""

from __future__ import annotations

import math
from typing import Any

from core import CurveSource
from core.car.coast_down import (
    REFERENCE_TEMPERATURE_K,
    ROLLING_TEMPERATURE_COEFFICIENT_PER_K,
)
from core.shifts.plan import resolve_rev_limit
from service.mapping.inputs import build_curve, build_drivetrain, build_tire
from service.mapping.shift_plan import tire_document
from service.output.cautions import SHORT_CAUTION
from service.output.inputs import (
    curve_facts,
    drivetrain_facts,
    launch_facts,
    units_line,
    vehicle_facts,
)
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt
from service.schemas.coastdown import CoastDownRequest
from service.schemas.inputs import DrivetrainIn, EngineIn
from service.schemas.shift_window import ShiftWindowRequest
from service.schemas.vehicle import LaunchIn, VehicleIn
from service.schemas.weather import WeatherCorrectionRequest
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = [
    "coast_down_inputs",
    "coast_down_report",
    "shift_window_inputs",
    "shift_window_report",
    "weather_inputs",
    "weather_report",
]

Facts = list[tuple[str, str]]
STANDARDS = {
    "sae_j1349_2004": "SAE J1349 (2004)",
    "sae_j1349_1990": "SAE J1349 (1990)",
    "sae_j607": "SAE J607",
    "din_70020": "DIN 70020",
    "iso_1585": "ISO 1585",
}
_SPEED_STEPS = {UnitSystem.METRIC: 10.0, UnitSystem.US: 5.0}  # road-load table rows


def _report(kind: str, doc: dict[str, Any], units: UnitSystem, **parts: Any) -> Report:
    notes = tuple(w["message"] for w in doc.get("warnings", ()))
    sections = parts.pop("sections") + ((Section("Warnings", notes=notes),) if notes else ())
    return Report(
        kind=kind,
        reference=doc.get("reference"),
        units=units_line(units),
        short_caution=SHORT_CAUTION,
        sections=sections,
        cautions=tuple(doc["cautions"]),
        **parts,
    )


def _g(value: float) -> str:
    """A coefficient with five significant figures."""
    return f"{value:.5g}"


def _road_load_table(doc: dict[str, Any], units: UnitSystem) -> Table:
    lab = doc["units"]
    fitted = [doc[f"f{j}"]["value"] for j in range(3)]
    at_ref = doc["reference_conditions"]["coast_down"]
    step = _SPEED_STEPS[units]
    fastest = max(r["start_speed"] for r in doc["runs"])
    speeds = [step * k for k in range(1, int(fastest // step) + 1)] or [fastest]

    def force(c: list[float], v: float) -> float:
        return c[0] + c[1] * v + c[2] * v * v

    return Table(
        "Road load at speed",
        (
            Column("Speed", lab["speed"]),
            Column("Rolling", lab["force"]),
            Column("Aero", lab["force"]),
            Column("Fitted", lab["force"]),
            Column("At reference", lab["force"]),
        ),
        tuple(
            (
                fmt(v),
                fmt(fitted[0] + fitted[1] * v, 1),
                fmt(fitted[2] * v * v, 1),
                fmt(force(fitted, v), 1),
                fmt(force(at_ref, v), 1),
            )
            for v in speeds
        ),
        "Rolling: F0 + F1 v; aero: F2 v^2; both as fitted in the test weather.",
    )


def _reference_note(units: UnitSystem) -> str:
    """How the terms are carried to reference conditions, in the caller's degrees."""
    t_ref = REFERENCE_TEMPERATURE_K
    per_degree = ROLLING_TEMPERATURE_COEFFICIENT_PER_K / (
        from_si(t_ref + 1.0, Quantity.TEMPERATURE, units)
        - from_si(t_ref, Quantity.TEMPERATURE, units)
    )
    degree = unit_labels(units)["temperature"]
    return (
        "SAE J1263 in outline: F2 x reference / test air density; F0 and F1 x (1 + "
        f"{per_degree:.3g}/{degree} x (T - reference temperature)) (values from memory). "
        "No wind or grade correction beyond the paired runs."
    )


def coast_down_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Road-load terms with their intervals and at reference, the runs, load at speed."""
    lab, cu = doc["units"], doc["coefficient_units"]
    ref = doc["reference_conditions"]
    terms = Table(
        "Road-load terms",
        (
            Column("Term", text=True),
            Column("Fitted"),
            Column("95 % from"),
            Column("95 % to"),
            Column("At reference"),
            Column("Unit", text=True),
        ),
        tuple(
            (
                f"F{j}",
                _g(doc[f"f{j}"]["value"]),
                _g(doc[f"f{j}"]["low"]),
                _g(doc[f"f{j}"]["high"]),
                _g(ref["coast_down"][j]),
                cu[j],
            )
            for j in range(3)
        ),
    )
    runs = Table(
        "Each run fitted alone",
        (
            Column("Run"),
            Column("Way", text=True),
            Column("Time", "s"),
            Column("From", lab["speed"]),
            Column("To", lab["speed"]),
            Column("F0", cu[0]),
            Column("F1", cu[1]),
            Column("F2", cu[2]),
            Column("RMS", lab["speed"]),
        ),
        tuple(
            (
                str(k + 1),
                r["direction"],
                fmt(r["duration"], 1),
                fmt(r["start_speed"], 1),
                fmt(r["end_speed"], 1),
                _g(r["coast_down"][0]),
                _g(r["coast_down"][1]),
                _g(r["coast_down"][2]),
                fmt(r["residual_rms"], 2),
            )
            for k, r in enumerate(doc["runs"])
        ),
    )
    facts = (
        ("Equiv. mass", f"{fmt(doc['equivalent_mass'], 1)} {lab['mass']}"),
        (
            "Residual",
            f"{fmt(doc['residual_rms'], 2)} {lab['speed']} RMS, largest "
            f"{fmt(doc['residual_max'], 2)} {lab['speed']}",
        ),
        ("Drag area", f"{fmt(doc['drag_area'], 3)} {lab['area']} (2 F2 / air density)"),
        ("Rolling coeff.", f"{fmt(doc['rolling_coefficient'], 4)} (F0 / weight)"),
        ("Block to paste", "coast_down [" + ", ".join(_g(x) for x in ref["coast_down"]) + "]"),
    )
    reference = (
        (
            "Reference",
            f"{fmt(ref['temperature'], 1)} {lab['temperature']}, "
            f"{fmt(ref['pressure'], 2)} {lab['pressure']}, dry air",
        ),
        (
            "Corrected",
            f"air density ratio {fmt(ref['air_density_ratio'], 4)} (test / reference), "
            f"rolling factor {fmt(ref['rolling_factor'], 4)}"
            if ref["applied"]
            else "no test weather given: the coefficients are as measured",
        ),
    )
    figures = [
        KeyFigure(f"F{j}", _g(ref["coast_down"][j]), cu[j], "at reference") for j in range(3)
    ]
    figures.append(KeyFigure("Drag area", fmt(doc["drag_area"], 3), lab["area"], "CdA"))
    sections = (
        Section("Road load", facts, (terms, _road_load_table(doc, units))),
        Section("Runs", tables=(runs,)),
        Section("Reference conditions", reference, notes=(_reference_note(units),)),
        Section("Method", notes=(doc["method"],)),
    )
    return _report(
        "Coast-down road load",
        doc,
        units,
        sections=sections,
        key_figures=tuple(figures),
        chart_caption=(
            f"Road speed [{lab['speed']}] against time [s] of each run: the logged samples "
            "and the speed its own fitted road load gives from its best start."
        ),
    )


def coast_down_inputs(body: CoastDownRequest) -> Section:
    """The car's mass and the test weather as the caller gave them."""
    u = unit_labels(body.units)
    equivalent = (
        "1.03 x mass (common practice)"
        if body.equivalent_mass is None
        else f"{body.equivalent_mass:g} {u['mass']}"
    )
    c = body.conditions
    weather = (
        "not given"
        if c is None
        else f"{c.temperature:g} {u['temperature']}, {c.pressure:g} {u['pressure']}, "
        f"{c.relative_humidity:g} % humidity"
    )
    facts = [
        ("Test mass", f"{body.mass:g} {u['mass']}"),
        ("Equiv. mass", equivalent),
        ("Test weather", weather),
    ]
    for k, r in enumerate(body.runs):
        span = r.time[-1] - r.time[0]
        facts.append(
            (
                f"Run {k + 1}",
                f"{r.direction}: {len(r.time)} samples over {span:g} s "
                f"({(len(r.time) - 1) / span:.3g} per s), {r.speed[0]:g} to {r.speed[-1]:g} "
                f"{u['speed']}",
            )
        )
    return Section("Inputs", tuple(facts))


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


def shift_window_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Each gear change's window within the tolerance, and its time lost by shift rpm."""
    reached = [w for w in doc["windows"] if w["reached"]]
    windows = Table(
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
        Section("Where to shift", facts, (windows,), tuple(w["line"] for w in doc["windows"])),
        Section("Time lost by shift rpm", tables=tuple(_loss_table(w) for w in reached)),
        Section("Method", notes=(doc["method"],)),
    )
    return _report(
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
        fmt(a["density"], 4),
        f"{a['density_altitude']:,.0f}",
        fmt(a["correction_factor"], 4),
    )


def weather_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """The air as a strip reports it and, with a car, the slip carried to other weather."""
    lab = doc["units"]
    taken, other, slip = doc["taken_in"], doc["predict_for"], doc["slip"]
    rows = [_air_row("Taken in", taken)]
    if other is not None:
        rows.append(_air_row("Predict for", other))
    air = Table(
        "Air",
        (
            Column("Weather", text=True),
            Column("Temp", lab["temperature"]),
            Column("Pressure", lab["pressure"]),
            Column("RH", "%"),
            Column("Density", "kg/m^3"),
            Column("Density alt", lab["distance"]),
            Column("CF"),
        ),
        tuple(rows),
        f"CF: the correction factor of {STANDARDS[doc['standard']]} for that air; density "
        "altitude: the ISO 2533 altitude of the same density.",
    )
    tables = [air]
    figures = [
        KeyFigure(
            "Density altitude",
            f"{taken['density_altitude']:,.0f}",
            lab["distance"],
            "slip taken in" if other is not None else f"{fmt(taken['relative_density'], 1)} %",
        )
    ]
    if other is not None:
        figures.append(
            KeyFigure(
                "Density altitude",
                f"{other['density_altitude']:,.0f}",
                lab["distance"],
                "predict for",
            )
        )
    if slip is not None:
        sp = lab["speed"]
        tables.append(
            Table(
                "Slip",
                (Column("", text=True), Column("ET", "s"), Column("Trap", sp)),
                (
                    ("Taken", fmt(slip["et"], 3), fmt(slip["trap"], 2)),
                    (
                        "Simulated, taken weather",
                        fmt(slip["simulated_et"][0], 3),
                        fmt(slip["simulated_trap"][0], 2),
                    ),
                    (
                        "Simulated, other weather",
                        fmt(slip["simulated_et"][1], 3),
                        fmt(slip["simulated_trap"][1], 2),
                    ),
                    ("Predicted", fmt(slip["predicted_et"], 3), fmt(slip["predicted_trap"], 2)),
                ),
                "Predicted ET: the slip's plus the simulated change; trap: the slip's times "
                "the simulated ratio.",
            )
        )
        figures += [
            KeyFigure(
                "Predicted ET", fmt(slip["predicted_et"], 3), "s", f"taken {fmt(slip['et'], 3)}"
            ),
            KeyFigure(
                "Predicted trap",
                fmt(slip["predicted_trap"], 2),
                sp,
                f"taken {fmt(slip['trap'], 2)}",
            ),
        ]
    else:
        figures += [
            KeyFigure("Air density", fmt(taken["density"], 4), "kg/m^3"),
            KeyFigure(
                "Correction factor",
                fmt(taken["correction_factor"], 4),
                "",
                STANDARDS[doc["standard"]],
            ),
        ]
    facts = (("Standard", STANDARDS[doc["standard"]]),)
    sections = (
        Section("Weather", facts, tuple(tables)),
        Section("Method", notes=(doc["method"], "Limits: " + doc["limits"])),
    )
    return _report("Weather correction", doc, units, sections=sections, key_figures=tuple(figures))


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
