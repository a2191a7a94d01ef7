"""Descriptions for schema properties that carry none of their own.

A property that holds another model takes that model's description; a recurring field
(`from_gear`, `reference`, `warnings`, ...) takes one wording from :data:`COMMON`, so every
property of the OpenAPI document says what it is and in which unit.
"""

from __future__ import annotations

from typing import Any

__all__ = ["COMMON", "describe_properties"]

COMMON: dict[str, str] = {
    "reference": "The caller's reference (e.g. a work-order id), echoed; null if none.",
    "units": "The unit of every quantity in this response.",
    "warnings": "Warnings about the inputs or the result, each one plain sentence.",
    "cautions": "Safety cautions that go with advice on rpm, speed or acceleration.",
    "summary": "Plain-text summary in the caller's units, at most 80 columns, printable.",
    "from_gear": "Gear left, 1 for first [-].",
    "to_gear": "Gear entered, 1 for first [-].",
    "gear": "Gear number, 1 for first [-].",
    "rpm_before": "Engine speed as the shift begins [rpm].",
    "rpm_after": "Engine speed right after the shift [rpm].",
    "shift_criterion": "How the shift points were chosen.",
    "limited_by": "What sets top speed: `drag` (road load) or `rev_limit` (top gear's reach).",
    "name": "Label in the caller's units (e.g. `1/4 mile`, `100 ft`, `50-70 mph`).",
    "final_drive_ratio": "Final drive (axle) ratio [-].",
    "gear_ratios": "Forward gear ratios, first gear first [-].",
    "revs_per_mile": "Tire revolutions per mile [1/mi].",
    "revs_per_km": "Tire revolutions per kilometre [1/km].",
    "reason": "Why the shift is there: `crossover`, `rev_limit` or `drag_limit`.",
    "source": "Where the curve was measured: `engine` (crank) or `chassis` (wheels).",
    "standard": "The correction standard.",
    "applied": "The standard whose factor was applied to the curve.",
    "efficiency": "Driveline efficiency [-].",
    "measured_at": "Where the curve was measured: `wheels` or `engine`.",
    "measured_gear": "Gear the curve was measured in, 1 for first; null if one efficiency.",
    "objective": "What the candidates are ranked by.",
    "meets_constraints": "Whether this candidate keeps every constraint.",
    "code": "Stable identifier of the reason.",
    "delimiter": "Cell separator found in the file.",
    "drive": "Where the speedometer takes its signal.",
    "reads": "Whether the instrument now reads `high`, `low` or `true`.",
    "indicated": "Reading of the instrument [km/h | mph, or the odometer's km | mi].",
    "true": "True value, in the same unit as `indicated`.",
    "original_teeth": "Teeth of the driven gear the instrument was calibrated with [-].",
    "exact_teeth": "Teeth that would read exactly true [-].",
    "nearest_teeth": "The nearest whole number of teeth [-].",
    "samples": "Samples in this stretch [-].",
    "verdict": "`early`, `late`, `about_right` or `undetermined`.",
    "basis": "What the verdict is measured against.",
    "gears_from": "Whether gears were found from logged rpm or from acceleration steps.",
    "model_criterion": "Criterion of the model's shift rpm, with `engine`; else null.",
    "rev_limit_rpm": "Rev limit used [rpm]; null if none was given.",
    "tolerance_percent": "Half-width of the `about_right` band used [%].",
    "shift_rpm": "Engine speed at each shift, first gear first [rpm].",
    "objective_value": "Value of the objective at the optimum [s, rpm, or km/h | mph].",
    "coupling": "How the drive is taken up: `clutch` or `converter`.",
}


def _ref_description(prop: dict[str, Any], schemas: dict[str, Any]) -> str | None:
    """The description of the model a property holds (directly, nullable, or in a list)."""
    for candidate in (prop, prop.get("items", {}), *prop.get("anyOf", ()), *prop.get("oneOf", ())):
        ref = candidate.get("$ref") if isinstance(candidate, dict) else None
        if ref is None and isinstance(candidate, dict) and "items" in candidate:
            ref = candidate["items"].get("$ref")
        if ref:
            target = schemas.get(ref.rsplit("/", 1)[-1], {})
            text = target.get("description")
            if text:
                return str(text).split("\n\n")[0].replace("\n", " ")
    return None


def _is_number(prop: dict[str, Any]) -> bool:
    kinds = [prop, prop.get("items", {}), *prop.get("anyOf", ())]
    return any(k.get("type") in {"number", "integer"} for k in kinds if isinstance(k, dict))


def describe_properties(doc: dict[str, Any]) -> None:
    """Give every property of every component schema a description, in place; a number
    whose description names no unit in brackets is dimensionless and says so (``[-]``)."""
    schemas: dict[str, Any] = doc.get("components", {}).get("schemas", {})
    for schema in schemas.values():
        for name, prop in schema.get("properties", {}).items():
            text = prop.get("description") or COMMON.get(name) or _ref_description(prop, schemas)
            if text and _is_number(prop) and "[" not in text:
                text = text.rstrip() + " [-]"
            if text:
                prop["description"] = text
