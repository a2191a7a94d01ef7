"""Printable sheet of a pass calibration, read from the JSON document its endpoint answers.

The document is already in the caller's units (labels in ``doc["units"]``), so the paper and
the JSON agree to the digit.
"""

from __future__ import annotations

from typing import Any

import numpy as np

from service.output.cautions import CAUTIONS, SHORT_CAUTION
from service.output.chart_data_track import PlotChart, PlotSeries
from service.output.inputs import units_line
from service.output.model import Column, KeyFigure, Report, Section, Table, fmt, thin_rows
from service.units import UnitSystem

__all__ = ["calibration_chart", "calibration_report"]

CHART_MARKS = 60  # logged samples marked on the chart

_FIGURES = (
    ("mass_factor", "Mass factor", ""),
    ("efficiency", "Efficiency", ""),
    ("drag_area", "Drag area", "area"),
)


def _figures_table(doc: dict[str, Any]) -> Table:
    lab = doc["units"]
    rows = []
    for key, label, unit in _FIGURES:
        f = doc["figures"][key]
        rows.append(
            (
                label,
                fmt(f["value"], 4),
                fmt(f["std_error"], 4) if f["fitted"] else "held",
                fmt(f["prior"], 4),
                f"{fmt(f['bounds'][0], 3)} to {fmt(f['bounds'][1], 3)}",
                lab[unit] if unit else "-",
            )
        )
    return Table(
        "Fitted figures",
        (
            Column("Figure", text=True),
            Column("Fitted"),
            Column("Std. unc."),
            Column("Yours"),
            Column("Bounds", text=True),
            Column("Unit", text=True),
        ),
        tuple(rows),
        "Standard uncertainty (1 sigma) from the Jacobian at the solution.",
    )


def _gears_table(doc: dict[str, Any]) -> Table:
    lab = doc["units"]
    return Table(
        "Gear by gear",
        (
            Column("Gear"),
            Column("From", "s"),
            Column("To", "s"),
            Column("Samples"),
            Column("RMS", lab["speed"]),
            Column("Max", lab["speed"]),
            Column("Time err", "s"),
            Column("Shift", "rpm"),
            Column("Eff. mass", lab["mass"]),
        ),
        tuple(
            (
                str(g["gear"]),
                fmt(g["start_time"], 2),
                fmt(g["end_time"], 2),
                str(g["samples"]),
                fmt(g["residual_rms"], 2),
                fmt(g["residual_max"], 2),
                "-" if g["time_error"] is None else f"{g['time_error']:+.3f}",
                fmt(g["shift_rpm"]),
                fmt(g["effective_mass"]),
            )
            for g in doc["gears"]
        ),
        "Time error: the model's time at the logged speed of the gear's end, less the "
        "logged time (positive: the model is slower).",
    )


def _trace_table(doc: dict[str, Any]) -> Table:
    tr, lab = doc["trace"], doc["units"]
    return Table(
        "Logged and fitted speed",
        (
            Column("Time", "s"),
            Column("Logged", lab["speed"]),
            Column("Fitted", lab["speed"]),
        ),
        tuple(
            (
                fmt(tr["time"][i], 2),
                fmt(tr["logged_speed"][i], 1),
                fmt(tr["fitted_speed"][i], 1),
            )
            for i in thin_rows(len(tr["time"]))
        ),
    )


def _block_facts(doc: dict[str, Any]) -> tuple[tuple[str, str], ...]:
    lab = doc["units"]
    veh, drv = doc["calibrated"]["vehicle"], doc["calibrated"]["drivetrain"]
    j, load = veh["inertia"], veh["road_load"]
    if "coast_down" in load:
        drag = "coast_down " + ", ".join(f"{x:.5g}" for x in load["coast_down"])
    elif "drag_coefficient" in load:
        drag = f"drag_coefficient {load['drag_coefficient']:.4g}"
    else:
        drag = f"drag_area {load['drag_area']:.4g} {lab['area']}"
    eff = drv["efficiency"]
    return (
        (
            "Inertia",
            f"engine {j['engine']:.4g}, driveshaft {j['driveshaft']:.4g}, wheels "
            f"{j['wheels']:.4g} {lab['inertia']}",
        ),
        ("Road load", drag),
        ("Efficiency", f"{eff:.4g}" if isinstance(eff, float | int) else "as given"),
    )


def calibration_chart(doc: dict[str, Any], units: UnitSystem) -> PlotChart:
    """The calibrated model's speed (a line per gear) and the logged samples (marks)."""
    tr, lab = doc["trace"], doc["units"]
    t = np.asarray(tr["time"], dtype=np.float64)
    fitted = np.asarray(tr["fitted_speed"], dtype=np.float64)
    logged = np.asarray(tr["logged_speed"], dtype=np.float64)
    starts = [g["start_time"] for g in doc["gears"][1:]] + [np.inf]
    series, lo = [], -np.inf
    every = max(1, -(-t.size // CHART_MARKS))
    marked = np.zeros(t.size, dtype=np.bool_)
    marked[::every] = True
    for g, hi in zip(doc["gears"], starts, strict=True):
        keep = (t >= lo) & (t < hi)
        if keep.any():
            series.append(
                PlotSeries(
                    str(g["gear"]), t[keep], fitted[keep], t[keep & marked], logged[keep & marked]
                )
            )
        lo = hi
    f = doc["fit"]
    top = float(max(fitted.max(), logged.max())) if t.size else 1.0
    return PlotChart(
        title="Pass calibration: logged speed and the calibrated model",
        subtitle=" | ".join(
            [
                *([f"ref {doc['reference']}"] if doc.get("reference") else []),
                f"{f['samples']} samples",
                f"residual {f['residual_rms']:.2f} {lab['speed']} RMS ({units.value})",
            ]
        ),
        x_label="Log time [s]",
        y_label=f"Road speed [{lab['speed']}]",
        x_range=(min(0.0, float(t[0])), max(float(t[-1]), 1e-3) * 1.03),
        y_range=(0.0, max(top, 1e-3) * 1.12),
        series=tuple(series),
        key="marks: logged speed; line: calibrated model, tagged by gear",
    )


def calibration_report(doc: dict[str, Any], units: UnitSystem) -> Report:
    """The fitted figures, the fit gear by gear and the calibrated car."""
    f, lab = doc["fit"], doc["units"]
    start = (
        f"standing, launch at {fmt(f['launch_time'], 2)} s"
        if f["start"] == "standing"
        else f"rolling at {fmt(f['start_speed'], 1)} {lab['speed']}"
    )
    facts = (
        ("Start", start),
        (
            "Fitted",
            f"{f['samples']} samples, {fmt(f['fitted_from'], 2)} to "
            f"{fmt(f['fitted_until'], 2)} s (gears from {f['gears_from']})",
        ),
        (
            "Residual",
            f"{fmt(f['residual_rms'], 2)} {lab['speed']} RMS (largest "
            f"{fmt(f['residual_max'], 2)}); {fmt(f['residual_rms_before'], 2)} with your "
            "figures",
        ),
    )
    m = doc["correlation"]["matrix"]
    corr = (
        f"mass factor/efficiency {m[0][1]:+.2f}, mass factor/drag area {m[0][2]:+.2f}, "
        f"efficiency/drag area {m[1][2]:+.2f}"
    )
    figures = doc["figures"]
    key = tuple(
        KeyFigure(
            label,
            fmt(figures[k]["value"], 3),
            lab[u] if u else "",
            f"+- {fmt(figures[k]['std_error'], 3)}",
        )
        for k, label, u in _FIGURES
    )
    notes = tuple(w["message"] for w in doc["warnings"])
    sections = (
        Section("The pass", facts, (_figures_table(doc),), (f"Correlation: {corr}.",)),
        Section("Fit", (), (_gears_table(doc), _trace_table(doc))),
        Section(
            "Calibrated car",
            _block_facts(doc),
            (),
            ("The response's `calibrated` blocks paste into the run, shift plan and sweep.",),
        ),
        Section("Method", (), (), (doc["method"], doc["priors"])),
        *((Section("Warnings", notes=notes),) if notes else ()),
    )
    return Report(
        kind="Pass calibration",
        reference=doc.get("reference"),
        units=units_line(units),
        short_caution=SHORT_CAUTION,
        sections=sections,
        cautions=CAUTIONS,
        chart_caption="Speed against time: the calibrated model gear by gear (lines) and the "
        f"logged samples (marks, at most {CHART_MARKS}).",
        key_figures=key,
    )
