"""Dyno helpers: POST /v1/dyno-correction and POST /v1/torque-curves/import."""

from __future__ import annotations

from typing import Annotated

from fastapi import APIRouter, Query, Request
from starlette.responses import Response

from core.dyno.road import MAX_OVERALL_RATIO
from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute
from service.http.openapi import PROBLEM_RESPONSES
from service.http.responses import FastJSONResponse
from service.mapping.dyno import (
    GEAR_FIELDS,
    correct_to_standard_air,
    decoded_text,
    dyno_correction_document,
    imported_document,
    read_upload,
    road_speed_gear,
    uploaded_body,
)
from service.schemas.dyno import (
    DynoCorrectionRequest,
    DynoCorrectionResponse,
    ImportedCurveResponse,
)
from service.units import UnitSystem

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["dyno"], route_class=JsonBodyRoute)
_RATIO = (
    "Speed-based export only: overall ratio (gear * final drive * extra reduction) of the "
    "gear it was run in; with the tire (one of `tire_size`, `tire_diameter`, "
    "`tire_revs_per_mile`, `tire_revs_per_km`). Also accepted as a multipart field."
)
_TIRE = "Speed-based export only: the driven tire's size, e.g. `245/40R18`."
_DIA = "Speed-based export only: the driven tire's overall diameter [mm | in]."
_REVS = "Speed-based export only: the tire maker's revolutions per mile or per km."
_ROLLING = "Speed-based export only: rolling radius as a fraction of the free radius."


@router.post(
    "/dyno-correction",
    operation_id="create_dyno_correction",
    summary="Dyno correction factors to standard air",
    response_model=DynoCorrectionResponse,
    responses=PROBLEM_RESPONSES,
)
async def create_dyno_correction(body: DynoCorrectionRequest, _json: JsonBody) -> Response:
    """Correction factors under SAE J1349 (1990 and 2004), SAE J607, DIN 70020 and ISO 1585
    for the cell's air, and the chosen standard applied to a curve if one is sent."""
    air = correct_to_standard_air(body)
    return FastJSONResponse(dyno_correction_document(body, air))


@router.post(
    "/torque-curves/import",
    operation_id="import_torque_curve",
    summary="Read a delimited dyno export into a curve",
    response_model=ImportedCurveResponse,
    responses=PROBLEM_RESPONSES,
    openapi_extra={
        "requestBody": {
            "required": True,
            "content": {
                "text/csv": {"schema": {"type": "string", "maxLength": 262144}},
                "multipart/form-data": {
                    "schema": {
                        "type": "object",
                        "properties": {
                            "file": {"type": "string", "format": "binary"},
                            **{name: {"type": "string"} for name in GEAR_FIELDS},
                        },
                        "required": ["file"],
                    }
                },
            },
        }
    },
)
async def import_torque_curve(
    request: Request,
    units: Annotated[
        UnitSystem,
        Query(description="Units of the curve returned and of `tire_diameter`."),
    ] = UnitSystem.METRIC,
    rpm_step: Annotated[float | None, Query(ge=1, le=5000)] = None,
    smoothing_rpm: Annotated[float | None, Query(ge=10, le=5000)] = None,
    overall_ratio: Annotated[
        float | None, Query(gt=0, le=MAX_OVERALL_RATIO, description=_RATIO)
    ] = None,
    tire_size: Annotated[str | None, Query(description=_TIRE)] = None,
    tire_diameter: Annotated[float | None, Query(description=_DIA)] = None,
    tire_revs_per_mile: Annotated[float | None, Query(description=_REVS)] = None,
    tire_revs_per_km: Annotated[float | None, Query(description=_REVS)] = None,
    tire_rolling_factor: Annotated[float | None, Query(description=_ROLLING)] = None,
) -> Response:
    """Comma, semicolon or tab separated text (UTF-8 or UTF-16, with or without a byte-order
    mark, or Windows-1252) with a header naming rpm and torque and/or power with units
    (lbf*ft, N*m, hp, kW, PS); wheel columns (WHP, wheel torque, RWHP ...) give a chassis
    curve; summary rows and blank cells are skipped with a warning; a speed-based export
    (road speed with power or tractive force) needs `overall_ratio` and the tire, as query
    parameters or multipart fields. Errors name the line and column."""
    raw, form = await uploaded_body(request)
    text, encoding = decoded_text(raw)
    query = {
        "overall_ratio": overall_ratio,
        "tire_size": tire_size,
        "tire_diameter": tire_diameter,
        "tire_revs_per_mile": tire_revs_per_mile,
        "tire_revs_per_km": tire_revs_per_km,
        "tire_rolling_factor": tire_rolling_factor,
    }
    gear = road_speed_gear(query, form, units)
    run = read_upload(text, rpm_step, smoothing_rpm, gear)
    return FastJSONResponse(imported_document(run, units, encoding))
