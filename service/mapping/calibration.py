"""Pass calibration: request -> core inputs in SI, the fit -> response document and summary."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from core import drive_model
from core.car.calibration import FittedFigure, PassCalibration, calibrate_pass
from core.car.calibration_fit import (
    DRAG_AREA_WIDTH_FLOOR_M2,
    EFFICIENCY_WIDTH,
    MASS_FACTOR_WIDTH,
    PRIOR_SPEED_M_S,
)
from service.mapping.documents import notices_out
from service.mapping.inputs import (
    DRIVETRAIN_FIELDS,
    build_curve,
    build_drivetrain,
    build_tire,
    core_fields,
)
from service.mapping.log_analysis import LOG_FIELDS, build_pass_log
from service.mapping.vehicle import (
    LAUNCH_FIELDS,
    VEHICLE_FIELDS,
    air_density,
    build_launch,
    build_vehicle,
)
from service.output.cautions import CAUTIONS
from service.output.sheets import summary_sheet, wrap_text
from service.schemas.calibration import MAX_TRACE_POINTS, CalibrationRequest
from service.units import Quantity, UnitSystem, from_si, unit_labels

__all__ = [
    "CALIBRATION_FIELDS",
    "CALIBRATION_METHOD",
    "calibrate_request",
    "calibration_document",
    "calibration_summary",
    "priors_text",
]

CALIBRATION_FIELDS: Mapping[str, str] = {
    **DRIVETRAIN_FIELDS,
    **VEHICLE_FIELDS,
    **LAUNCH_FIELDS,
    **LOG_FIELDS,
    "rev_limit_rpm": "engine.rev_limit_rpm",
    "tolerance": "options",
    "smoothing_window_s": "options.smoothing_window",
    "start_gear": "options.start_gear",
    "log": "log",
    "drivetrain": "drivetrain",
    "air_density_kg_m3": "vehicle.air",
    "mass_factor": "vehicle.inertia",
    "drag_area": "vehicle.road_load",
    "shift_time_s": "launch.shift_time",
}
CALIBRATION_METHOD = (
    "The pass is simulated with the acceleration run's integrator, shifting at the logged "
    "shift speeds, and its speed matched to the logged speed at the logged times by bounded "
    "least squares (scipy trust-region reflective) over the mass factor k (effective mass m "
    "+ k Mr per gear), one driveline efficiency and the drag area, with the launch instant "
    "(standing start) or start speed (rolling) fitted too. Standard uncertainties: cov = "
    "s^2 (J^T J)^-1 at the solution, assuming independent speed errors."
)


def priors_text(units: UnitSystem) -> str:
    """How the priors pull, in the caller's units."""
    lab = unit_labels(units)
    speed = from_si(PRIOR_SPEED_M_S, Quantity.SPEED, units)
    area = from_si(DRAG_AREA_WIDTH_FLOOR_M2, Quantity.AREA, units)
    return (
        f"Each figure is pulled towards your value by a residual worth {speed:.2g} "
        f"{lab['speed']} of speed error per prior width: {MASS_FACTOR_WIDTH:g} for the mass "
        f"factor, {EFFICIENCY_WIDTH:.2f} for the efficiency, half your drag area (at least "
        f"{area:.2g} {lab['area']}) for the drag area."
    )


_NAMES = ("mass_factor", "efficiency", "drag_area")


def calibrate_request(body: CalibrationRequest) -> tuple[PassCalibration, float]:
    """The fit of a request and the air density of its drag term [kg/m^3]."""
    u = body.units
    curve = build_curve(body.engine.curve, u)
    drivetrain, tire = build_drivetrain(body.drivetrain), build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    density = air_density(body.vehicle.air, u)
    log, _text = build_pass_log(body.log, u)
    with core_fields(CALIBRATION_FIELDS, u):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        fit = calibrate_pass(
            log,
            model,
            density,
            smoothing_window_s=body.options.smoothing_window,
            start_gear=body.options.start_gear,
        )
    return fit, density


def _figure(f: FittedFigure, scale: float, digits: int) -> dict[str, Any]:
    return {
        "value": round(f.value * scale, digits),
        "std_error": round(f.std_error * scale, digits + 1),
        "prior": round(f.prior * scale, digits),
        "bounds": [round(f.low_bound * scale, digits), round(f.high_bound * scale, digits)],
        "fitted": f.fitted,
        "at_bound": f.at_bound,
    }


def _vehicle_block(
    body: CalibrationRequest, fit: PassCalibration, density: float
) -> dict[str, Any]:
    u = body.units
    block: dict[str, Any] = body.vehicle.model_dump(mode="json", exclude_none=True)
    j = fit.inertia
    block["inertia"] = {
        name: round(from_si(value, Quantity.INERTIA, u), 5)
        for name, value in (
            ("engine", j.engine_kg_m2),
            ("driveshaft", j.driveshaft_kg_m2),
            ("wheels", j.wheels_kg_m2),
        )
    }
    load = block["road_load"]
    cda = fit.drag_area.value
    if "coast_down" in load:
        f2 = from_si(0.5 * density * cda, Quantity.FORCE_PER_SPEED_SQUARED, u)
        load["coast_down"] = [*load["coast_down"][:2], round(f2, 7)]
        return block
    area = load.get("frontal_area")
    if area is not None and load.get("drag_coefficient") is not None:
        cd = from_si(cda, Quantity.AREA, u) / area
        if cd <= 3.0:
            load["drag_coefficient"] = round(cd, 4)
            return block
        del load["drag_coefficient"]
    load["drag_area"] = round(from_si(cda, Quantity.AREA, u), 4)
    return block


def _drivetrain_block(body: CalibrationRequest, fit: PassCalibration) -> dict[str, Any]:
    block: dict[str, Any] = body.drivetrain.model_dump(mode="json", exclude_none=True)
    if "ring_and_pinion" in block:
        block.pop("final_drive_ratio", None)
    if fit.efficiency.fitted:
        block["efficiency"] = round(fit.efficiency.value, 4)
    return block


def _gears(fit: PassCalibration, units: UnitSystem) -> list[dict[str, Any]]:
    def speed(x: float) -> float | None:
        return None if not np.isfinite(x) else round(from_si(x, Quantity.SPEED, units), 3)

    last = fit.gears[-1].gear
    out = []
    for g in fit.gears:
        i = g.gear - 1
        out.append(
            {
                "gear": g.gear,
                "start_time": round(g.start_time_s, 3),
                "end_time": round(g.end_time_s, 3),
                "samples": g.samples,
                "residual_rms": speed(g.rms_m_s),
                "residual_max": speed(g.max_m_s),
                "time_error": None if g.time_error_s is None else round(g.time_error_s, 3),
                "shift_rpm": None if g.gear == last else round(float(fit.shift_rpm[i]), 1),
                "effective_mass": round(
                    from_si(float(fit.effective_mass_kg[i]), Quantity.MASS, units), 1
                ),
                "effective_mass_before": round(
                    from_si(float(fit.prior_effective_mass_kg[i]), Quantity.MASS, units), 1
                ),
            }
        )
    return out


def _trace(fit: PassCalibration, units: UnitSystem) -> dict[str, Any]:
    n = fit.time_s.size
    pick = np.unique(np.linspace(0, n - 1, min(n, MAX_TRACE_POINTS)).round().astype(np.int64))
    v = Quantity.SPEED
    return {
        "time": np.round(fit.time_s[pick], 3),
        "logged_speed": np.round(from_si(fit.logged_speed_m_s[pick], v, units), 3),
        "fitted_speed": np.round(from_si(fit.fitted_speed_m_s[pick], v, units), 3),
    }


def calibration_document(
    body: CalibrationRequest, fit: PassCalibration, density: float
) -> dict[str, Any]:
    """The body of a calibration response, without reference and summary."""
    u = body.units
    speed, area = Quantity.SPEED, from_si(1.0, Quantity.AREA, u)
    window = fit.window
    return {
        "units": unit_labels(u),
        "figures": {
            "mass_factor": _figure(fit.mass_factor, 1.0, 4),
            "efficiency": _figure(fit.efficiency, 1.0, 4),
            "drag_area": _figure(fit.drag_area, area, 4),
        },
        "correlation": {"names": list(_NAMES), "matrix": np.round(fit.correlation, 4)},
        "fit": {
            "start": fit.start.value,
            "launch_time": round(fit.launch_time_s, 3),
            "start_speed": round(from_si(fit.start_speed_m_s, speed, u), 3),
            "fitted_from": round(float(fit.time_s[0]), 3),
            "fitted_until": round(float(fit.time_s[-1]), 3),
            "samples": int(fit.time_s.size),
            "gears_from": window.analysis.gears_from.value,
            "residual_rms": round(from_si(fit.residual_rms_m_s, speed, u), 4),
            "residual_max": round(from_si(fit.residual_max_m_s, speed, u), 4),
            "residual_rms_before": round(from_si(fit.residual_rms_before_m_s, speed, u), 4),
        },
        "gears": _gears(fit, u),
        "calibrated": {
            "vehicle": _vehicle_block(body, fit, density),
            "drivetrain": _drivetrain_block(body, fit),
        },
        "trace": _trace(fit, u),
        "method": CALIBRATION_METHOD,
        "priors": priors_text(u),
        "warnings": notices_out(fit.notices, CALIBRATION_FIELDS, u),
        "cautions": list(CAUTIONS),
    }


def _figure_lines(doc: Mapping[str, Any]) -> list[str]:
    figs, lab = doc["figures"], doc["units"]
    rows = (("Mass factor", "mass_factor", "-"), ("Efficiency", "efficiency", "-"))
    lines = ["Figure          fitted   std. unc.      yours  unit"]
    for label, key, unit in (*rows, ("Drag area", "drag_area", lab["area"])):
        f = figs[key]
        unc = f"{f['std_error']:>9.4f}" if f["fitted"] else "     held"
        mark = "  (at a bound)" if f["at_bound"] else ""
        lines.append(f"{label:<12}  {f['value']:>8.4f}  {unc}  {f['prior']:>9.4f}  {unit}{mark}")
    m = doc["correlation"]["matrix"]
    pairs = (
        ("mass factor/efficiency", m[0][1]),
        ("mass factor/drag area", m[0][2]),
        ("efficiency/drag area", m[1][2]),
    )
    text = "Correlation: " + ", ".join(f"{n} {float(r):+.2f}" for n, r in pairs)
    return [*lines, "", *wrap_text(text)]


def _gear_lines(doc: Mapping[str, Any]) -> list[str]:
    lab = doc["units"]
    lines = [
        f"Gear  From s   To s  Samples  RMS {lab['speed']:<5} Max {lab['speed']:<5} "
        f"Time err s  Shift rpm",
    ]
    for g in doc["gears"]:
        rms = "-" if g["residual_rms"] is None else f"{g['residual_rms']:.2f}"
        top = "-" if g["residual_max"] is None else f"{g['residual_max']:.2f}"
        err = "-" if g["time_error"] is None else f"{g['time_error']:+.3f}"
        shift = "-" if g["shift_rpm"] is None else f"{g['shift_rpm']:.0f}"
        lines.append(
            f"{g['gear']:>4}  {g['start_time']:>6.2f} {g['end_time']:>6.2f}  {g['samples']:>7}"
            f"  {rms:>9}  {top:>9}  {err:>10}  {shift:>9}"
        )
    return lines


def _block_lines(doc: Mapping[str, Any]) -> list[str]:
    lab = doc["units"]
    veh, drv = doc["calibrated"]["vehicle"], doc["calibrated"]["drivetrain"]
    j = veh["inertia"]
    load = veh["road_load"]
    drag = (
        f"coast_down F2 {load['coast_down'][2]:.5g}"
        if "coast_down" in load
        else f"drag_coefficient {load['drag_coefficient']:.4g}"
        if "drag_coefficient" in load
        else f"drag_area {load['drag_area']:.4g} {lab['area']}"
    )
    eff = drv["efficiency"]
    eff_text = f"{eff:.4g}" if isinstance(eff, float | int) else "as given"
    text = (
        f"Calibrated car (the `calibrated` blocks): inertia engine {j['engine']:.4g}, "
        f"driveshaft {j['driveshaft']:.4g}, wheels {j['wheels']:.4g} {lab['inertia']}; "
        f"{drag}; efficiency {eff_text}."
    )
    return wrap_text(text)


def calibration_summary(
    doc: Mapping[str, Any], fit: PassCalibration, units: UnitSystem, reference: str | None
) -> str:
    """The calibration as a short printable sheet: 80 columns, printable ASCII."""
    f, lab = doc["fit"], doc["units"]
    gears = doc["gears"]
    start = (
        f"standing start, launch at {f['launch_time']:.2f} s"
        if f["start"] == "standing"
        else f"rolling start at {f['start_speed']:.1f} {lab['speed']}"
    )
    first, last = gears[0]["gear"], gears[-1]["gear"]
    span = f"gears {first}-{last}" if last > first else f"gear {first}"
    body = [
        *wrap_text(
            f"Pass: {start}; {f['samples']} samples fitted from {f['fitted_from']:.2f} to "
            f"{f['fitted_until']:.2f} s, {span} (told apart by {f['gears_from']})."
        ),
        *wrap_text(
            f"Speed residual: {f['residual_rms']:.2f} {lab['speed']} RMS (largest "
            f"{f['residual_max']:.2f}) calibrated; {f['residual_rms_before']:.2f} "
            f"{lab['speed']} RMS with your figures."
        ),
        "",
        *_figure_lines(doc),
        "",
        *_gear_lines(doc),
        "",
        *_block_lines(doc),
        "",
        *wrap_text("Method: " + CALIBRATION_METHOD),
        *wrap_text("Priors: " + doc["priors"]),
    ]
    return summary_sheet("GEARWORK PASS CALIBRATION", reference, body, fit.notices, units)
