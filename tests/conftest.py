"""Shared fixtures: a synchronous httpx client on the ASGI app, and the demo requests.

The demo cars in tests/data are invented scenarios, not real vehicles or dyno sheets.
"""

from __future__ import annotations

import json
import os
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import httpx
import pytest
from anyio.from_thread import BlockingPortal, start_blocking_portal

# An app whose lifespan runs in this process (schemathesis loads the schema through one)
# would keep the whole test process on one CPU, and the browser and servers it starts after.
os.environ.setdefault("GEARWORK_PIN_CPU", "false")

from service.app import app

DATA = Path(__file__).parent / "data"


class ApiClient:
    """Calls the ASGI app in-process through httpx.AsyncClient, from synchronous tests."""

    def __init__(self, portal: BlockingPortal) -> None:
        self._portal = portal

    def request(self, method: str, url: str, **kwargs: Any) -> httpx.Response:
        async def go() -> httpx.Response:
            transport = httpx.ASGITransport(app=app)
            async with httpx.AsyncClient(transport=transport, base_url="http://test") as c:
                return await c.request(method, url, **kwargs)

        return self._portal.call(go)

    def post(self, url: str, **kwargs: Any) -> httpx.Response:
        return self.request("POST", url, **kwargs)

    def get(self, url: str, **kwargs: Any) -> httpx.Response:
        return self.request("GET", url, **kwargs)


@pytest.fixture(scope="session")
def api() -> Iterator[ApiClient]:
    with start_blocking_portal() as portal:
        yield ApiClient(portal)


def load_demo(name: str) -> dict[str, Any]:
    """A fresh copy of a demo request from tests/data."""
    data: dict[str, Any] = json.loads((DATA / f"{name}.json").read_text())
    return data


@pytest.fixture
def coupe_us() -> dict[str, Any]:
    return load_demo("demo_coupe_us")


@pytest.fixture
def hatch_metric() -> dict[str, Any]:
    return load_demo("demo_hatch_metric")
