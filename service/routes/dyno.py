"""Dyno helpers: POST /v1/dyno-correction and POST /v1/torque-curves/import."""

from __future__ import annotations

from typing import Annotated

from fastapi import APIRouter, Query, Request
from starlette.responses import Response

from core import (
    CorrectionStandard,
    DynoFileError,
    apply_correction,
    correction_factors,
    read_dyno_text,
)
from core.dyno.road import MAX_OVERALL_RATIO
from service.http.deps import JsonBody
from service.http.openapi import PROBLEM_RESPONSES
from service.http.problems import ProblemError
from service.http.responses import FastJSONResponse
from service.mapping.dyno import (
    GEAR_FIELDS,
    decoded_text,
    dyno_problem,
    imported_document,
    road_speed_gear,
    uploaded_file,
)
from service.mapping.inputs import ENGINE_FIELDS, build_curve, core_fields
from service.mapping.shift_plan import notices_out, rounded
from service.schemas.dyno import (
    DynoCorrectionRequest,
    DynoCorrectionResponse,
    ImportedCurveResponse,
)
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["dyno"])
_RATIO = (
    "Speed-based export only: overall ratio (gear * final drive * extra reduction) of the "
    "gear it was run in; with the tire (one of `tire_size`, `tire_diameter`, "
    "`tire_revs_per_mile`, `tire_revs_per_km`). Also accepted as a multipart field."
)
_TIRE = "Speed-based export only: the driven tire's size, e.g. `245/40R18`."
_DIA = "Speed-based export only: the driven tire's overall diameter [mm | in]."
_REVS = "Speed-based export only: the tire maker's revolutions per mile or per km."
_ROLLING = "Speed-based export only: rolling radius as a fraction of the free radius."
AMBIENT_FIELDS = {
    "temperature_k": "ambient.temperature",
    "relative_humidity": "ambient.relative_humidity",
    "station_pressure_pa": "ambient.station_pressure",
    "altimeter_setting_pa": "ambient.altimeter_setting",
    "elevation_m": "ambient.elevation",
    **{k: v.replace("engine.curve", "curve") for k, v in ENGINE_FIELDS.items()},
}


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
    u, amb, p = body.units, body.ambient, Quantity.PRESSURE
    with core_fields(AMBIENT_FIELDS, u):
        factors = correction_factors(
            to_si(amb.temperature, Quantity.TEMPERATURE, u),
            amb.relative_humidity / 100.0,
            station_pressure_pa=None
            if amb.station_pressure is None
            else to_si(amb.station_pressure, p, u),
            altimeter_setting_pa=None
            if amb.altimeter_setting is None
            else to_si(amb.altimeter_setting, p, u),
            elevation_m=None
            if amb.elevation is None
            else to_si(amb.elevation, Quantity.DISTANCE, u),
        )
        chosen = factors[CorrectionStandard(body.standard)]
        corrected = None
        if body.curve is not None:
            curve = apply_correction(build_curve(body.curve, u), chosen)
            corrected = {
                "rpm": rounded(curve.rpm, 1),
                "source": curve.source.value,
                "interpolation": curve.interpolation.value,
                "torque": rounded(from_si(curve.torque_nm, Quantity.TORQUE, u), 3),
            }
    return FastJSONResponse(
        {
            "reference": body.reference,
            "units": unit_labels(u),
            "station_pressure": round(from_si(chosen.station_pressure_pa, p, u), 4),
            "corrections": [
                {
                    "standard": c.standard.value,
                    "factor": round(c.factor, 5),
                    "within_validity": c.within_validity,
                    "dry_pressure": round(from_si(c.dry_pressure_pa, p, u), 4),
                    "vapour_pressure": round(from_si(c.vapour_pressure_pa, p, u), 4),
                }
                for c in factors.values()
            ],
            "applied": body.standard,
            "corrected_curve": corrected,
            "warnings": notices_out(chosen.notices, AMBIENT_FIELDS),
        }
    )


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
    kind = request.headers.get("content-type", "").split(";")[0].strip().lower()
    form: dict[str, str] = {}
    if kind == "multipart/form-data":
        raw, form = await uploaded_file(request)
    elif kind in {"text/csv", "text/plain", "text/tab-separated-values", ""}:
        raw = await request.body()
    else:
        raise ProblemError(
            415, "Send the dyno file as text/csv (or text/plain), or as a multipart upload."
        )
    text, encoding = decoded_text(raw)
    query = {
        "overall_ratio": overall_ratio,
        "tire_size": tire_size,
        "tire_diameter": tire_diameter,
        "tire_revs_per_mile": tire_revs_per_mile,
        "tire_revs_per_km": tire_revs_per_km,
        "tire_rolling_factor": tire_rolling_factor,
    }
    ratio, radius = road_speed_gear(query, form, units)
    try:
        run = read_dyno_text(
            text,
            rpm_step=rpm_step,
            smoothing_window_rpm=smoothing_rpm,
            overall_ratio=ratio,
            rolling_radius_m=radius,
        )
    except DynoFileError as exc:
        raise dyno_problem(exc) from exc
    return FastJSONResponse(imported_document(run, units, encoding))
