"""Golden answers: every demo request in tests/data replayed against the answer it gave before.

A refactor must not change an answer unnoticed. Each case posts one invented demo body (or
dyno export) and compares the response with the file kept in ``tests/data/golden/``.

* Text sheets and SVG charts are compared byte for byte.
* JSON answers are compared after rounding every float to 10 significant figures: on one
  machine the bodies are byte-identical from run to run, but NumPy's vectorised maths may
  differ in the last bit between CPUs, and CI runs on another machine.

* Answers of a fit iterated to a tolerance (the coast-down fit: least squares over an ODE
  solution, scipy's default tolerances) move in the sixth or seventh figure between CPUs,
  since each iteration's rounding moves where it stops. Their JSON numbers are compared
  within a relative 1e-5, and their sheets (alone or as a JSON summary) with runs of spaces
  collapsed and each number within a relative 1e-4, one unit of the five figures they print.

``GEARWORK_GOLDEN_EXACT=1`` compares JSON byte for byte too (on the machine that wrote the files).

When an answer changes on purpose, rewrite the files with
``GEARWORK_WRITE_GOLDEN=1 python -m pytest tests/test_golden_answers.py`` and review the diff.
"""

from __future__ import annotations

import json
import math
import os
import re
from pathlib import Path
from typing import Any

import pytest

from tests.conftest import DATA, ApiClient, load_demo

GOLDEN = DATA / "golden"
WRITE = os.environ.get("GEARWORK_WRITE_GOLDEN") == "1"
EXACT = os.environ.get("GEARWORK_GOLDEN_EXACT") == "1"

# (demo body, URL, golden file name)
CASES: list[tuple[str, str, str]] = [
    ("demo_coupe_us", "/v1/shift-plan", "shift_plan_coupe_us.json"),
    ("demo_hatch_metric", "/v1/shift-plan", "shift_plan_hatch_metric.json"),
    ("demo_coupe_us", "/v1/reports/shift-plan?format=text", "shift_plan_coupe_us.txt"),
    ("demo_coupe_us", "/v1/charts/tractive-force?format=svg", "chart_coupe_us.svg"),
    ("demo_sedan_run_metric", "/v1/acceleration-run", "run_sedan_metric.json"),
    ("demo_sedan_run_metric", "/v1/reports/acceleration-run?format=text", "run_sedan.txt"),
    ("demo_wagon_converter_us", "/v1/acceleration-run", "run_wagon_converter_us.json"),
    ("demo_comparison_us", "/v1/comparison", "comparison_us.json"),
    ("demo_comparison_us", "/v1/reports/comparison?format=text", "comparison_us.txt"),
    ("demo_before_after_metric", "/v1/comparison", "comparison_before_after_metric.json"),
    ("demo_sweep_us", "/v1/final-drive-sweep", "final_drive_sweep_us.json"),
    ("demo_sweep_us", "/v1/reports/final-drive-sweep?format=text", "final_drive_sweep_us.txt"),
    ("demo_gear_spacing_us", "/v1/gear-spacing", "gear_spacing_us.json"),
    ("demo_speedometer_us", "/v1/speedometer-correction", "speedometer_us.json"),
    ("demo_dyno_correction_metric", "/v1/dyno-correction", "dyno_correction_metric.json"),
    ("demo_chassis_metric", "/v1/chassis-dyno/convert", "chassis_metric.json"),
    ("demo_coastdown_metric", "/v1/road-load/coast-down", "coast_down_metric.json"),
    (
        "demo_coastdown_metric",
        "/v1/reports/road-load/coast-down?format=text",
        "coast_down_metric.txt",
    ),
    ("demo_shift_window_metric", "/v1/shift-window", "shift_window_metric.json"),
    (
        "demo_shift_window_metric",
        "/v1/reports/shift-window?format=text",
        "shift_window_metric.txt",
    ),
    ("demo_weather_metric", "/v1/weather-correction", "weather_metric.json"),
    ("demo_weather_metric", "/v1/reports/weather-correction?format=text", "weather_metric.txt"),
    ("demo_log_text_request_metric", "/v1/log-analysis", "log_analysis_metric.json"),
    ("demo_calibration_metric", "/v1/calibration/pass", "calibration_pass_metric.json"),
    ("demo_calibration_us", "/v1/calibration/pass", "calibration_pass_us.json"),
    (
        "demo_calibration_metric",
        "/v1/reports/calibration/pass?format=text",
        "calibration_pass_metric.txt",
    ),
]


# answers of iterated fits, and the relative tolerance of their numbers
SHEET_RTOL = 1e-4  # one unit of the five figures a sheet prints
ITERATED: dict[str, float] = {"coast_down_metric.json": 1e-5, "coast_down_metric.txt": SHEET_RTOL}
_NUMBER = re.compile(r"-?\d+(?:\.\d+)?(?:[eE][+-]?\d+)?")


def _close(got: Any, kept: Any, rtol: float) -> bool:
    """Whether two JSON values agree, floats within ``rtol`` of each other."""
    if isinstance(got, float) and isinstance(kept, float):
        return math.isclose(got, kept, rel_tol=rtol, abs_tol=1e-12)
    if isinstance(got, list) and isinstance(kept, list):
        return len(got) == len(kept) and all(
            _close(a, b, rtol) for a, b in zip(got, kept, strict=True)
        )
    if isinstance(got, dict) and isinstance(kept, dict):
        return got.keys() == kept.keys() and all(_close(got[k], kept[k], rtol) for k in got)
    if isinstance(got, str) and isinstance(kept, str) and got != kept:
        return _same_sheet(got, kept, SHEET_RTOL)  # a summary sheet carried in the JSON
    return bool(got == kept)


def _same_sheet(got: str, kept: str, rtol: float) -> bool:
    """Whether two text sheets agree: the words alike, runs of spaces collapsed, and each
    number within ``rtol``."""
    a, b = (" ".join(t.split()) for t in (got, kept))
    if _NUMBER.split(a) != _NUMBER.split(b):
        return False
    pairs = zip(_NUMBER.findall(a), _NUMBER.findall(b), strict=True)
    return all(math.isclose(float(x), float(y), rel_tol=rtol) for x, y in pairs)


def _rounded(value: Any) -> Any:
    """The JSON value with every float rounded to 10 significant figures."""
    if isinstance(value, float):
        return float(f"{value:.10g}")
    if isinstance(value, list):
        return [_rounded(v) for v in value]
    if isinstance(value, dict):
        return {k: _rounded(v) for k, v in value.items()}
    return value


def _check(name: str, body: bytes) -> None:
    path = GOLDEN / name
    if WRITE:
        GOLDEN.mkdir(exist_ok=True)
        path.write_bytes(body)
        return
    kept = path.read_bytes()
    if name in ITERATED and not EXACT:
        rtol = ITERATED[name]
        if name.endswith(".json"):
            assert _close(json.loads(body), json.loads(kept), rtol), name
        else:
            assert _same_sheet(body.decode(), kept.decode(), rtol), name
    elif name.endswith(".json") and not EXACT:
        assert _rounded(json.loads(body)) == _rounded(json.loads(kept)), name
    else:
        assert body == kept, name


@pytest.mark.parametrize(("demo", "url", "name"), CASES, ids=[c[2] for c in CASES])
def test_demo_request_gives_its_golden_answer(
    api: ApiClient, demo: str, url: str, name: str
) -> None:
    r = api.post(url, json=load_demo(demo))
    assert r.status_code == 200, r.text
    _check(name, r.content)


@pytest.mark.parametrize("export", ["demo_dyno_export.csv", "dyno_wheel_columns_us.csv"])
def test_demo_dyno_export_gives_its_golden_answer(api: ApiClient, export: str) -> None:
    raw = (DATA / export).read_bytes()
    units = "us" if export.endswith("_us.csv") else "metric"
    r = api.post(
        f"/v1/torque-curves/import?units={units}",
        files={"file": (export, raw, "text/csv")},
    )
    assert r.status_code == 200, r.text
    _check(Path(export).stem + ".json", r.content)
