"""The schema states the rules the model validators enforce, so a caller's client (and the
fuzzer) can know them before sending.

Each body is judged twice: by the pydantic model, and by the JSON Schema the model writes
into openapi/openapi.json, under the JSON Schema 2020-12 validator of the ``jsonschema`` library
(the reference implementation of the specification). Both must agree.
"""

from __future__ import annotations

from typing import Any

import jsonschema
import pytest
from pydantic import BaseModel, ValidationError

from service.schemas.acceleration import RunOptions
from service.schemas.shift_window import ShiftWindowFinishIn
from service.schemas.vehicle import AirIn, RoadLoadIn

CASES: list[tuple[type[BaseModel], dict[str, Any], bool]] = [
    (RoadLoadIn, {"drag_area": 0.7}, True),
    (RoadLoadIn, {"drag_coefficient": 0.3, "frontal_area": 2.2}, True),
    (
        RoadLoadIn,
        {"drag_coefficient": 0.3, "frontal_area": 2.2, "rolling_coefficient": 0.01},
        True,
    ),
    (RoadLoadIn, {"coast_down": [150, 1.5, 0.035]}, True),
    (RoadLoadIn, {"drag_coefficient": 0.3}, False),
    (RoadLoadIn, {}, False),
    (RoadLoadIn, {"drag_area": 0.7, "drag_coefficient": 0.3, "frontal_area": 2.2}, False),
    (RoadLoadIn, {"coast_down": [150, 1.5, 0.035], "rolling_coefficient": 0.01}, False),
    (RoadLoadIn, {"coast_down": [150, 1.5, 0.035], "drag_area": 0.7}, False),
    (RoadLoadIn, {"drag_area": 0.7, "drag_coefficient": None}, True),
    (AirIn, {}, True),
    (AirIn, {"pressure": 95.0}, True),
    (AirIn, {"altitude": 500.0}, True),
    (AirIn, {"pressure": 95.0, "altitude": 500.0}, False),
    (AirIn, {"pressure": 95.0, "altitude": None}, True),
    (RunOptions, {}, True),
    (RunOptions, {"finish_distance": 201.168}, True),
    (RunOptions, {"finish_speed": 100.0}, True),
    (RunOptions, {"finish_distance": 201.168, "finish_speed": 100.0}, False),
    (ShiftWindowFinishIn, {"finish_speed": 100.0}, True),
    (ShiftWindowFinishIn, {"finish_distance": 402.336, "finish_speed": 100.0}, False),
]


def _pydantic_accepts(model: type[BaseModel], body: dict[str, Any]) -> bool:
    try:
        model.model_validate(body)
    except ValidationError:
        return False
    return True


def _schema_accepts(model: type[BaseModel], body: dict[str, Any]) -> bool:
    schema = model.model_json_schema()
    return bool(jsonschema.Draft202012Validator(schema).is_valid(body))


@pytest.mark.parametrize(("model", "body", "valid"), CASES)
def test_the_schema_and_the_validator_agree(
    model: type[BaseModel], body: dict[str, Any], valid: bool
) -> None:
    assert _pydantic_accepts(model, body) is valid
    assert _schema_accepts(model, body) is valid
