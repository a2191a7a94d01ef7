"""Weather-correction requests to core weathers (and, with a car, a drive model) in SI,
the air and the carried slip computed, and both to their response document and an
80-column summary."""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from typing import Any

from core import Notice, drive_model
from core.air.weather import SlipPrediction, Weather, WeatherAir, predict_slip, weather_air
from core.engine.reference_air import CorrectionStandard
from core.runs.report import QUARTER_MILE_M
from service.mapping.acceleration import RUN_FIELDS
from service.mapping.documents import notices_out
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.vehicle import air_density, build_launch, build_vehicle
from service.output.cautions import CAUTIONS
from service.output.sheets import summary_sheet, wrap_text
from service.schemas.weather import StripWeatherIn, WeatherCorrectionRequest
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "WEATHER_FIELDS",
    "WEATHER_LIMITS",
    "WEATHER_METHOD",
    "WeatherStudy",
    "air_document",
    "slip_document",
    "study_weather",
    "weather_document",
    "weather_summary",
]

WEATHER_FIELDS: Mapping[str, str] = {
    **RUN_FIELDS,
    "finish_distance_m": "finish_distance",
    "density_kg_m3": "taken_in",
}

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


@dataclass(frozen=True)
class WeatherStudy:
    """The air a slip was taken in, the slip carried to the other weather (None without a
    car or a second weather), and the notices of both."""

    standard: CorrectionStandard
    taken_in: WeatherAir
    prediction: SlipPrediction | None
    notices: tuple[Notice, ...]


def _weather(w: StripWeatherIn, u: UnitSystem) -> Weather:
    return Weather(
        to_si(w.temperature, Quantity.TEMPERATURE, u),
        to_si(w.pressure, Quantity.PRESSURE, u),
        w.relative_humidity / 100.0,
    )


def _carried_slip(
    body: WeatherCorrectionRequest, taken: Weather, standard: CorrectionStandard
) -> SlipPrediction | None:
    """The slip carried to ``predict_for`` by re-running the car in both weathers."""
    if body.predict_for is None or not (body.engine and body.drivetrain and body.vehicle):
        return None
    u = body.units
    curve = build_curve(body.engine.curve, u)
    drivetrain = build_drivetrain(body.drivetrain)
    tire = build_tire(body.drivetrain.tire, u)
    vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
    finish = (
        QUARTER_MILE_M
        if body.finish_distance is None
        else to_si(body.finish_distance, Quantity.DISTANCE, u)
    )
    with core_fields({**WEATHER_FIELDS, "temperature_k": "predict_for.temperature"}, u):
        model = drive_model(
            curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
        )
        return predict_slip(
            model,
            air_density(body.vehicle.air, u),
            taken,
            _weather(body.predict_for, u),
            standard,
            finish_distance_m=finish,
            measured_et_s=None if body.slip is None else body.slip.et,
            measured_trap_m_s=None
            if body.slip is None
            else to_si(body.slip.trap, Quantity.SPEED, u),
        )


def study_weather(body: WeatherCorrectionRequest) -> WeatherStudy:
    """What POST /v1/weather-correction computes (core errors become 422 problems)."""
    standard = CorrectionStandard(body.standard)
    taken = _weather(body.taken_in, body.units)
    with core_fields({**WEATHER_FIELDS, "temperature_k": "taken_in.temperature"}, body.units):
        air = weather_air(taken, standard)
    notices = list(air.notices)
    prediction = _carried_slip(body, taken, standard)
    if prediction is not None:
        notices += [n for n in prediction.predict_for.notices if n not in notices]
    return WeatherStudy(standard, air, prediction, tuple(notices))


def weather_document(body: WeatherCorrectionRequest, study: WeatherStudy) -> dict[str, Any]:
    """The body of a weather-correction response, without its summary."""
    u, p = body.units, study.prediction
    return {
        "reference": body.reference,
        "units": unit_labels(u),
        "standard": study.standard.value,
        "taken_in": air_document(study.taken_in, u),
        "predict_for": None if p is None else air_document(p.predict_for, u),
        "slip": None if p is None else slip_document(p, u),
        "method": WEATHER_METHOD,
        "limits": WEATHER_LIMITS,
        "warnings": notices_out(study.notices, WEATHER_FIELDS, u),
        "cautions": list(CAUTIONS),
    }


def air_document(air: WeatherAir, units: UnitSystem) -> dict[str, Any]:
    """One weather as the strip reports it, in the caller's units."""
    w = air.weather
    return {
        "temperature": round(from_si(w.temperature_k, Quantity.TEMPERATURE, units), 2),
        "pressure": round(from_si(w.pressure_pa, Quantity.PRESSURE, units), 3),
        "relative_humidity": round(100.0 * w.relative_humidity, 2),
        "density": round(from_si(air.density_kg_m3, Quantity.DENSITY, units), 6),
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
    doc: Mapping[str, Any],
    units: UnitSystem,
    reference: str | None,
    notices: Sequence[Notice] = (),
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
    return summary_sheet("GEARWORK WEATHER CORRECTION", reference, body, notices, units)
