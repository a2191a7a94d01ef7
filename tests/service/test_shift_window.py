"""POST /v1/shift-window through httpx. The demo cars are invented."""

from __future__ import annotations

from typing import Any

import pytest

from tests.conftest import ApiClient, load_demo

URL = "/v1/shift-window"


def sedan(**extra: Any) -> dict[str, Any]:
    body = load_demo("demo_sedan_run_metric")
    body.pop("shifts", None)
    body.pop("run", None)
    return {**body, "points": 9, **extra}


@pytest.fixture(scope="module")
def metric(api: ApiClient) -> dict[str, Any]:
    r = api.post(URL, json=sedan())
    assert r.status_code == 200, r.text
    return dict(r.json())


def test_every_change_before_the_finish_has_a_window_around_its_best_rpm(
    metric: dict[str, Any],
) -> None:
    reached = [w for w in metric["windows"] if w["reached"]]
    assert reached
    for w in reached:
        assert w["low_rpm"] <= w["best_rpm"] <= w["high_rpm"]
        assert min(x for x in w["loss"] if x is not None) >= -2e-3
        assert w["line"].startswith(f"{w['from_gear']}-{w['to_gear']}: anywhere ")
    assert metric["finish"].startswith("1/4 mile")
    assert metric["cautions"] and metric["reference"] == "RUN-0412"
    assert all(len(line) <= 80 for line in metric["summary"].splitlines())


def test_us_finish_speed_is_spoken_in_mph(api: ApiClient) -> None:
    body = sedan(run={"finish_speed": 100.0}, tolerance=0.02)
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    out = r.json()
    assert out["finish"] == "to 100 km/h"
    assert out["tolerance"] == 0.02
    us = {**body, "units": "us", "run": {"finish_speed": 60.0}}
    us["vehicle"] = {**body["vehicle"], "mass": 3351, "wheelbase": 107.1, "cg_height": 21.3}
    us["vehicle"]["air"] = {"temperature": 68, "altitude": 492, "relative_humidity": 50}
    us["vehicle"]["road_load"] = {**body["vehicle"]["road_load"], "frontal_area": 24.2}
    r = api.post(URL, json=us)
    assert r.status_code == 200, r.text
    assert r.json()["finish"] == "to 60 mph"


def test_both_finishes_at_once_is_a_problem(api: ApiClient) -> None:
    r = api.post(URL, json=sedan(run={"finish_speed": 100.0, "finish_distance": 400.0}))
    assert r.status_code == 422
    assert r.headers["content-type"].startswith("application/problem+json")


def test_too_few_points_is_a_problem(api: ApiClient) -> None:
    r = api.post(URL, json=sedan(points=2))
    assert r.status_code == 422
