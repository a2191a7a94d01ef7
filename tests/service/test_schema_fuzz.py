"""Schemathesis over the app's own OpenAPI schema: no 5xx, every response as documented.

The suite runs a short, derandomised (fixed-seed) pass; ``make fuzz`` runs a long one by
setting GEARWORK_FUZZ_EXAMPLES.
"""

from __future__ import annotations

import os
from typing import Any

import schemathesis
from hypothesis import HealthCheck, settings
from schemathesis.checks import not_a_server_error
from schemathesis.config import SchemathesisConfig
from schemathesis.specs.openapi.checks import (
    content_type_conformance,
    negative_data_rejection,
    response_schema_conformance,
    status_code_conformance,
)

from service.app import app

EXAMPLES = int(os.environ.get("GEARWORK_FUZZ_EXAMPLES", "40"))
CHECKS = [
    not_a_server_error,
    status_code_conformance,
    content_type_conformance,
    response_schema_conformance,
    negative_data_rejection,
]

# an oversize body is rightly rejected with 413, which the default list lacks
CONFIG = SchemathesisConfig.from_dict(
    {
        "checks": {
            "negative_data_rejection": {
                "expected-statuses": [400, 401, 403, 404, 405, 406, 409, 413, 415, 422, 428, 429]
            }
        }
    }
)
schema = schemathesis.openapi.from_asgi("/openapi.json", app, config=CONFIG)


@schema.parametrize()
@settings(
    max_examples=EXAMPLES,
    derandomize=True,
    deadline=None,
    database=None,
    suppress_health_check=list(HealthCheck),
)
def test_api_conforms_to_its_schema(case: schemathesis.Case[Any]) -> None:
    case.call_and_validate(checks=CHECKS)
