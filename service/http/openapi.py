"""OpenAPI document: problem responses declared once, served as application/problem+json."""

from __future__ import annotations

from typing import Any

from fastapi import FastAPI
from fastapi.openapi.utils import get_openapi

from service.http.openapi_docs import describe_properties
from service.schemas.common import Problem

__all__ = ["PROBLEM_RESPONSES", "build_openapi"]

PROBLEM_RESPONSES: dict[int | str, dict[str, Any]] = {
    400: {"model": Problem, "description": "The body is not valid JSON."},
    413: {"model": Problem, "description": "The body exceeds the size limit."},
    415: {"model": Problem, "description": "The body is not declared as JSON."},
    422: {"model": Problem, "description": "A field is invalid; `field` names it."},
    503: {
        "model": Problem,
        "description": "The worker is busy; retry after `Retry-After` seconds.",
    },
}


def build_openapi(app: FastAPI) -> dict[str, Any]:
    """The app's OpenAPI document, error bodies typed ``application/problem+json``."""
    if app.openapi_schema is not None:
        return app.openapi_schema
    doc = get_openapi(
        title=app.title,
        version=app.version,
        description=app.description,
        routes=app.routes,
        tags=app.openapi_tags,
    )
    for path_item in doc.get("paths", {}).values():
        for operation in path_item.values():
            for status, response in operation.get("responses", {}).items():
                content = response.get("content", {})
                if status.startswith(("4", "5")) and "application/json" in content:
                    content["application/problem+json"] = content.pop("application/json")
    describe_properties(doc)
    app.openapi_schema = doc
    return doc
