"""Printable sheets of the track answers (coast-down, shift window, weather) and their charts.

Each sheet is checked in text, HTML and PDF and in both unit systems: every label in the
caller's units, the cautions in full, the job block, the chart (inline SVG in HTML, vector
paths in PDF) and content negotiation as for the other sheets. PDFs are read back with
poppler's pdftotext (an independent PDF reader, Debian's poppler-utils). US bodies are the
metric demos converted with the exact factors of NIST SP 811 (1 mph = 1.609344 km/h,
1 lb = 0.45359237 kg, 1 inHg = 3.386389 kPa), or the invented US wagon.
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path
from typing import Any

import numpy as np
import pytest

from service.output.cautions import CAUTIONS
from service.output.chart_data_track import clip_polyline, coast_down_chart, shift_window_chart
from service.output.letterhead import get_letterhead
from service.output.pdf import render_pdf
from service.output.sheets_coast_down import coast_down_report
from service.output.svg_chart_track import track_svg
from service.schemas.coastdown import CoastDownRequest
from service.settings import get_settings
from tests.conftest import ApiClient, load_demo

POPPLER = shutil.which("pdftotext") is not None
KMH_PER_MPH, KG_PER_LB, KPA_PER_INHG = 1.609344, 0.45359237, 3.386389
SHEETS = {
    "coast-down": "/v1/reports/road-load/coast-down",
    "shift-window": "/v1/reports/shift-window",
    "weather": "/v1/reports/weather-correction",
}
JSON_ROUTES = {
    "coast-down": "/v1/road-load/coast-down",
    "shift-window": "/v1/shift-window",
    "weather": "/v1/weather-correction",
}
# labels a sheet in these units must show, and labels of the other system it must not
LABELS = {
    ("coast-down", "metric"): (["km/h", "N/(km/h)", "kg", "degC", "kPa"], ["mph", "lbf"]),
    ("coast-down", "us"): (["mph", "lbf/mph", "lb", "degF", "inHg"], ["km/h", "kPa"]),
    ("shift-window", "metric"): (["N*m", "kg", "rpm"], ["lbf", "mph"]),
    ("shift-window", "us"): (["lbf*ft", "lb", "rpm", "660.0 ft"], ["N*m", "km/h"]),
    ("weather", "metric"): (["degC", "kPa", "km/h", "N*m"], ["degF", "inHg", "mph"]),
    ("weather", "us"): (["degF", "inHg", "mph", "ft"], ["degC", "kPa", "km/h", "kg/m^3"]),
}


def _wagon_us() -> dict[str, Any]:
    body = load_demo("demo_wagon_converter_us")
    del body["shifts"]  # the acceleration run's own options
    return body


def _coast_down_us() -> dict[str, Any]:
    body = load_demo("demo_coastdown_metric")
    body["units"] = "us"
    body["mass"] = round(body["mass"] / KG_PER_LB, 1)
    for run in body["runs"]:
        run["speed"] = [round(v / KMH_PER_MPH, 2) for v in run["speed"]]
    c = body["conditions"]
    c["temperature"] = round(c["temperature"] * 9 / 5 + 32, 2)
    c["pressure"] = round(c["pressure"] / KPA_PER_INHG, 3)
    return body


def body_for(sheet: str, units: str) -> dict[str, Any]:
    """The demo body of a sheet in the given units."""
    if sheet == "coast-down":
        return load_demo("demo_coastdown_metric") if units == "metric" else _coast_down_us()
    if units == "metric":
        name = "demo_shift_window_metric" if sheet == "shift-window" else "demo_weather_metric"
        return load_demo(name)
    body = _wagon_us()
    if sheet == "shift-window":
        return {**body, "points": 7, "run": {"finish_distance": 660}}  # 1/8 mile
    return {
        **body,
        "reference": "SLIP-91",
        "taken_in": {"temperature": 88, "pressure": 28.7, "relative_humidity": 55},
        "predict_for": {"temperature": 54, "pressure": 29.65, "relative_humidity": 30},
        "slip": {"et": 14.62, "trap": 96.4},
    }


def _post(api: ApiClient, sheet: str, units: str, fmt: str, **extra: Any) -> bytes:
    r = api.post(SHEETS[sheet], params={"format": fmt}, json={**body_for(sheet, units), **extra})
    assert r.status_code == 200, r.text
    return r.content


def _pdf_text(pdf: bytes, tmp: Path) -> str:
    source = tmp / "sheet.pdf"
    source.write_bytes(pdf)
    out = subprocess.run(
        ["pdftotext", "-layout", str(source), "-"], capture_output=True, text=True, check=True
    )
    return out.stdout


def _flat(text: str) -> str:
    return " ".join(text.split())


@pytest.mark.parametrize("units", ["metric", "us"])
@pytest.mark.parametrize("sheet", list(SHEETS))
def test_text_sheet_speaks_the_callers_units_and_carries_every_caution(
    api: ApiClient, sheet: str, units: str
) -> None:
    text = _post(api, sheet, units, "text").decode("ascii")
    lines = text.splitlines()
    assert all(len(line) <= 80 for line in lines)
    assert lines[0].startswith("GEARWORK ") and "INPUTS" in lines and "CAUTIONS" in lines
    wanted, foreign = LABELS[(sheet, units)]
    for label in wanted:
        assert label in text, label
    for label in foreign:
        assert label not in text, label
    for caution in CAUTIONS:
        assert _flat(caution) in _flat(text)


@pytest.mark.parametrize("units", ["metric", "us"])
@pytest.mark.parametrize("sheet", list(SHEETS))
def test_html_sheet_has_its_chart_inline_and_the_cautions(
    api: ApiClient, sheet: str, units: str
) -> None:
    page = _post(api, sheet, units, "html").decode("utf-8")
    assert page.startswith("<!DOCTYPE html>") and "<h2>Cautions</h2>" in page
    charts = page.count("<svg ")
    assert charts == (0 if sheet == "weather" else 1)
    if sheet == "coast-down":
        assert "Road speed [" + ("mph" if units == "us" else "km/h") + "]" in page
    if sheet == "shift-window":
        assert "Time lost to the finish [s]" in page and "tolerance 0.01 s" in page


@pytest.mark.skipif(not POPPLER, reason="poppler-utils (pdftotext) not installed")
@pytest.mark.parametrize("units", ["metric", "us"])
@pytest.mark.parametrize("sheet", list(SHEETS))
def test_pdf_sheet_reads_back_with_labels_job_and_cautions(
    api: ApiClient, sheet: str, units: str, tmp_path: Path
) -> None:
    job = {"customer": "T. Adeyemi", "work_order": "WO-5120"}
    pdf = _post(api, sheet, units, "pdf", job=job)
    assert pdf.startswith(b"%PDF-")
    text = _pdf_text(pdf, tmp_path)
    assert "T. Adeyemi" in text and "WO-5120" in text
    wanted, _ = LABELS[(sheet, units)]
    for label in wanted:
        assert label in text, label
    assert "CAUTIONS" in text
    assert _flat(CAUTIONS[0]) in _flat(text)


@pytest.mark.parametrize(
    ("accept", "media"),
    [
        pytest.param(None, "text/html", id="no-accept"),
        pytest.param("application/json", "text/html", id="json"),
        pytest.param("*/*", "text/html", id="any"),
        pytest.param("application/pdf", "application/pdf", id="pdf"),
        pytest.param("text/plain", "text/plain", id="text"),
    ],
)
def test_track_sheet_format_follows_the_accept_header(
    api: ApiClient, accept: str | None, media: str
) -> None:
    headers = {"accept": accept} if accept is not None else {}
    r = api.post(SHEETS["weather"], json=body_for("weather", "metric"), headers=headers)
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].split(";")[0] == media
    assert "Accept" in r.headers["vary"].split(", ")


def test_format_query_overrides_accept_and_names_the_file(api: ApiClient) -> None:
    r = api.post(
        SHEETS["coast-down"],
        params={"format": "text"},
        json=body_for("coast-down", "metric"),
        headers={"accept": "application/pdf"},
    )
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].startswith("text/plain")
    disposition = r.headers["content-disposition"]
    assert disposition == 'inline; filename="road-load-coast-down-CD-HATCH-1.txt"'


@pytest.mark.parametrize("sheet", list(SHEETS))
def test_bad_input_gets_the_json_endpoints_problem(api: ApiClient, sheet: str) -> None:
    body = body_for(sheet, "metric")
    if sheet == "coast-down":
        body["runs"][0]["speed"][3] = -5.0
    elif sheet == "shift-window":
        body["drivetrain"]["gear_ratios"] = [2.0, 3.0]
    else:
        body["taken_in"]["pressure"] = 300.0
    sheet_answer = api.post(SHEETS[sheet], json=body)
    json_answer = api.post(JSON_ROUTES[sheet], json=body)
    assert sheet_answer.status_code == json_answer.status_code == 422
    assert sheet_answer.headers["content-type"] == "application/problem+json"
    assert sheet_answer.json()["field"] == json_answer.json()["field"]


def test_sheet_and_json_answer_agree_on_the_windows(api: ApiClient) -> None:
    body = body_for("shift-window", "metric")
    doc = api.post(JSON_ROUTES["shift-window"], json=body).json()
    text = _post(api, "shift-window", "metric", "text").decode("ascii")
    for window in doc["windows"]:
        assert window["line"] in text
    assert f"{doc['best_time']:.3f} s" in text


def test_weather_sheet_without_a_car_prints_the_air_only(api: ApiClient) -> None:
    body = {"reference": "AIR-1", "taken_in": {"temperature": 31, "pressure": 97.2}}
    r = api.post(SHEETS["weather"], params={"format": "text"}, json=body)
    assert r.status_code == 200, r.text
    lines = r.text.splitlines()
    assert "Slip" not in lines and "Predicted" not in r.text
    altitude = api.post(JSON_ROUTES["weather"], json=body).json()["taken_in"]["density_altitude"]
    assert f"Density altitude: {altitude:,.0f} m" in r.text


@pytest.mark.parametrize("units", ["metric", "us"])
def test_coast_down_chart_traces_follow_the_logged_speed(api: ApiClient, units: str) -> None:
    # the line is each run's own fit integrated from its best start: it must stay within
    # the noise of the logged samples (the fit's own residual, in the caller's units)
    body = body_for("coast-down", units)
    doc = api.post(JSON_ROUTES["coast-down"], json=body).json()
    chart = coast_down_chart(CoastDownRequest.model_validate(body), doc)
    assert chart.y_label.endswith("[mph]" if units == "us" else "[km/h]")
    for series, run in zip(chart.series, doc["runs"], strict=True):
        drawn = np.interp(series.mark_x, series.x, series.y)
        rms = float(np.sqrt(np.mean((drawn - series.mark_y) ** 2)))
        assert rms < 1.5 * run["residual_rms"]


def test_shift_window_chart_marks_each_window_under_the_tolerance(api: ApiClient) -> None:
    doc = api.post(JSON_ROUTES["shift-window"], json=body_for("shift-window", "metric")).json()
    chart = shift_window_chart(doc)
    assert chart is not None
    reached = [w for w in doc["windows"] if w["reached"]]
    assert [s.label for s in chart.series] == [f"{w['from_gear']}-{w['to_gear']}" for w in reached]
    assert chart.level == doc["tolerance"]
    for series, window in zip(chart.series, reached, strict=True):
        assert series.band == (window["low_rpm"], window["high_rpm"])
        assert series.best == (window["best_rpm"], 0.0)
    lo, hi = chart.x_range
    assert lo < min(w["low_rpm"] for w in reached) and hi > max(w["high_rpm"] for w in reached)


def test_clipped_line_keeps_every_point_inside_and_meets_the_edges() -> None:
    # a V through the box's top edge: the pieces meet y = 1 where the closed-form lines
    # y = 2 - 4x and y = 4x - 2 do, at x = 0.25 and 0.75
    x = np.array([0.0, 0.5, 1.0])
    y = np.array([2.0, 0.0, 2.0])
    pieces = clip_polyline(x, y, (0.0, 1.0), (0.0, 1.0))
    assert len(pieces) == 1
    px, py = pieces[0]
    np.testing.assert_allclose(px, [0.25, 0.5, 0.75], rtol=1e-12)
    np.testing.assert_allclose(py, [1.0, 0.0, 1.0], rtol=1e-12)
    two = clip_polyline(np.array([0.0, 0.5, 1.0]), np.array([0.5, 3.0, 0.5]), (0, 1), (0, 1))
    assert len(two) == 2


def test_shift_window_sheet_before_the_first_change_has_no_chart(api: ApiClient) -> None:
    body = {**body_for("shift-window", "metric"), "run": {"finish_distance": 18}}
    page = api.post(SHEETS["shift-window"], params={"format": "html"}, json=body)
    assert page.status_code == 200, page.text
    assert "<svg " not in page.text and "no: its rpm does not matter" in page.text
    pdf = api.post(SHEETS["shift-window"], params={"format": "pdf"}, json=body)
    assert pdf.status_code == 200 and pdf.content.startswith(b"%PDF-")


@pytest.mark.parametrize("sheet", list(SHEETS))
def test_track_sheet_carries_the_shops_letterhead(
    api: ApiClient, sheet: str, monkeypatch: pytest.MonkeyPatch
) -> None:
    monkeypatch.setenv("GEARWORK_SHOP_NAME", "Quarry Road Dyno")
    monkeypatch.setenv("GEARWORK_SHOP_ADDRESS", "4 Quarry Road|Eastfold 2290")
    get_settings.cache_clear()
    get_letterhead.cache_clear()
    try:
        job = {"technician": "M. Ilunga", "date": "2026-12-02"}  # a body of its own: no cache
        text = _post(api, sheet, "metric", "text", job=job).decode("ascii")
        html = _post(api, sheet, "metric", "html", job=job).decode("utf-8")
    finally:
        monkeypatch.undo()
        get_settings.cache_clear()
        get_letterhead.cache_clear()
    assert text.splitlines()[:3] == ["Quarry Road Dyno", "4 Quarry Road", "Eastfold 2290"]
    assert "Technician:     M. Ilunga" in text
    assert "Quarry Road Dyno" in html and "M. Ilunga" in html


def test_same_answer_draws_the_same_chart_and_pdf_bytes(api: ApiClient) -> None:
    # drawn twice from the same answer, past the result cache: nothing depends on the clock
    body = body_for("coast-down", "metric")
    doc = api.post(JSON_ROUTES["coast-down"], json=body).json()
    request = CoastDownRequest.model_validate(body)
    report = coast_down_report(doc, request.units)
    drawn = [coast_down_chart(request, doc) for _ in range(2)]
    assert track_svg(drawn[0]) == track_svg(drawn[1])
    assert render_pdf(report, drawn[0], "a4") == render_pdf(report, drawn[1], "a4")
