"""POST /v1/road-load/coast-down through httpx. The car and its coast-downs are invented."""

from __future__ import annotations

from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose

from core.car.coast_down import coast_down_speed
from tests.conftest import ApiClient, load_demo

URL = "/v1/road-load/coast-down"
MASS = 1500.0
TRUE_SI = (150.0, 1.2, 0.40)  # F0 [N], F1 [N*s/m], F2 [N*s^2/m^2]


def runs_body(speed_per_m_s: float, seed: int = 1) -> list[dict[str, Any]]:
    t = np.arange(0.0, 200.0, 0.2)
    rng = np.random.default_rng(seed)
    out = []
    for direction, extra in (("out", 10.0), ("back", -10.0)):
        f0, f1, f2 = TRUE_SI
        v = coast_down_speed(t, 120.0 / 3.6, (f0 + extra, f1, f2), 1.03 * MASS)
        keep = v > 15.0 / 3.6
        noisy = v[keep] + rng.normal(0.0, 0.05, int(keep.sum()))
        out.append(
            {
                "direction": direction,
                "time": t[keep].round(2).tolist(),
                "speed": (noisy * speed_per_m_s).round(3).tolist(),
            }
        )
    return out


@pytest.fixture(scope="module")
def metric(api: ApiClient) -> dict[str, Any]:
    body = {
        "reference": "CD-7",
        "mass": MASS,
        "runs": runs_body(3.6),
        "conditions": {"temperature": 20.0, "pressure": 98.21},
    }
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    return dict(r.json())


def test_metric_fit_recovers_known_coefficients_in_per_km_h_units(metric: dict[str, Any]) -> None:
    # F1 [N/(km/h)] = F1 [N*s/m] / 3.6; F2 [N/(km/h)^2] = F2 / 3.6^2 (exact unit factors)
    assert metric["coefficient_units"] == ["N", "N/(km/h)", "N/(km/h)^2"]
    assert_allclose(metric["f0"]["value"], TRUE_SI[0], rtol=0.02)
    assert_allclose(metric["f2"]["value"], TRUE_SI[2] / 3.6**2, rtol=0.02)
    # a 95 % interval: about one fixed seed in twenty falls outside (28 of seeds 0-29 cover)
    assert metric["f1"]["low"] <= TRUE_SI[1] / 3.6 <= metric["f1"]["high"]
    # at the reference conditions themselves the correction is the identity (SAE J1263)
    ref = metric["reference_conditions"]
    assert ref["applied"] and ref["rolling_factor"] == 1.0
    assert_allclose(ref["air_density_ratio"], 1.0, rtol=1e-4)
    assert metric["reference"] == "CD-7" and metric["cautions"]
    assert all(len(line) <= 80 for line in metric["summary"].splitlines())


def test_road_load_block_plugs_into_the_acceleration_run(
    api: ApiClient, metric: dict[str, Any]
) -> None:
    run = load_demo("demo_sedan_run_metric")
    run["vehicle"]["road_load"] = metric["road_load"]
    r = api.post("/v1/acceleration-run", json=run)
    assert r.status_code == 200, r.text


def test_us_units_give_the_same_fit_in_pounds_force_and_mph(
    api: ApiClient, metric: dict[str, Any]
) -> None:
    body = {
        "units": "us",
        "mass": MASS / 0.45359237,
        "runs": runs_body(1.0 / 0.44704),
        "conditions": {"temperature": 68.0, "pressure": 98.21 / 3.386389},
    }
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    us = r.json()
    assert us["coefficient_units"] == ["lbf", "lbf/mph", "lbf/mph^2"]
    lbf = 4.4482216152605  # exact by definition (NIST SP 811)
    assert_allclose(us["f0"]["value"] * lbf, metric["f0"]["value"], rtol=2e-3)
    assert_allclose(us["f2"]["value"] * lbf / 1.609344**2, metric["f2"]["value"], rtol=2e-3)
    assert "lbf" in us["summary"]
    # SAE J1263 reference air, 20 degC and 98.21 kPa (memory), quoted in degF and inHg;
    # 0.00864 per K is 0.0048 per degF (a kelvin is 1.8 degF)
    method = us["reference_conditions"]["method"]
    assert "0.0048/degF" in method and "68 degF" in method and "29.00 inHg" in method
    assert "degC" not in method and "kPa" not in method


def test_speed_and_time_of_unequal_length_is_a_problem(api: ApiClient) -> None:
    body = {"mass": MASS, "runs": [{"time": list(range(12)), "speed": [50.0] * 11}]}
    r = api.post(URL, json=body)
    assert r.status_code == 422
    assert r.headers["content-type"].startswith("application/problem+json")


def test_run_that_does_not_slow_down_names_the_run(api: ApiClient) -> None:
    body = {
        "mass": MASS,
        "runs": [{"time": list(range(12)), "speed": [50.0 + k for k in range(12)]}],
    }
    r = api.post(URL, json=body)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "runs[0]"
