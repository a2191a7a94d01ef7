"""Web callers: CORS, gzip, cache headers, the demo page, limits and problem details."""

from __future__ import annotations

import json
import re
from collections.abc import Callable, Iterator
from typing import Any

import httpx
import pytest
from anyio.from_thread import start_blocking_portal
from fastapi import FastAPI
from pydantic import ValidationError
from starlette.exceptions import HTTPException

from service.app import create_app
from service.routes.demo import STATIC
from service.settings import Settings, get_settings
from tests.conftest import ApiClient, load_demo

URL = "/v1/shift-plan"
SHOP = "https://shop.example"


class Built:
    """An app built under particular settings, called in-process."""

    def __init__(self, app: FastAPI) -> None:
        self.app = app

    def __call__(self, method: str, url: str, **kwargs: Any) -> httpx.Response:
        async def go() -> httpx.Response:
            transport = httpx.ASGITransport(app=self.app)
            async with httpx.AsyncClient(transport=transport, base_url="http://t") as c:
                return await c.request(method, url, **kwargs)

        with start_blocking_portal() as portal:
            return portal.call(go)


def _problem(r: httpx.Response, status: int) -> dict[str, Any]:
    assert r.status_code == status, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.headers["cache-control"] == "no-store"
    body: dict[str, Any] = r.json()
    assert body["status"] == status and {"type", "title", "detail", "instance"} <= body.keys()
    return body


@pytest.fixture
def app_with(monkeypatch: pytest.MonkeyPatch) -> Iterator[Callable[..., Built]]:
    """Build an app under GEARWORK_* settings (``app_with(cors_origins="...")``)."""

    def build(**env: str) -> Built:
        for name, value in env.items():
            monkeypatch.setenv(f"GEARWORK_{name.upper()}", value)
        get_settings.cache_clear()
        try:
            return Built(create_app())
        finally:
            get_settings.cache_clear()

    yield build
    get_settings.cache_clear()


# --- CORS -------------------------------------------------------------------------------


def test_no_cors_headers_without_configured_origins(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"Origin": SHOP})
    assert r.status_code == 200
    assert "access-control-allow-origin" not in r.headers


def test_configured_origin_may_call_and_read_the_tags(app_with: Callable[..., Built]) -> None:
    call = app_with(cors_origins=f"{SHOP}, https://other.example")
    r = call("POST", URL, json=load_demo("demo_coupe_us"), headers={"Origin": SHOP})
    assert r.status_code == 200
    assert r.headers["access-control-allow-origin"] == SHOP
    exposed = {h.strip().lower() for h in r.headers["access-control-expose-headers"].split(",")}
    assert {"etag", "x-request-id", "retry-after"} <= exposed
    assert "origin" in r.headers["vary"].lower()


def test_preflight_from_configured_origin_is_allowed(app_with: Callable[..., Built]) -> None:
    call = app_with(cors_origins=SHOP, cors_max_age_s="120")
    r = call(
        "OPTIONS",
        URL,
        headers={
            "Origin": SHOP,
            "Access-Control-Request-Method": "POST",
            "Access-Control-Request-Headers": "content-type, x-request-id",
        },
    )
    assert r.status_code == 200
    assert "POST" in r.headers["access-control-allow-methods"]
    assert r.headers["access-control-max-age"] == "120"


def test_preflight_from_other_origin_is_a_403_problem(app_with: Callable[..., Built]) -> None:
    call = app_with(cors_origins=SHOP)
    r = call(
        "OPTIONS",
        URL,
        headers={"Origin": "https://elsewhere.example", "Access-Control-Request-Method": "POST"},
    )
    assert "origin" in _problem(r, 403)["detail"]


@pytest.mark.parametrize(
    "value",
    [
        pytest.param("ftp://shop.example", id="scheme"),
        pytest.param("https://shop.example/path", id="path"),
        pytest.param("shop.example", id="no-scheme"),
    ],
)
def test_malformed_cors_origin_stops_the_settings(
    monkeypatch: pytest.MonkeyPatch, value: str
) -> None:
    monkeypatch.setenv("GEARWORK_CORS_ORIGINS", value)
    with pytest.raises(ValidationError, match="GEARWORK_CORS_ORIGINS"):
        Settings()


def test_cors_origins_default_to_none(monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.delenv("GEARWORK_CORS_ORIGINS", raising=False)
    assert Settings().cors_origins == []


# --- gzip and cache headers -------------------------------------------------------------


def test_large_result_is_gzipped_when_asked(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"Accept-Encoding": "gzip"})
    assert r.headers["content-encoding"] == "gzip"
    assert int(r.headers["content-length"]) < len(r.content)
    assert r.json()["reference"] == "WO-2291"


def test_result_is_plain_when_gzip_is_not_accepted(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"Accept-Encoding": "identity"})
    assert "content-encoding" not in r.headers
    assert int(r.headers["content-length"]) == len(r.content)


def test_small_answers_are_not_gzipped(api: ApiClient) -> None:
    assert "content-encoding" not in api.get("/healthz").headers


def test_gzip_level_zero_turns_gzip_off(app_with: Callable[..., Built]) -> None:
    call = app_with(gzip_level="0")
    r = call("POST", URL, json=load_demo("demo_coupe_us"), headers={"Accept-Encoding": "gzip"})
    assert r.status_code == 200 and "content-encoding" not in r.headers


def test_result_is_revalidated_and_varies_on_accept_and_encoding(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"))
    assert r.headers["cache-control"] == "private, no-cache"
    vary = [v.strip().lower() for v in r.headers["vary"].split(",")]
    assert sorted(vary) == ["accept", "accept-encoding"]
    assert r.headers["etag"].startswith('W/"')
    assert r.headers["x-content-type-options"] == "nosniff"


def test_not_modified_keeps_the_cache_headers(api: ApiClient) -> None:
    etag = api.post(URL, json=load_demo("demo_coupe_us")).headers["etag"]
    r = api.post(
        URL, json=load_demo("demo_coupe_us"), headers={"If-None-Match": f'"other", {etag}'}
    )
    assert r.status_code == 304
    assert r.headers["etag"] == etag
    assert r.headers["cache-control"] == "private, no-cache"
    assert "accept" in r.headers["vary"].lower()


def test_strong_form_of_the_tag_also_revalidates(api: ApiClient) -> None:
    etag = api.post(URL, json=load_demo("demo_coupe_us")).headers["etag"]
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"If-None-Match": etag[2:]})
    assert r.status_code == 304


def test_result_max_age_is_configurable(app_with: Callable[..., Built]) -> None:
    call = app_with(result_max_age_s="600")
    r = call("POST", URL, json=load_demo("demo_coupe_us"))
    assert r.headers["cache-control"] == "private, max-age=600"


# --- every failure is problem details ---------------------------------------------------


def test_unknown_path_is_404_problem(api: ApiClient) -> None:
    _problem(api.get("/nowhere"), 404)


def test_wrong_method_is_405_problem_with_allow(api: ApiClient) -> None:
    r = api.get(URL)
    _problem(r, 405)
    assert r.headers["allow"] == "POST"


def test_oversize_body_is_413_problem(api: ApiClient) -> None:
    _problem(api.post(URL, content=b"[" + b"0," * 200_000 + b"0]"), 413)


def test_body_not_declared_json_is_415_problem(api: ApiClient) -> None:
    body = json.dumps(load_demo("demo_coupe_us"))
    _problem(api.post(URL, content=body, headers={"Content-Type": "text/plain"}), 415)


def test_invalid_field_is_422_problem_naming_it(api: ApiClient) -> None:
    body = load_demo("demo_coupe_us")
    body["drivetrain"]["final_drive_ratio"] = 0
    assert _problem(api.post(URL, json=body), 422)["field"] == "drivetrain.final_drive_ratio"


def test_deeply_nested_json_is_a_problem_not_a_crash(api: ApiClient) -> None:
    r = api.post(URL, content=b"[" * 50_000 + b"]" * 50_000)
    assert r.status_code in (400, 413, 422)
    assert r.headers["content-type"] == "application/problem+json"


def test_not_acceptable_raised_by_a_route_is_406_problem(
    app_with: Callable[..., Built],
) -> None:
    # no route negotiates today; one that does (a report format) answers with a problem
    call = app_with()

    async def picky() -> None:
        raise HTTPException(406, "Only text/plain is offered here.")

    call.app.add_api_route("/picky", picky)
    _problem(call("GET", "/picky", headers={"Accept": "image/png"}), 406)


def test_largest_admissible_request_is_answered_not_failed(api: ApiClient) -> None:
    # the deterministic work bound: the schema's own limits (2000 curve points, 12 gears,
    # 2000 table rows) are the worst case, and it is answered, never a 5xx
    rpm = [800.0 + 10.0 * i for i in range(2000)]
    body = load_demo("demo_coupe_us")
    body["engine"] = {
        "curve": {"rpm": rpm, "torque": [300.0 + 40.0 * ((i % 50) / 50.0) for i in range(2000)]}
    }
    body["drivetrain"]["gear_ratios"] = [round(5.0 * 0.82**i, 4) for i in range(12)]
    r = api.post(URL, json=body, headers={"Accept-Encoding": "gzip"})
    assert r.status_code == 200, r.text
    assert len(r.json()["gears"]) == 12


# --- the demo page ----------------------------------------------------------------------


def test_demo_page_is_served_with_a_strict_content_policy(api: ApiClient) -> None:
    r = api.get("/demo")
    assert r.status_code == 200
    assert r.headers["content-type"].startswith("text/html")
    csp = r.headers["content-security-policy"]
    assert "default-src 'none'" in csp and "script-src 'self'" in csp
    assert '<canvas id="chart"' in r.text


@pytest.mark.parametrize(
    ("name", "kind"),
    [
        pytest.param("demo.js", "text/javascript", id="js"),
        pytest.param("demo-form.js", "text/javascript", id="form-js"),
        pytest.param("demo.css", "text/css", id="css"),
    ],
)
def test_demo_assets_are_served_with_their_types(api: ApiClient, name: str, kind: str) -> None:
    r = api.get(f"/demo/{name}")
    assert r.status_code == 200 and r.headers["content-type"].startswith(kind)
    assert (
        api.get(f"/demo/{name}", headers={"If-None-Match": r.headers["etag"]}).status_code == 304
    )


def test_unknown_demo_asset_is_404_problem(api: ApiClient) -> None:
    _problem(api.get("/demo/..%2Fsettings.py"), 404)
    _problem(api.get("/demo/demo.html"), 404)


def test_demo_assets_load_nothing_from_elsewhere() -> None:
    for path in STATIC.iterdir():
        text = path.read_text(encoding="utf-8")
        assert "http://" not in text and "https://" not in text, path.name
        assert "<script>" not in text and "style=" not in text, path.name  # no inline code
        if path.suffix == ".html":  # no inline event handlers (onclick= ...)
            assert re.search(r"\son[a-z]+\s*=", text) is None, path.name


def test_demo_data_is_marked_invented() -> None:
    page = (STATIC / "demo.html").read_text(encoding="utf-8")
    assert "invented" in page


# --- documents, /docs and /metrics on a shop's network (issue 11) -----------------------


@pytest.mark.parametrize(
    ("url", "accept", "kind"),
    [
        pytest.param("/v1/reports/shift-plan", "text/html", "text/html", id="html-report"),
        pytest.param("/v1/charts/tractive-force", "image/svg+xml", "image/svg+xml", id="svg"),
    ],
)
def test_html_reports_and_svg_charts_carry_a_content_policy_without_script(
    api: ApiClient, url: str, accept: str, kind: str
) -> None:
    r = api.post(url, json=load_demo("demo_coupe_us"), headers={"accept": accept})
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].startswith(kind)
    policy = r.headers["content-security-policy"]
    assert "default-src 'none'" in policy and "frame-ancestors 'none'" in policy
    assert "script-src" not in policy  # falls back to default-src 'none': no script at all


def test_json_results_carry_no_document_policy(api: ApiClient) -> None:
    r = api.post(URL, json=load_demo("demo_coupe_us"))
    assert "content-security-policy" not in r.headers


def test_docs_page_loads_its_assets_from_this_service_only(api: ApiClient) -> None:
    page = api.get("/docs")
    assert page.status_code == 200
    assert page.headers["content-type"].startswith("text/html")
    assert "script-src 'self'" in page.headers["content-security-policy"]
    assert "http://" not in page.text and "https://" not in page.text
    assert "<script>" not in page.text  # no inline script: the CSP would block it
    for src in ("/docs/swagger-ui-bundle.js", "/docs/swagger-ui.css", "/docs/start.js"):
        assert src in page.text
        asset = api.get(src)
        assert asset.status_code == 200 and len(asset.content) > 0, src
    assert "/openapi.json" in api.get("/docs/start.js").text
    _problem(api.get("/docs/index.html"), 404)
    assert api.get("/redoc").status_code == 404  # its page would load a script from a CDN


def test_docs_can_be_turned_off(app_with: Callable[..., Built]) -> None:
    built = app_with(docs="false")
    assert built("GET", "/docs").status_code == 404
    assert built("GET", "/openapi.json").status_code == 200
