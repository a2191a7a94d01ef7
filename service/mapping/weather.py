"""Strip weather and a carried slip to their response document and an 80-column summary."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from typing import Any

from core import Notice
from core.air.weather import SlipPrediction, WeatherAir
from service.output.sheets import summary_sheet, wrap_text
from service.units import Quantity, UnitSystem, from_si

__all__ = ["WEATHER_LIMITS", "WEATHER_METHOD", "air_document", "slip_document", "weather_summary"]

WEATHER_METHOD = (
    "Density altitude: the ISO 2533 standard-atmosphere altitude of the same moist-air "
    "density (geometric). Slip: the car is re-run in both weathers with engine power = "
    "curve / CF (CF the chosen dyno standard's correction factor; the curve is taken at "
    "the standard's reference air) and the aerodynamic road-load term scaled by air "
    "density; the predicted ET is the slip's plus the simulated change, the trap speed "
    "the slip's times the simulated ratio."
)
WEATHER_LIMITS = (
    "Grip, track preparation, wind, fuel and intake temperature are taken as unchanged; "
    "the dyno standard's factor is a rating convention, not a model of this engine "
    "(turbocharged and supercharged engines respond differently); shifts follow the "
    "net-acceleration plan in each weather."
)


def air_document(air: WeatherAir, units: UnitSystem) -> dict[str, Any]:
    """One weather as the strip reports it, in the caller's units."""
    w = air.weather
    return {
        "temperature": round(from_si(w.temperature_k, Quantity.TEMPERATURE, units), 2),
        "pressure": round(from_si(w.pressure_pa, Quantity.PRESSURE, units), 3),
        "relative_humidity": round(100.0 * w.relative_humidity, 2),
        "density": round(air.density_kg_m3, 5),
        "density_altitude": round(from_si(air.density_altitude_m, Quantity.DISTANCE, units), 1),
        "relative_density": round(100.0 * air.relative_density, 2),
        "correction_factor": round(air.correction_factor, 5),
    }


def slip_document(p: SlipPrediction, units: UnitSystem) -> dict[str, Any]:
    """The carried slip, in the caller's units."""
    v = Quantity.SPEED

    def speed(x: float) -> float:
        return round(from_si(x, v, units), 2)

    et_a = p.predicted_et_s - (p.simulated_et_s[1] - p.simulated_et_s[0])
    trap_a = p.predicted_trap_m_s * p.simulated_trap_m_s[0] / p.simulated_trap_m_s[1]
    return {
        "et": round(et_a, 3),
        "trap": speed(trap_a),
        "simulated_et": [round(x, 3) for x in p.simulated_et_s],
        "simulated_trap": [speed(x) for x in p.simulated_trap_m_s],
        "predicted_et": round(p.predicted_et_s, 3),
        "predicted_trap": speed(p.predicted_trap_m_s),
    }


def weather_summary(
    doc: Mapping[str, Any], reference: str | None, notices: Sequence[Notice] = ()
) -> str:
    """Weather and slip as a short printable sheet: 80 columns, printable ASCII."""
    lab = doc["units"]
    t, pr, d, sp = lab["temperature"], lab["pressure"], lab["distance"], lab["speed"]
    body = [
        f"Standard: {doc['standard']}",
        "",
        "Weather           Temp        Pressure  RH %  Density altitude      CF",
    ]
    for name in ("taken_in", "predict_for"):
        a = doc[name]
        if a is None:
            continue
        body.append(
            f"{name.replace('_', ' '):<12}  {a['temperature']:>6.1f} {t:<5}"
            f"{a['pressure']:>8.2f} {pr:<5} {a['relative_humidity']:>4.0f}  "
            f"{a['density_altitude']:>12,.0f} {d:<3} {a['correction_factor']:>9.4f}"
        )
    s = doc["slip"]
    if s is not None:
        body += [
            "",
            f"Slip taken:     ET {s['et']:.3f} s   trap {s['trap']:.2f} {sp}",
            f"Predicted:      ET {s['predicted_et']:.3f} s   trap {s['predicted_trap']:.2f} {sp}",
        ]
    body += ["", *wrap_text("Method: " + WEATHER_METHOD), *wrap_text("Limits: " + WEATHER_LIMITS)]
    return summary_sheet("GEARWORK WEATHER CORRECTION", reference, body, notices)
