"""POST /v1/calibration/pass through httpx. The cars and passes are invented.

The pass is made by the service itself: POST /v1/acceleration-run with known figures gives
the trace, resampled to a 20 Hz logger and noised with a fixed seed; the calibration must
return the figures the run was made with, within its own reported uncertainty.
"""

from __future__ import annotations

import copy
from typing import Any

import numpy as np
import pytest
import scipy.constants as sc
from numpy.testing import assert_allclose

from tests.conftest import ApiClient, load_demo

URL = "/v1/calibration/pass"
K_TRUE, ETA_TRUE, CDA_TRUE = 1.35, 0.86, 0.74  # [-], [-], [m^2]
INERTIA = {"engine": 0.20, "driveshaft": 0.05, "wheels": 3.2}  # the caller's [kg*m^2]
RATE_HZ = 20.0
NOISE_KM_H = 0.3


def caller_car() -> dict[str, Any]:
    """The invented sedan with the caller's figures: efficiency 0.9, Cd*A 0.675 m^2."""
    car = load_demo("demo_sedan_run_metric")
    car["vehicle"]["inertia"] = dict(INERTIA)
    return car


def true_car() -> dict[str, Any]:
    """The sedan with the true figures and fixed shift rpms."""
    car = caller_car()
    car["drivetrain"]["efficiency"] = ETA_TRUE
    car["vehicle"]["inertia"] = {k: v * K_TRUE for k, v in INERTIA.items()}
    car["vehicle"]["road_load"] = {"drag_area": CDA_TRUE, "rolling_coefficient": 0.011}
    car["shifts"] = {"criterion": "custom", "rpm": [6300, 6400, 6400, 6400, 6400]}
    return car


@pytest.fixture(scope="module")
def trace(api: ApiClient) -> dict[str, list[float]]:
    """The true car's run by the service, its trace sampled finely."""
    car = {**true_car(), "run": {"trace_points": 2000, "finish_distance": 420}}
    r = api.post("/v1/acceleration-run", json=car)
    assert r.status_code == 200, r.text
    out: dict[str, list[float]] = r.json()["trace"]
    return out


def logged(tr: dict[str, list[float]], seed: int) -> dict[str, list[float]]:
    """The true run as a 20 Hz logger saw it: a second at rest, speed and rpm with noise."""
    t = np.arange(0.0, tr["time"][-1], 1.0 / RATE_HZ)
    v = np.interp(t, tr["time"], tr["speed"])
    rpm = np.interp(t, tr["time"], tr["rpm"])
    rng = np.random.default_rng(seed)
    lead = int(RATE_HZ)
    time = np.r_[np.arange(lead) / RATE_HZ, t + 1.0 + 0.02]
    speed = np.r_[np.zeros(lead), np.maximum(v + rng.normal(0.0, NOISE_KM_H, v.size), 0.0)]
    rpm = np.r_[np.full(lead, 900.0), rpm + rng.normal(0.0, 15.0, rpm.size)]
    return {
        "time": time.round(3).tolist(),
        "speed": speed.round(2).tolist(),
        "rpm": rpm.round(0).tolist(),
    }


def metric_body(tr: dict[str, list[float]], seed: int) -> dict[str, Any]:
    return {**caller_car(), "reference": "CAL-T1", "log": logged(tr, seed)}


@pytest.fixture(scope="module")
def metric(api: ApiClient, trace: dict[str, list[float]]) -> dict[str, Any]:
    r = api.post(URL, json=metric_body(trace, 11))
    assert r.status_code == 200, r.text
    return dict(r.json())


def test_a_service_run_is_recovered_within_three_reported_sigma(metric: dict[str, Any]) -> None:
    figs = metric["figures"]
    for name, true, widest in (
        ("mass_factor", K_TRUE, 0.15),
        ("efficiency", ETA_TRUE, 0.02),
        ("drag_area", CDA_TRUE, 0.08),
    ):
        f = figs[name]
        assert abs(f["value"] - true) <= 3.0 * f["std_error"], (name, f)
        assert 0.0 < f["std_error"] < widest, (name, f)  # sensible: neither zero nor vast
        assert f["fitted"] and not f["at_bound"]
    # the priors are the caller's figures: k = 1, efficiency 0.9, Cd*A 0.30 x 2.25 m^2
    assert_allclose([figs[n]["prior"] for n in figs], [1.0, 0.9, 0.675], rtol=1e-9)
    fit = metric["fit"]
    assert fit["start"] == "standing" and fit["gears_from"] == "rpm"
    assert_allclose(fit["launch_time"], 1.02, atol=0.05)
    # white noise of 0.3 km/h: the residual RMS is the noise (within 20 %)
    assert_allclose(fit["residual_rms"], NOISE_KM_H, rtol=0.2)
    assert fit["residual_rms_before"] > 3.0 * fit["residual_rms"]
    assert [g["gear"] for g in metric["gears"]] == [1, 2, 3]
    assert all(abs(g["time_error"]) < 0.1 for g in metric["gears"][:-1])


def test_the_answer_carries_summary_warnings_and_cautions(metric: dict[str, Any]) -> None:
    assert metric["reference"] == "CAL-T1" and metric["cautions"]
    assert metric["units"]["speed"] == "km/h"
    lines = metric["summary"].splitlines()
    assert lines[0].startswith("GEARWORK PASS CALIBRATION")
    assert all(len(line) <= 80 and line.isascii() for line in lines)
    m = np.asarray(metric["correlation"]["matrix"])
    assert_allclose(np.diag(m), 1.0) and assert_allclose(m, m.T)
    assert len(metric["trace"]["time"]) <= 400


@pytest.mark.parametrize(
    "route", ["/v1/acceleration-run", "/v1/shift-plan", "/v1/final-drive-sweep"]
)
def test_the_calibrated_blocks_paste_into_the_run_plan_and_sweep(
    api: ApiClient, metric: dict[str, Any], route: str
) -> None:
    body = caller_car()
    body.update(copy.deepcopy(metric["calibrated"]))
    if route == "/v1/final-drive-sweep":
        body["ratios"] = [3.7, 3.94, 4.1]
    r = api.post(route, json=body)
    assert r.status_code == 200, r.text


def test_the_calibrated_car_runs_the_quarter_mile_as_the_true_one(
    api: ApiClient, metric: dict[str, Any]
) -> None:
    def et(car: dict[str, Any]) -> float:
        car["shifts"] = true_car()["shifts"]
        r = api.post("/v1/acceleration-run", json=car)
        assert r.status_code == 200, r.text
        return float(r.json()["finish"]["elapsed"])

    calibrated = {**caller_car(), **copy.deepcopy(metric["calibrated"])}
    assert abs(et(calibrated) - et(true_car())) < 0.03  # [s]
    assert abs(et(caller_car()) - et(true_car())) > 0.2  # the caller's own figures miss it


def us_body(tr: dict[str, list[float]], seed: int) -> dict[str, Any]:
    """The same pass and car in US units, converted with scipy.constants' exact factors."""
    body = metric_body(tr, seed)
    lb, inch, ft = sc.pound, sc.inch, sc.foot
    body["units"] = "us"
    body["log"]["speed"] = [v / 3.6 / sc.mile * sc.hour for v in body["log"]["speed"]]
    veh = body["vehicle"]
    veh["mass"] /= lb
    veh["wheelbase"] /= 1000 * inch
    veh["cg_height"] /= 1000 * inch
    veh["road_load"]["frontal_area"] /= ft**2
    veh["air"] = {"temperature": 20 * 1.8 + 32, "altitude": 150 / ft, "relative_humidity": 50}
    veh["inertia"] = {k: v / (lb * ft**2) for k, v in INERTIA.items()}
    body["engine"]["curve"]["torque"] = [
        t / (sc.pound_force * ft) for t in body["engine"]["curve"]["torque"]
    ]
    return body


def test_us_units_give_the_same_fit_in_pounds_feet_and_mph(
    api: ApiClient, metric: dict[str, Any], trace: dict[str, list[float]]
) -> None:
    r = api.post(URL, json=us_body(trace, 11))
    assert r.status_code == 200, r.text
    us = r.json()
    assert us["units"]["speed"] == "mph" and us["units"]["area"] == "ft^2"
    for name in ("mass_factor", "efficiency"):
        assert_allclose(us["figures"][name]["value"], metric["figures"][name]["value"], rtol=2e-3)
    # scipy.constants: 1 ft^2 = 0.09290304 m^2; 1 mph = 0.44704 m/s
    assert_allclose(
        us["figures"]["drag_area"]["value"] * sc.foot**2,
        metric["figures"]["drag_area"]["value"],
        rtol=2e-3,
    )
    assert_allclose(
        us["fit"]["residual_rms"] * sc.mile / sc.hour,
        metric["fit"]["residual_rms"] / 3.6,
        rtol=0.02,
    )
    # the calibrated block is in the caller's units and pastes into a US run
    block = us["calibrated"]["vehicle"]
    assert_allclose(
        block["inertia"]["wheels"] * sc.pound * sc.foot**2,
        metric["calibrated"]["vehicle"]["inertia"]["wheels"],
        rtol=2e-3,
    )
    # Cd = CdA / A in either system (the frontal area converted with the same factor)
    assert_allclose(
        block["road_load"]["drag_coefficient"],
        metric["calibrated"]["vehicle"]["road_load"]["drag_coefficient"],
        rtol=2e-3,
    )
    run = {**us_body(trace, 11), **us["calibrated"]}
    run.pop("log")
    assert api.post("/v1/acceleration-run", json=run).status_code == 200


def _bad(body: dict[str, Any], path: str, value: Any) -> dict[str, Any]:
    out = copy.deepcopy(body)
    keys = path.split(".")
    node = out
    for k in keys[:-1]:
        node = node[k]
    node[keys[-1]] = value
    return out


@pytest.mark.parametrize(
    ("path", "value", "field"),
    [
        pytest.param("log.speed", [1.0] * 25, "log.speed", id="speed-length"),
        pytest.param("vehicle.mass", 0.0, "vehicle.mass", id="mass-zero"),
        pytest.param("options", {"smoothing_window": 5}, "options.smoothing_window", id="window"),
        pytest.param(
            "log", {"text": "time [s];speed [km/h]\n0;1\n0.1;x\n"}, "log.text", id="log-text"
        ),
        pytest.param(
            "log",
            {"time": [0.1 * i for i in range(40)], "speed": [0.0] * 40},
            "log",
            id="never-moves",
        ),
        pytest.param("engine.rev_limit_rpm", 50.0, "engine.rev_limit_rpm", id="rev-limit"),
    ],
)
def test_bad_input_is_a_422_problem_naming_the_field(
    api: ApiClient, trace: dict[str, list[float]], path: str, value: Any, field: str
) -> None:
    body = _bad(metric_body(trace, 1), path, value)
    r = api.post(URL, json=body)
    assert r.status_code == 422, r.text
    problem = r.json()
    assert r.headers["content-type"].startswith("application/problem+json")
    assert problem["field"].startswith(field), problem


def test_a_negative_logged_speed_is_named_with_its_index(
    api: ApiClient, trace: dict[str, list[float]]
) -> None:
    body = metric_body(trace, 1)
    body["log"]["speed"][5] = -3.0
    r = api.post(URL, json=body)
    assert r.status_code == 422
    assert r.json()["field"] == "log.speed[5]"


def test_the_reported_uncertainty_matches_the_scatter_over_seeds(
    api: ApiClient, trace: dict[str, list[float]]
) -> None:
    # six fixed seeds: each figure within 3 sigma of the truth, and the errors in units of
    # their own sigma scatter like a standard normal (RMS between 0.5 and 2), so sigma is
    # neither too small nor too large
    z = []
    for seed in range(6):
        r = api.post(URL, json=metric_body(trace, seed))
        assert r.status_code == 200, r.text
        f = r.json()["figures"]
        true = {"mass_factor": K_TRUE, "efficiency": ETA_TRUE, "drag_area": CDA_TRUE}
        z.append([(f[n]["value"] - t) / f[n]["std_error"] for n, t in true.items()])
    scores = np.asarray(z)
    assert np.all(np.abs(scores) <= 3.0), scores
    rms = np.sqrt(np.mean(scores**2, axis=0))
    assert np.all((rms > 0.5) & (rms < 2.0)), rms


def test_a_coast_down_road_load_keeps_f0_f1_and_gets_the_fitted_drag_as_f2(
    api: ApiClient, trace: dict[str, list[float]]
) -> None:
    body = metric_body(trace, 2)
    body["vehicle"]["road_load"] = {"coast_down": [160.0, 0.0, 0.033]}  # N, N/(km/h), ...^2
    r = api.post(URL, json=body)
    assert r.status_code == 200, r.text
    doc = r.json()
    f0, f1, f2 = doc["calibrated"]["vehicle"]["road_load"]["coast_down"]
    assert (f0, f1) == (160.0, 0.0)
    # Gillespie ch. 2: F2 = 0.5 rho CdA; per (km/h)^2 divide by 3.6^2 (exact); the air of
    # 20 degC at 150 m is about 1.19 kg/m^3 (ISO 2533 and the ideal gas law, from memory)
    rho = f2 * 3.6**2 / (0.5 * doc["figures"]["drag_area"]["value"])
    assert_allclose(rho, 1.19, rtol=0.02)
    run = {**caller_car(), **doc["calibrated"]}
    assert api.post("/v1/acceleration-run", json=run).status_code == 200


@pytest.mark.parametrize(
    ("demo", "speed", "area"),
    [
        ("demo_calibration_metric", "0.36 km/h", "0.1 m^2"),
        ("demo_calibration_us", "0.22 mph", "1.1 ft^2"),
    ],
)
def test_the_priors_are_worded_in_the_callers_units(
    api: ApiClient, demo: str, speed: str, area: str
) -> None:
    # 0.1 m/s and 0.1 m^2 in the caller's units (scipy.constants: mile, hour, foot)
    per_mph = sc.mile / sc.hour
    assert f"{0.1 / per_mph:.2g} mph" == "0.22 mph"
    assert f"{0.1 / sc.foot**2:.2g} ft^2" == "1.1 ft^2"
    r = api.post(URL, json=load_demo(demo))
    assert r.status_code == 200, r.text
    priors = r.json()["priors"]
    assert speed in priors and area in priors
    assert "m/s" not in priors
    assert "Priors: Each figure" in r.json()["summary"]
