"""The edge of the dyno helpers. POST /v1/dyno-correction: the cell's air to correction
factors and the chosen standard applied to a curve. POST /v1/torque-curves/import: the
upload's bytes and fields, the gear of a speed-based export, dyno-file errors as problems
naming the line and column. Both answers as response documents in the caller's units."""

from __future__ import annotations

from collections.abc import Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np
from pydantic import ValidationError
from starlette.datastructures import UploadFile
from starlette.requests import Request

from core import (
    Correction,
    CorrectionStandard,
    TorqueCurve,
    apply_correction,
    correction_factors,
    read_dyno_text,
)
from core.dyno.file import DynoRun
from core.errors import DynoFileError
from core.readers.encoding import decode_export
from service.bounds import bound_violations
from service.http.problems import ProblemError, field_path
from service.mapping.documents import notices_out, rounded
from service.mapping.inputs import (
    ENGINE_FIELDS,
    build_curve,
    build_tire,
    core_fields,
    renamed_fields,
)
from service.schemas.common import ApiModel
from service.schemas.dyno import DynoCorrectionRequest
from service.schemas.inputs import TireIn
from service.units import Quantity, UnitSystem, from_si, to_si, unit_labels

__all__ = [
    "AMBIENT_FIELDS",
    "GEAR_FIELDS",
    "AirCorrection",
    "GearFields",
    "correct_to_standard_air",
    "decoded_text",
    "dyno_correction_document",
    "dyno_problem",
    "imported_document",
    "read_upload",
    "road_speed_gear",
    "uploaded_body",
    "uploaded_file",
]

AMBIENT_FIELDS: Mapping[str, str] = {
    "temperature_k": "ambient.temperature",
    "relative_humidity": "ambient.relative_humidity",
    "station_pressure_pa": "ambient.station_pressure",
    "altimeter_setting_pa": "ambient.altimeter_setting",
    "elevation_m": "ambient.elevation",
    **{k: v.replace("engine.curve", "curve") for k, v in ENGINE_FIELDS.items()},
}

# the speed-based export's gear, as query parameters or multipart fields
GEAR_FIELDS = (
    "overall_ratio",
    "tire_size",
    "tire_diameter",
    "tire_revs_per_mile",
    "tire_revs_per_km",
    "tire_rolling_factor",
)
_TIRE_NAMES = {f"drivetrain.tire.{name[5:]}": name for name in GEAR_FIELDS[1:]}
_TIRE_ONE_OF = (
    "the tire (`tire_size`, `tire_diameter`, `tire_revs_per_mile` or `tire_revs_per_km`)"
)


@dataclass(frozen=True)
class AirCorrection:
    """Every standard's correction for the cell's air, the one chosen, and the curve
    corrected by it (None without a curve)."""

    factors: Mapping[CorrectionStandard, Correction]
    chosen: Correction
    curve: TorqueCurve | None


def correct_to_standard_air(body: DynoCorrectionRequest) -> AirCorrection:
    """What POST /v1/dyno-correction computes (core errors become 422 problems)."""
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
        curve = None
        if body.curve is not None:
            curve = apply_correction(build_curve(body.curve, u), chosen)
    return AirCorrection(factors, chosen, curve)


def dyno_correction_document(body: DynoCorrectionRequest, air: AirCorrection) -> dict[str, Any]:
    """The response body of a dyno correction, in the caller's units."""
    u, p, curve = body.units, Quantity.PRESSURE, air.curve
    corrected = None
    if curve is not None:
        corrected = {
            "rpm": rounded(curve.rpm, 1),
            "source": curve.source.value,
            "interpolation": curve.interpolation.value,
            "torque": rounded(from_si(curve.torque_nm, Quantity.TORQUE, u), 3),
        }
    return {
        "reference": body.reference,
        "units": unit_labels(u),
        "station_pressure": round(from_si(air.chosen.station_pressure_pa, p, u), 4),
        "corrections": [
            {
                "standard": c.standard.value,
                "factor": round(c.factor, 5),
                "within_validity": c.within_validity,
                "dry_pressure": round(from_si(c.dry_pressure_pa, p, u), 4),
                "vapour_pressure": round(from_si(c.vapour_pressure_pa, p, u), 4),
            }
            for c in air.factors.values()
        ],
        "applied": body.standard,
        "corrected_curve": corrected,
        "warnings": notices_out(air.chosen.notices, AMBIENT_FIELDS, u),
    }


class GearFields(ApiModel):
    """The gear a speed-based export was run in, as sent (all optional). The ratio's range
    is checked by core (``core.dyno.road``), the tire's by the tire schema (``TireIn``)."""

    overall_ratio: float | None = None
    tire_size: str | None = None
    tire_diameter: float | None = None
    tire_revs_per_mile: float | None = None
    tire_revs_per_km: float | None = None
    tire_rolling_factor: float | None = None


async def uploaded_file(request: Request) -> tuple[bytes, dict[str, str]]:
    """The one file of a multipart upload (field ``file``, or the only file sent), and the
    upload's text fields."""
    try:
        form = await request.form(max_files=1, max_fields=len(GEAR_FIELDS) + 2)
    except Exception as exc:  # the multipart parser raises several kinds on bad input
        raise ProblemError(422, "The multipart body cannot be read.", field="body") from exc
    files = [v for v in form.values() if isinstance(v, UploadFile)]
    fields = {k: v for k, v in form.items() if isinstance(v, str)}
    if not files:
        raise ProblemError(422, "The multipart body holds no file.", field="file")
    data = await files[0].read()
    await form.close()
    return data, fields


async def uploaded_body(request: Request) -> tuple[bytes, dict[str, str]]:
    """The dyno file's bytes, as text or a multipart upload, and the upload's text fields
    (none for a text body); 415 for any other content type."""
    kind = request.headers.get("content-type", "").split(";")[0].strip().lower()
    if kind == "multipart/form-data":
        return await uploaded_file(request)
    if kind in {"text/csv", "text/plain", "text/tab-separated-values", ""}:
        return await request.body(), {}
    raise ProblemError(
        415, "Send the dyno file as text/csv (or text/plain), or as a multipart upload."
    )


def read_upload(
    text: str,
    rpm_step: float | None,
    smoothing_rpm: float | None,
    gear: tuple[float | None, float | None],
) -> DynoRun:
    """The dyno file's text read into a curve; ``gear`` is a speed-based export's overall
    ratio and rolling radius [m]. Errors name the line and column."""
    try:
        return read_dyno_text(
            text,
            rpm_step=rpm_step,
            smoothing_window_rpm=smoothing_rpm,
            overall_ratio=gear[0],
            rolling_radius_m=gear[1],
        )
    except DynoFileError as exc:
        raise dyno_problem(exc) from exc


def decoded_text(raw: bytes) -> tuple[str, str]:
    """The upload's text and its encoding (UTF-8, UTF-16, with or without a mark)."""
    try:
        decoded = decode_export(raw)
    except DynoFileError as exc:
        raise ProblemError(422, exc.message.replace("`text`", "The file"), field="body") from exc
    return decoded.text, decoded.encoding


def road_speed_gear(
    query: Mapping[str, object], form: Mapping[str, str], units: UnitSystem
) -> tuple[float | None, float | None]:
    """Overall ratio and rolling radius [m] from the query and multipart fields, or None.

    A name given both in the query and as a multipart field is an error; so is a tire
    without a ratio or the other way round (core names it).
    """
    given: dict[str, object] = {k: v for k, v in query.items() if v is not None}
    for name in GEAR_FIELDS:
        if name in form:
            if name in given:
                raise ProblemError(
                    422, f"`{name}` is given both in the query and as a field", field=name
                )
            given[name] = form[name]
    try:
        gear = GearFields.model_validate(given)
    except ValidationError as exc:
        first = exc.errors()[0]
        raise ProblemError(422, first["msg"], field=field_path(first["loc"])) from exc
    tire_given = {
        name[5:]: getattr(gear, name)
        for name in GEAR_FIELDS[1:]
        if getattr(gear, name) is not None
    }
    if not tire_given:
        return gear.overall_ratio, None
    if tire_given.keys() == {"rolling_factor"}:
        raise ProblemError(422, f"`tire_rolling_factor` goes with {_TIRE_ONE_OF}", field="tire")
    try:
        tire_in = TireIn.model_validate(tire_given)
    except ValidationError as exc:
        first = exc.errors()[0]
        if first["loc"]:
            name = f"tire_{first['loc'][0]}"
            raise ProblemError(422, f"`{name}`: {first['msg']}", field=name) from exc
        message = f"give exactly one of {_TIRE_ONE_OF.removeprefix('the tire ')}"
        raise ProblemError(422, message, field="tire") from exc
    limits = bound_violations(tire_in, units)  # the diameter's limit, in the caller's units
    if limits:
        name = "tire_" + limits[0]["field"]
        message = limits[0]["message"].replace(f"`{limits[0]['field']}`", f"`{name}`", 1)
        raise ProblemError(422, message, field=name)
    with renamed_fields(_TIRE_NAMES):
        tire = build_tire(tire_in, units)
    return gear.overall_ratio, tire.rolling_radius_m


def dyno_problem(exc: DynoFileError) -> ProblemError:
    """A dyno-file error as a 422 problem naming the line and column (or the option)."""
    options = {
        "rpm_step": "rpm_step",
        "smoothing_window_rpm": "smoothing_rpm",
        "smoothing_order": "smoothing_rpm",
        "overall_ratio": "overall_ratio",
        "rolling_radius_m": "tire",
    }
    message = exc.message.replace("`rolling_radius_m`", _TIRE_ONE_OF)
    message = message.replace("`smoothing_window_rpm`", "`smoothing_rpm`")
    if exc.parameter in options:
        return ProblemError(422, message, field=options[exc.parameter])
    where = "body" if exc.line is None else f"body:line {exc.line}"
    if exc.line is not None and exc.column is not None:
        where += f", column {exc.column}"
    return ProblemError(422, message, field=where)


def imported_document(run: DynoRun, units: UnitSystem, encoding: str) -> dict[str, Any]:
    """The response body of an import, in the caller's units."""
    speed_based = run.road_speed is not None
    conversion = None
    if run.road_speed is not None:
        per_speed = run.road_speed.rpm_per_m_s / from_si(1.0, Quantity.SPEED, units)
        conversion = {
            "overall_ratio": run.road_speed.overall_ratio,
            "rolling_radius": round(
                from_si(run.road_speed.rolling_radius_m, Quantity.LENGTH, units), 2
            ),
            "rpm_per_speed": round(per_speed, 4),
        }
    columns = {
        "road_speed" if speed_based else "rpm": run.rpm_column.header,
        "torque": run.torque_column.header if run.torque_column else None,
        "power": run.power_column.header if run.power_column else None,
    }
    if run.force_column is not None:
        columns["force"] = run.force_column.header
    fields = {"overall_ratio": "overall_ratio"}
    return {
        "units": unit_labels(units),
        "curve": {
            "rpm": rounded(np.asarray(run.rpm), 1),
            "torque": rounded(from_si(np.asarray(run.torque_nm), Quantity.TORQUE, units), 3),
            "source": run.source.value,
        },
        "columns": columns,
        "delimiter": run.delimiter.value,
        "encoding": encoding,
        "rows": run.data_rows,
        "road_speed_conversion": conversion,
        "warnings": notices_out(run.notices, fields, units),
    }
