"""Density altitude, and a time slip carried from one weather to another.

POST /v1/weather-correction.
"""

from __future__ import annotations

from fastapi import APIRouter
from starlette.responses import Response

from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.weather import study_weather, weather_document, weather_summary
from service.schemas.weather import WeatherCorrectionRequest, WeatherCorrectionResponse

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["weather"], route_class=JsonBodyRoute)


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
    study = study_weather(body)
    doc = weather_document(body, study)
    summary = weather_summary(doc, body.units, body.reference, study.notices)
    return FastJSONResponse({**doc, "summary": summary})
