"""POST /v1/charts/tractive-force: SVG and PNG of tractive force by gear."""

from __future__ import annotations

import json
import struct
import xml.etree.ElementTree as ET
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose

from service.mapping.calculations import compute_acceleration_run, compute_shift_plan
from service.output.chart_data import run_chart, tractive_force_chart
from service.output.chart_page import gear_look
from service.output.png_chart import PNG_DPI, SIZE_IN, ChartFormat, render_chart
from service.schemas.acceleration import AccelerationRunRequest
from service.schemas.shift_plan import ShiftPlanRequest
from tests.conftest import ApiClient, load_demo

URL = "/v1/charts/tractive-force"
SVG_NS = "{http://www.w3.org/2000/svg}"
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"  # ISO/IEC 15948 (PNG), section 5.2


def _texts(svg: bytes) -> list[str]:
    root = ET.fromstring(svg)
    assert root.tag == f"{SVG_NS}svg"
    return [t.text or "" for t in root.iter(f"{SVG_NS}text")]


def _sedan_plan() -> dict[str, Any]:
    sedan = load_demo("demo_sedan_run_metric")
    return {k: sedan[k] for k in ("units", "reference", "engine", "drivetrain", "vehicle")}


@pytest.fixture(scope="module")
def coupe_svg(api: ApiClient) -> bytes:
    r = api.post(URL, json=load_demo("demo_coupe_us"), headers={"accept": "*/*"})
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "image/svg+xml"
    return r.content


def test_default_chart_is_well_formed_svg_with_units_on_the_axes(coupe_svg: bytes) -> None:
    texts = _texts(coupe_svg)
    assert "Road speed [mph]" in texts and "Tractive force [lbf]" in texts
    assert "Tractive force by gear" in texts
    assert any("WO-2291" in t for t in texts)


def test_chart_labels_every_gear_and_shift(coupe_svg: bytes) -> None:
    texts = _texts(coupe_svg)
    assert {str(g) for g in range(1, 7)} <= set(texts)
    body = api_plan(load_demo("demo_coupe_us"))
    for s in body.plan.shifts:
        assert f"{s.from_gear}-{s.to_gear} {s.shift_rpm:.0f} rpm" in texts


def api_plan(request: dict[str, Any]) -> Any:
    return compute_shift_plan(ShiftPlanRequest.model_validate(request))


def test_metric_chart_speaks_metric_units(api: ApiClient, hatch_metric: dict[str, Any]) -> None:
    r = api.post(URL, json=hatch_metric)
    assert r.status_code == 200, r.text
    texts = _texts(r.content)
    assert "Road speed [km/h]" in texts and "Tractive force [N]" in texts


def test_png_has_the_signature_and_the_size_asked(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    r = api.post(URL, json=coupe_us, headers={"accept": "image/png"})
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "image/png"
    assert r.headers["content-disposition"] == 'inline; filename="tractive-force-WO-2291.png"'
    assert r.content.startswith(PNG_SIGNATURE)
    width, height = struct.unpack(">II", r.content[16:24])  # IHDR comes first
    assert (width, height) == (round(SIZE_IN[0] * PNG_DPI), round(SIZE_IN[1] * PNG_DPI))


def test_vehicle_adds_road_load_and_traction_limit(api: ApiClient) -> None:
    r = api.post(URL, json=_sedan_plan())
    assert r.status_code == 200, r.text
    texts = _texts(r.content)
    assert "road load" in texts and "traction limit " in texts


def test_plotted_force_matches_the_json_tables_at_the_rev_limit(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    doc = api.post("/v1/shift-plan", json=coupe_us).json()
    chart = tractive_force_chart(api_plan(coupe_us))
    for curve, gear in zip(chart.gears, doc["gears"], strict=True):
        assert_allclose(curve.force[-1], gear["table"]["tractive_force"][-1], rtol=1e-4)
        assert_allclose(curve.speed[-1], gear["max_speed"], rtol=1e-4)
    for mark, shift in zip(chart.shifts, doc["shifts"], strict=True):
        assert_allclose(mark.speed, shift["shift_speed"], rtol=1e-4)
        assert_allclose(mark.force_before, shift["force_before"], rtol=2e-3)


def test_road_load_is_drawn_in_the_callers_units() -> None:
    chart = tractive_force_chart(api_plan(_sedan_plan()))
    assert chart.road_load is not None and chart.traction_limit is not None
    speed, force = chart.road_load
    assert speed[0] == 0.0 and np.all(np.diff(force) > 0)
    # at rest only rolling resistance acts: 0.011 * 1520 kg * 9.80665 m/s^2 = 164.0 N
    assert_allclose(force[0], 0.011 * 1520 * 9.80665, rtol=1e-6)


def test_gears_differ_by_more_than_colour() -> None:
    # greyscale print: dash pattern, marker and fill must tell all twelve gears apart
    looks = {(look.dash, look.marker, look.filled) for look in map(gear_look, range(1, 13))}
    assert len(looks) == 12


@pytest.mark.parametrize("fmt", list(ChartFormat), ids=lambda f: f.name)
def test_same_chart_renders_to_the_same_bytes(fmt: ChartFormat) -> None:
    chart = tractive_force_chart(api_plan(load_demo("demo_coupe_us")))
    assert render_chart(chart, fmt) == render_chart(chart, fmt)


def test_same_request_gives_the_same_svg_through_the_service(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    coupe_us["reference"] = "SAME-SVG"
    headers = {"content-type": "application/json"}
    one = api.post(URL, content=json.dumps(coupe_us), headers=headers)
    two = api.post(URL, content=json.dumps(coupe_us, indent=2), headers=headers)  # cache miss
    assert one.status_code == two.status_code == 200
    assert one.content == two.content


def test_run_chart_is_well_formed_svg() -> None:
    run = compute_acceleration_run(
        AccelerationRunRequest.model_validate(load_demo("demo_sedan_run_metric"))
    )
    chart = run_chart(run)
    texts = _texts(render_chart(chart, ChartFormat.SVG))
    assert "Time from first motion [s]" in texts and "Road speed [km/h]" in texts
    assert [s.gear for s in chart.segments] == sorted(s.gear for s in chart.segments)
    assert any(t.startswith("1/4 mile") for t in texts)


def test_reference_with_dollars_stays_plain_text(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    coupe_us["reference"] = "$a^b$ & <c>"
    r = api.post(URL, json=coupe_us)
    assert r.status_code == 200, r.text
    assert any("ref $a^b$ & <c>" in t for t in _texts(r.content))


@pytest.mark.parametrize(
    "accept", ["text/html", "application/pdf", "image/png;q=0, image/svg+xml;q=0"]
)
def test_unsupported_accept_is_406_problem(
    api: ApiClient, coupe_us: dict[str, Any], accept: str
) -> None:
    r = api.post(URL, json=coupe_us, headers={"accept": accept})
    assert r.status_code == 406, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert "image/svg+xml, image/png" in r.json()["detail"]


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        pytest.param(
            ("drivetrain", "gear_ratios"), [2.0, 3.0], "drivetrain.gear_ratios", id="asc"
        ),
        pytest.param(("engine", "rev_limit_rpm"), 1000, "engine.rev_limit_rpm", id="rev-limit"),
    ],
)
def test_bad_input_is_422_naming_the_field(
    api: ApiClient, coupe_us: dict[str, Any], path: tuple[str, str], value: Any, field: str
) -> None:
    coupe_us[path[0]][path[1]] = value
    r = api.post(URL, json=coupe_us, headers={"accept": "image/png"})
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"].startswith(field)
