"""Printable sheet of the coast-down road-load fit.

The builder reads the JSON document of POST /v1/road-load/coast-down (already in the
caller's units), so the paper and the JSON agree to the digit; the inputs part is read from
the request, in the caller's own units.
"""

from __future__ import annotations

from typing import Any

from core.car.coast_down_reference import (
    REFERENCE_TEMPERATURE_K,
    ROLLING_TEMPERATURE_COEFFICIENT_PER_K,
)
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt
from service.output.sheets_track import track_report
from service.schemas.coastdown import CoastDownRequest
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = ["coast_down_inputs", "coast_down_report"]

_SPEED_STEPS = {UnitSystem.METRIC: 10.0, UnitSystem.US: 5.0}  # road-load table rows


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


def _terms_table(doc: dict[str, Any]) -> Table:
    cu, at_ref = doc["coefficient_units"], doc["reference_conditions"]["coast_down"]
    return Table(
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
                _g(at_ref[j]),
                cu[j],
            )
            for j in range(3)
        ),
    )


def _runs_table(doc: dict[str, Any]) -> Table:
    lab, cu = doc["units"], doc["coefficient_units"]
    return Table(
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


def _fit_facts(doc: dict[str, Any]) -> tuple[tuple[str, str], ...]:
    lab, at_ref = doc["units"], doc["reference_conditions"]["coast_down"]
    return (
        ("Equiv. mass", f"{fmt(doc['equivalent_mass'], 1)} {lab['mass']}"),
        (
            "Residual",
            f"{fmt(doc['residual_rms'], 2)} {lab['speed']} RMS, largest "
            f"{fmt(doc['residual_max'], 2)} {lab['speed']}",
        ),
        ("Drag area", f"{fmt(doc['drag_area'], 3)} {lab['area']} (2 F2 / air density)"),
        ("Rolling coeff.", f"{fmt(doc['rolling_coefficient'], 4)} (F0 / weight)"),
        ("Block to paste", "coast_down [" + ", ".join(_g(x) for x in at_ref) + "]"),
    )


def _reference_facts(doc: dict[str, Any]) -> tuple[tuple[str, str], ...]:
    lab, ref = doc["units"], doc["reference_conditions"]
    return (
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


def coast_down_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """Road-load terms with their intervals and at reference, the runs, load at speed."""
    lab, cu = doc["units"], doc["coefficient_units"]
    at_ref = doc["reference_conditions"]["coast_down"]
    figures = [KeyFigure(f"F{j}", _g(at_ref[j]), cu[j], "at reference") for j in range(3)]
    figures.append(KeyFigure("Drag area", fmt(doc["drag_area"], 3), lab["area"], "CdA"))
    sections = (
        Section("Road load", _fit_facts(doc), (_terms_table(doc), _road_load_table(doc, units))),
        Section("Runs", tables=(_runs_table(doc),)),
        Section("Reference conditions", _reference_facts(doc), notes=(_reference_note(units),)),
        Section("Method", notes=(doc["method"],)),
    )
    return track_report(
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
