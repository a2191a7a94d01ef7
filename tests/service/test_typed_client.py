"""A typed client generated from openapi/openapi.json calls every endpoint successfully.

The client's models come from datamodel-code-generator (pydantic v2 models, generated once
per run from the committed document). Each request body is the schema's own example, built
and checked by the generated request model; each JSON answer must parse into the generated
response model. Bodies the generator cannot type (the CSV upload, the HTML/text/PDF reports
and the SVG/PNG charts) are sent and received as bytes and checked by media type: they are
outside what a JSON-schema model generator describes.
"""

from __future__ import annotations

import importlib.util
import json
import sys
import warnings
from collections.abc import Iterator
from pathlib import Path
from types import ModuleType
from typing import Any

import pytest
from pydantic import BaseModel

from tests.conftest import ApiClient

DOC_PATH = Path(__file__).resolve().parents[2] / "openapi" / "openapi.json"
DOC: dict[str, Any] = json.loads(DOC_PATH.read_text(encoding="utf-8"))
CSV_BODY = "Engine Speed (rpm);Torque [N*m]\n2000;200,5\n3000;240,0\n4000;250,0\n"


def _operations() -> Iterator[tuple[str, str, dict[str, Any]]]:
    for path, item in DOC["paths"].items():
        for method, operation in item.items():
            yield path, method, operation


OPERATIONS = list(_operations())


@pytest.fixture(scope="module")
def client_models(tmp_path_factory: pytest.TempPathFactory) -> ModuleType:
    """The generated models, imported as a module."""
    import datamodel_code_generator as dcg
    from datamodel_code_generator.enums import DataModelType

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # the generator's own deprecation notices
        code = dcg.generate(
            DOC_PATH,
            input_file_type=dcg.InputFileType.OpenAPI,
            output_model_type=DataModelType.PydanticV2BaseModel,
            target_python_version=dcg.PythonVersion.PY_311,
            formatters=[dcg.Formatter.BUILTIN],
        )
    assert isinstance(code, str)
    path = tmp_path_factory.mktemp("client") / "gearwork_client_models.py"
    path.write_text(code, encoding="utf-8")
    spec = importlib.util.spec_from_file_location("gearwork_client_models", path)
    assert spec is not None and spec.loader is not None
    module = importlib.util.module_from_spec(spec)
    sys.modules[spec.name] = module
    spec.loader.exec_module(module)
    return module


def _schema_name(content: dict[str, Any], media: str) -> str | None:
    ref = content.get(media, {}).get("schema", {}).get("$ref")
    return None if ref is None else str(ref).rsplit("/", 1)[-1]


def _model(models: ModuleType, name: str) -> type[BaseModel]:
    model = getattr(models, name)
    assert isinstance(model, type) and issubclass(model, BaseModel)
    return model


def test_every_request_schema_carries_an_example() -> None:
    schemas = DOC["components"]["schemas"]
    for _, _, operation in OPERATIONS:
        name = _schema_name(
            operation.get("requestBody", {}).get("content", {}), "application/json"
        )
        if name is not None:
            assert schemas[name].get("examples"), name


@pytest.mark.parametrize(
    ("path", "method", "operation"),
    [pytest.param(p, m, o, id=o["operationId"]) for p, m, o in OPERATIONS],
)
def test_generated_client_calls_the_endpoint(
    client_models: ModuleType,
    api: ApiClient,
    path: str,
    method: str,
    operation: dict[str, Any],
) -> None:
    request_content = operation.get("requestBody", {}).get("content", {})
    answer = operation["responses"]["200"].get("content", {})
    accept = next(iter(answer), "application/json")
    headers = {"Accept": accept}
    request_name = _schema_name(request_content, "application/json")
    if request_name is not None:
        example = DOC["components"]["schemas"][request_name]["examples"][0]
        body = _model(client_models, request_name).model_validate(example)
        payload = body.model_dump(mode="json", exclude_unset=True, by_alias=True)
        response = api.request(method, path, json=payload, headers=headers)
    elif "text/csv" in request_content:
        headers["Content-Type"] = "text/csv"
        response = api.request(method, path, content=CSV_BODY.encode(), headers=headers)
    else:
        response = api.request(method, path, headers=headers)
    assert response.status_code == 200, response.text[:500]
    assert response.headers["content-type"].split(";")[0] == accept
    response_name = _schema_name(answer, "application/json")
    if response_name is not None:
        _model(client_models, response_name).model_validate(response.json())
    else:
        assert response.content  # a report or chart: bytes of the declared media type


def test_generated_request_model_knows_the_tire_rule(client_models: ModuleType) -> None:
    # the schema states "exactly one way to give the tire" (oneOf of `required` forms), so
    # the generated model refuses a tire given no way at all; the generator drops the
    # "others null" half of each form, which the service still enforces with a 422
    tire = _model(client_models, "TireIn")
    tire.model_validate({"size": "245/40R18"})
    with pytest.raises(ValueError, match=r"diameter|size|revs_per"):
        tire.model_validate({"rolling_factor": 0.97})
