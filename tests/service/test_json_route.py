"""The quick path of JSON-body routes answers exactly as FastAPI's own handler does."""

from __future__ import annotations

import json
from typing import Any

import numpy as np
import pytest
from pydantic_core import from_json

from service.app import app
from service.http import json_route
from service.http.deps import JsonBody
from service.http.json_route import JsonBodyRoute, quick_body
from tests.conftest import ApiClient, load_demo


def _contexts() -> list[Any]:
    out = []
    for route in app.router.routes:
        contexts = getattr(route, "effective_route_contexts", None)
        if callable(contexts):
            out += [c for c in contexts() if isinstance(c.original_route, JsonBodyRoute)]
    return out


def test_every_json_body_endpoint_takes_the_quick_path() -> None:
    found = 0
    for context in _contexts():
        hints = context.endpoint.__annotations__
        if "JsonBody" not in str(hints.values()) and JsonBody not in hints.values():
            continue
        found += 1
        # the app's inclusion adds no dependency the quick path would skip
        assert quick_body(context.dependant) == quick_body(context.original_route.dependant)
        assert quick_body(context.dependant) is not None, context.path
    assert found >= 12


def _coupe(**changes: Any) -> str:
    body = load_demo("demo_coupe_us")
    body.update(changes)
    return json.dumps(body)


def _raw_cases() -> list[Any]:
    coupe = _coupe()
    bool_rpm = load_demo("demo_coupe_us")
    bool_rpm["engine"]["curve"]["rpm"][2] = True
    huge_tire = load_demo("demo_coupe_us")
    huge_tire["drivetrain"]["tire"] = {"diameter": 400.0}
    no_drivetrain = load_demo("demo_coupe_us")
    del no_drivetrain["drivetrain"]
    ascending = load_demo("demo_coupe_us")  # valid to the schema, refused by core
    ascending["drivetrain"]["gear_ratios"] = [1.0, 2.0, 3.0]
    json_type = "application/json"
    return [
        pytest.param(coupe, json_type, id="valid"),
        pytest.param(coupe, "application/problem+json", id="valid-suffix-type"),
        pytest.param(coupe, "Application/JSON; charset=utf-8", id="valid-type-params"),
        pytest.param(coupe, None, id="no-content-type"),
        pytest.param(coupe, "text/plain", id="text-content-type"),
        pytest.param(_coupe(reference="WO-\\u0041"), json_type, id="escaped-reference"),
        pytest.param(json.dumps(bool_rpm), json_type, id="bool-in-number-list"),
        pytest.param(json.dumps(huge_tire), json_type, id="si-limit"),
        pytest.param(json.dumps(no_drivetrain), json_type, id="missing-field"),
        pytest.param(json.dumps(ascending), json_type, id="core-error"),
        pytest.param(_coupe(wheelbase=2.7), json_type, id="unknown-field"),
        pytest.param(
            coupe.replace('"units": "us"', '"units": "us", "units": "metric"'),
            json_type,
            id="duplicate-key",
        ),
        pytest.param(coupe.replace('"torque": [', '"torque": [NaN, '), json_type, id="nan"),
        pytest.param(
            coupe.replace('"torque": [', '"torque": [' + "9" * 400 + ", "),
            json_type,
            id="huge-integer",
        ),
        pytest.param(_coupe(reference="\\ud800"), json_type, id="lone-surrogate"),
        pytest.param("[1, 2]", json_type, id="array"),
        pytest.param("{not json", json_type, id="not-json"),
        pytest.param("", json_type, id="empty"),
    ]


def _answer(api: ApiClient, raw: str, content_type: str | None, mark: str) -> Any:
    headers = {} if content_type is None else {"Content-Type": content_type}
    # each answer is computed: a distinct reference keeps the result cache out of it
    text = raw.replace('"reference": "', f'"reference": "{mark}', 1)
    r = api.post("/v1/shift-plan", content=text.encode(), headers=headers)
    return r.status_code, r.headers.get("content-type"), r.content.replace(mark.encode(), b"")


@pytest.mark.parametrize(("raw", "content_type"), _raw_cases())
def test_quick_path_answers_as_fastapi_does(
    api: ApiClient, monkeypatch: pytest.MonkeyPatch, raw: str, content_type: str | None
) -> None:
    quick = _answer(api, raw, content_type, "QUICK-")
    monkeypatch.setattr(json_route, "_validated", lambda model, raw: None)
    full = _answer(api, raw, content_type, "FULLP-")
    assert quick == full


def test_a_valid_json_body_is_validated_once_on_the_quick_path(
    api: ApiClient, monkeypatch: pytest.MonkeyPatch
) -> None:
    seen: list[object] = []
    validated = json_route._validated

    def spy(model: Any, raw: bytes) -> Any:
        seen.append(validated(model, raw))
        return seen[-1]

    monkeypatch.setattr(json_route, "_validated", spy)
    r = api.post(
        "/v1/shift-plan",
        content=_coupe(reference="SPY-1").encode(),
        headers={"Content-Type": "application/json"},
    )
    assert r.status_code == 200
    assert len(seen) == 1 and seen[0] is not None


def _numbers() -> list[str]:
    """Invented numbers: integers up to far past 64 bits, decimals, exponents to both
    ends of the double range."""
    rng = np.random.default_rng(12)
    out = []
    for _ in range(20000):
        digits = "".join(map(str, rng.integers(0, 10, size=int(rng.integers(1, 26)))))
        text = str(rng.integers(1, 10)) + digits
        if rng.random() < 0.6:
            cut = int(rng.integers(1, len(text) + 1))
            text = text[:cut] + "." + (text[cut:] or "0")
        if rng.random() < 0.3:
            text += f"e{int(rng.integers(-330, 330))}"
        out.append(("-" if rng.random() < 0.5 else "") + text)
    return out


def test_the_quick_parse_reads_every_number_as_the_standard_library_does() -> None:
    # reference: Python's json module, the parser of FastAPI's own path; the quick path
    # parses with pydantic-core's from_json
    for text in _numbers():
        expected = json.loads(text)
        got = from_json(text.encode())
        assert (type(got), repr(got)) == (type(expected), repr(expected)), text
