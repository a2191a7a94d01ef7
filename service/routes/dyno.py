"""Dyno helpers: POST /v1/dyno-correction and POST /v1/torque-curves/import."""

from __future__ import annotations

from typing import Annotated

import numpy as np
from fastapi import APIRouter, Query, Request
from starlette.datastructures import UploadFile as StarletteUpload
from starlette.responses import Response

from core import (
    CorrectionStandard,
    DynoFileError,
    apply_correction,
    correction_factors,
    read_dyno_text,
)
from service.builders import ENGINE_FIELDS, build_curve, core_fields
from service.deps import JsonBody
from service.openapi import PROBLEM_RESPONSES
from service.present import notices_out, rounded
from service.problems import ProblemError
from service.responses import FastJSONResponse
from service.schemas.dyno import (
    DynoCorrectionRequest,
    DynoCorrectionResponse,
    ImportedCurveResponse,
)
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = ["router"]

router = APIRouter(prefix="/v1", tags=["dyno"])
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


async def _uploaded_file(request: Request) -> bytes:
    """The one file of a multipart upload (field ``file``, or the only file sent)."""
    try:
        form = await request.form(max_files=1, max_fields=4)
    except Exception as exc:  # the multipart parser raises several kinds on bad input
        raise ProblemError(422, "The multipart body cannot be read.", field="body") from exc
    files = [v for v in form.values() if isinstance(v, StarletteUpload)]
    if not files:
        raise ProblemError(422, "The multipart body holds no file.", field="file")
    data = await files[0].read()
    await form.close()
    return data


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
                        "properties": {"file": {"type": "string", "format": "binary"}},
                        "required": ["file"],
                    }
                },
            },
        }
    },
)
async def import_torque_curve(
    request: Request,
    units: Annotated[UnitSystem, Query(description="Units of the curve returned.")] = (
        UnitSystem.METRIC
    ),
    rpm_step: Annotated[float | None, Query(ge=1, le=5000)] = None,
    smoothing_rpm: Annotated[float | None, Query(ge=10, le=5000)] = None,
) -> Response:
    """Comma, semicolon or tab separated text with a header naming rpm and torque and/or
    power with units (lbf*ft, N*m, hp, kW, PS); errors name the line and column."""
    kind = request.headers.get("content-type", "").split(";")[0].strip().lower()
    if kind == "multipart/form-data":
        raw = await _uploaded_file(request)
    elif kind in {"text/csv", "text/plain", "text/tab-separated-values", ""}:
        raw = await request.body()
    else:
        raise ProblemError(
            415, "Send the dyno file as text/csv (or text/plain), or as a multipart upload."
        )
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        raise ProblemError(
            422, f"The file is not UTF-8 text (byte {exc.start + 1}).", field="body"
        ) from exc
    try:
        run = read_dyno_text(text, rpm_step=rpm_step, smoothing_window_rpm=smoothing_rpm)
    except DynoFileError as exc:
        where = (
            "body"
            if exc.line is None
            else f"body:line {exc.line}" + ("" if exc.column is None else f", column {exc.column}")
        )
        raise ProblemError(422, exc.message, field=where) from exc
    return FastJSONResponse(
        {
            "units": unit_labels(units),
            "curve": {
                "rpm": rounded(np.asarray(run.rpm), 1),
                "torque": rounded(from_si(np.asarray(run.torque_nm), Quantity.TORQUE, units), 3),
            },
            "columns": {
                "rpm": run.rpm_column.header,
                "torque": run.torque_column.header if run.torque_column else None,
                "power": run.power_column.header if run.power_column else None,
            },
            "delimiter": run.delimiter.value,
            "rows": run.data_rows,
            "warnings": notices_out(run.notices, {}),
        }
    )
