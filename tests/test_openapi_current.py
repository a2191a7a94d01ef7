"""The committed OpenAPI document matches the app."""

from __future__ import annotations

from scripts.write_openapi import TARGET, render


def test_committed_openapi_is_current() -> None:
    assert TARGET.read_text(encoding="utf-8") == render(), (
        "openapi/openapi.json is stale: run `make openapi`"
    )
