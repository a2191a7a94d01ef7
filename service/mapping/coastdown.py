"""Coast-down requests to core runs in SI, the fit, and the fit to its response document
and an 80-column printable summary."""

from __future__ import annotations

from collections.abc import Mapping
from typing import Any

import numpy as np

from core.car.coast_down import (
    CoastDownFit,
    CoastDownRun,
    TravelDirection,
    fit_coast_down,
)
from core.car.coast_down_reference import REFERENCE_PRESSURE_PA, REFERENCE_TEMPERATURE_K
from service.mapping.documents import notices_out
from service.mapping.inputs import core_fields
from service.output.cautions import CAUTIONS
from service.output.sheets import summary_sheet, wrap_text
from service.schemas.coastdown import CoastDownRequest
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "COAST_DOWN_FIELDS",
    "COAST_DOWN_METHOD",
    "coast_down_document",
    "coast_down_summary",
    "fit_coast_downs",
    "reference_method",
]

COAST_DOWN_FIELDS: Mapping[str, str] = {
    "mass_kg": "mass",
    "equivalent_mass_kg": "equivalent_mass",
    "runs": "runs",
    "temperature_k": "conditions.temperature",
    "pressure_pa": "conditions.pressure",
}

COAST_DOWN_METHOD = (
    "Each run is fitted by integrating m_e dv/dt = -(F0 + F1 v + F2 v^2) from a fitted "
    "start speed and matching the logged speed (least squares; speed is never "
    "differentiated); runs in each direction are averaged, then the two directions (SAE "
    "J2263 in outline). Intervals: 95 %, from each run's Jacobian."
)


def reference_method(units: UnitSystem) -> str:
    """The reference correction in words, its temperatures and pressure in the caller's units.

    >>> reference_method(UnitSystem.US)[:80]
    'SAE J1263 in outline: F2 x rho_ref/rho_test; F0 and F1 x (1 + 0.0048/degF x (T -'
    """
    temp = unit_labels(units)["temperature"]
    t_ref = from_si(REFERENCE_TEMPERATURE_K, Quantity.TEMPERATURE, units)
    one_kelvin = from_si(REFERENCE_TEMPERATURE_K + 1.0, Quantity.TEMPERATURE, units) - t_ref
    per_degree = 0.00864 / one_kelvin
    p_ref = from_si(REFERENCE_PRESSURE_PA, Quantity.PRESSURE, units)
    per = "K" if units is UnitSystem.METRIC else temp
    return (
        f"SAE J1263 in outline: F2 x rho_ref/rho_test; F0 and F1 x (1 + {per_degree:.3g}/{per} "
        f"x (T - {t_ref:.0f} {temp})); reference {t_ref:.0f} {temp}, {p_ref:.2f} "
        f"{unit_labels(units)['pressure']}, dry air (values from memory). No wind or grade "
        "correction beyond the paired runs."
    )


def fit_coast_downs(body: CoastDownRequest) -> CoastDownFit:
    """What POST /v1/road-load/coast-down computes (core errors become 422 problems)."""
    u, c = body.units, body.conditions
    runs = [
        CoastDownRun(
            np.asarray(r.time, np.float64),
            to_si(np.asarray(r.speed, np.float64), Quantity.SPEED, u),
            TravelDirection(r.direction),
        )
        for r in body.runs
    ]
    with core_fields(COAST_DOWN_FIELDS, u):
        return fit_coast_down(
            runs,
            to_si(body.mass, Quantity.MASS, u),
            None
            if body.equivalent_mass is None
            else to_si(body.equivalent_mass, Quantity.MASS, u),
            temperature_k=None if c is None else to_si(c.temperature, Quantity.TEMPERATURE, u),
            pressure_pa=None if c is None else to_si(c.pressure, Quantity.PRESSURE, u),
            relative_humidity=0.0 if c is None else c.relative_humidity / 100.0,
        )


def _scales(units: UnitSystem) -> tuple[float, float, float]:
    """Caller's units per SI unit of F0, F1, F2."""
    force = from_si(1.0, Quantity.FORCE, units)
    per_speed = 1.0 / from_si(1.0, Quantity.SPEED, units)
    return force, force * per_speed, force * per_speed**2


def coefficient_units(units: UnitSystem) -> list[str]:
    """Unit labels of F0, F1, F2 in the caller's system."""
    lab = unit_labels(units)
    f, v = lab["force"], lab["speed"]
    return [
        f,
        f"{f}/({v})" if "/" in v else f"{f}/{v}",
        f"{f}/({v})^2" if "/" in v else f"{f}/{v}^2",
    ]


def coast_down_document(
    fit: CoastDownFit, units: UnitSystem, fields: Mapping[str, str]
) -> dict[str, Any]:
    """The body of a coast-down response, without reference and summary."""
    sc = _scales(units)
    speed = Quantity.SPEED

    def coeffs(values: Any, digits: int = 6) -> list[float]:
        return [round(float(x) * s, digits) for x, s in zip(values, sc, strict=True)]

    names = ("f0", "f1", "f2")
    ref = fit.reference
    at_ref = coeffs(ref.coefficients)
    return {
        "units": unit_labels(units),
        "coefficient_units": coefficient_units(units),
        **{
            name: {
                "value": round(float(fit.coefficients[j]) * sc[j], 6),
                "low": round(float(fit.low[j]) * sc[j], 6),
                "high": round(float(fit.high[j]) * sc[j], 6),
            }
            for j, name in enumerate(names)
        },
        "equivalent_mass": round(from_si(fit.equivalent_mass_kg, Quantity.MASS, units), 3),
        "residual_rms": round(from_si(fit.residual_rms_m_s, speed, units), 4),
        "residual_max": round(from_si(fit.residual_max_m_s, speed, units), 4),
        "runs": [
            {
                "direction": r.direction.value,
                "samples": r.samples,
                "duration": round(r.duration_s, 3),
                "start_speed": round(from_si(r.start_speed_m_s, speed, units), 3),
                "end_speed": round(from_si(r.end_speed_m_s, speed, units), 3),
                "coast_down": coeffs(r.coefficients),
                "residual_rms": round(from_si(r.residual_rms_m_s, speed, units), 4),
            }
            for r in fit.runs
        ],
        "reference_conditions": {
            "applied": ref.applied,
            "temperature": round(from_si(REFERENCE_TEMPERATURE_K, Quantity.TEMPERATURE, units), 2),
            "pressure": round(from_si(REFERENCE_PRESSURE_PA, Quantity.PRESSURE, units), 3),
            "air_density_ratio": round(ref.test_density_kg_m3 / ref.reference_density_kg_m3, 6),
            "rolling_factor": round(ref.rolling_factor, 6),
            "coast_down": at_ref,
            "method": reference_method(units),
        },
        "drag_area": round(from_si(fit.drag_area_m2, Quantity.AREA, units), 4),
        "rolling_coefficient": round(fit.rolling_coefficient, 6),
        "road_load": {"coast_down": at_ref},
        "method": COAST_DOWN_METHOD,
        "warnings": notices_out(fit.notices, fields, units),
        "cautions": list(CAUTIONS),
    }


def coast_down_summary(
    doc: Mapping[str, Any], fit: CoastDownFit, units: UnitSystem, reference: str | None
) -> str:
    """The fit as a short printable sheet: 80 columns, printable ASCII."""
    cu = doc["coefficient_units"]
    lab = doc["units"]
    body = [
        f"Runs: {len(fit.runs)}   equivalent mass {doc['equivalent_mass']:,.0f} {lab['mass']}"
        f"   residual {doc['residual_rms']:.2f} {lab['speed']} RMS",
        "",
        "Term        fitted          95 % interval         at reference  unit",
    ]
    ref = doc["reference_conditions"]["coast_down"]
    for j, name in enumerate(("F0", "F1", "F2")):
        c = doc[f"f{j}"]
        body.append(
            f"{name:<4}  {c['value']:>12.5g}  {c['low']:>12.5g} to {c['high']:<12.5g}"
            f"  {ref[j]:>12.5g}  {cu[j]}"
        )
    body += [
        "",
        f"Drag area {doc['drag_area']:.3f} {lab['area']}   rolling coefficient "
        f"{doc['rolling_coefficient']:.4f}",
        *wrap_text("Road-load block: coast_down [" + ", ".join(f"{x:.5g}" for x in ref) + "]"),
        "",
        *wrap_text("Method: " + COAST_DOWN_METHOD),
    ]
    if not doc["reference_conditions"]["applied"]:
        body += wrap_text("No test weather given: coefficients are as measured.")
    return summary_sheet("GEARWORK COAST-DOWN ROAD LOAD", reference, body, fit.notices, units)
