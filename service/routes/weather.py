"""Density altitude, and a time slip carried from one weather to another.

POST /v1/weather-correction.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from core import Notice, air_state, drive_model
from core.air.weather import Weather, predict_slip, weather_air
from core.engine.reference_air import CorrectionStandard
from core.runs.report import QUARTER_MILE_M
from core.units import ISO_SEA_LEVEL_TEMPERATURE_K
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.calculations import RUN_FIELDS
from service.mapping.inputs import build_curve, build_drivetrain, build_tire, core_fields
from service.mapping.shift_plan import notices_out
from service.mapping.vehicle import build_launch, build_vehicle
from service.mapping.weather import (
    WEATHER_LIMITS,
    WEATHER_METHOD,
    air_document,
    slip_document,
    weather_summary,
)
from service.output.cautions import CAUTIONS
from service.schemas.vehicle import VehicleIn
from service.schemas.weather import (
    StripWeatherIn,
    WeatherCorrectionRequest,
    WeatherCorrectionResponse,
)
from service.units import Quantity, UnitSystem, to_si, unit_labels

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["weather"])
FIELDS = {**RUN_FIELDS, "finish_distance_m": "finish_distance", "density_kg_m3": "taken_in"}


def _weather(w: StripWeatherIn, u: UnitSystem) -> Weather:
    return Weather(
        to_si(w.temperature, Quantity.TEMPERATURE, u),
        to_si(w.pressure, Quantity.PRESSURE, u),
        w.relative_humidity / 100.0,
    )


def _vehicle_density(v: VehicleIn, u: UnitSystem) -> float:
    """Density the vehicle's road load was built for, from its `air` block."""
    air = v.air
    t = (
        ISO_SEA_LEVEL_TEMPERATURE_K
        if air.temperature is None
        else to_si(air.temperature, Quantity.TEMPERATURE, u)
    )
    state = air_state(
        t,
        air.relative_humidity / 100.0,
        pressure_pa=None if air.pressure is None else to_si(air.pressure, Quantity.PRESSURE, u),
        altitude_m=None
        if air.pressure is not None
        else to_si(air.altitude or 0.0, Quantity.DISTANCE, u),
    )
    return state.density_kg_m3


@router.post(
    "/weather-correction",
    operation_id="create_weather_correction",
    summary="Density altitude, and a time slip carried from one weather to another",
    response_model=WeatherCorrectionResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_weather_correction(body: WeatherCorrectionRequest, _json: JsonBody) -> Response:
    """Report the air as a strip does (density altitude and its inputs) and, with a car,
    predict a slip taken in one weather for another by re-running the car in both."""
    u, standard = body.units, CorrectionStandard(body.standard)
    taken = _weather(body.taken_in, u)
    slip = predict = None
    notices: list[Notice] = []
    with core_fields({**FIELDS, "temperature_k": "taken_in.temperature"}):
        air = weather_air(taken, standard)
    notices += list(air.notices)
    if body.predict_for is not None and body.engine and body.drivetrain and body.vehicle:
        curve = build_curve(body.engine.curve, u)
        drivetrain = build_drivetrain(body.drivetrain)
        tire = build_tire(body.drivetrain.tire, u)
        vehicle, launch = build_vehicle(body.vehicle, u), build_launch(body.launch, curve, u)
        finish = (
            QUARTER_MILE_M
            if body.finish_distance is None
            else to_si(body.finish_distance, Quantity.DISTANCE, u)
        )
        with core_fields({**FIELDS, "temperature_k": "predict_for.temperature"}):
            model = drive_model(
                curve, drivetrain, tire, vehicle, launch, rev_limit_rpm=body.engine.rev_limit_rpm
            )
            result = predict_slip(
                model,
                _vehicle_density(body.vehicle, u),
                taken,
                _weather(body.predict_for, u),
                standard,
                finish_distance_m=finish,
                measured_et_s=None if body.slip is None else body.slip.et,
                measured_trap_m_s=None
                if body.slip is None
                else to_si(body.slip.trap, Quantity.SPEED, u),
            )
        predict, slip = air_document(result.predict_for, u), slip_document(result, u)
        notices += [n for n in result.predict_for.notices if n not in notices]
    doc = {
        "reference": body.reference,
        "units": unit_labels(u),
        "standard": standard.value,
        "taken_in": air_document(air, u),
        "predict_for": predict,
        "slip": slip,
        "method": WEATHER_METHOD,
        "limits": WEATHER_LIMITS,
        "warnings": notices_out(notices, FIELDS),
        "cautions": list(CAUTIONS),
    }
    return FastJSONResponse({**doc, "summary": weather_summary(doc, body.reference, notices)})
