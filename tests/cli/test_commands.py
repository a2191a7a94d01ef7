"""The ``gearwork`` subcommands answer exactly what the endpoints answer for the same body.

The outside reference here is the service itself over HTTP (the in-process test client):
the same demo body through the command and through the route must give the same bytes,
and a bad body the same RFC 9457 problem details (RFC 9457, section 3) with exit status 2.
"""

from __future__ import annotations

import json
from typing import Any

import pytest
from click.testing import CliRunner

from service.cli.endpoints import ENDPOINTS
from service.cli.main import cli
from tests.conftest import DATA, ApiClient

# subcommand, route, demo body in tests/data
FAMILIES = [
    pytest.param("shift-plan", "/v1/shift-plan", "demo_coupe_us.json", id="shift-plan"),
    pytest.param("run", "/v1/acceleration-run", "demo_sedan_run_metric.json", id="run"),
    pytest.param("compare", "/v1/comparison", "demo_comparison_us.json", id="compare"),
    pytest.param("sweep", "/v1/final-drive-sweep", "demo_sweep_us.json", id="sweep"),
    pytest.param("spacing", "/v1/gear-spacing", "demo_gear_spacing_us.json", id="spacing"),
    pytest.param(
        "speedometer", "/v1/speedometer-correction", "demo_speedometer_us.json", id="speedometer"
    ),
    pytest.param(
        "dyno-correct",
        "/v1/dyno-correction",
        "demo_dyno_correction_metric.json",
        id="dyno-correct",
    ),
    pytest.param(
        "log-check", "/v1/log-analysis", "demo_log_text_request_metric.json", id="log-check"
    ),
    pytest.param("chassis", "/v1/chassis-dyno/convert", "demo_chassis_metric.json", id="chassis"),
    pytest.param(
        "coast-down", "/v1/road-load/coast-down", "demo_coastdown_metric.json", id="coast-down"
    ),
    pytest.param(
        "shift-window", "/v1/shift-window", "demo_shift_window_metric.json", id="shift-window"
    ),
    pytest.param("weather", "/v1/weather-correction", "demo_weather_metric.json", id="weather"),
    pytest.param(
        "calibrate", "/v1/calibration/pass", "demo_calibration_metric.json", id="calibrate"
    ),
]


def invoke(*args: str, stdin: bytes | None = None) -> Any:
    return CliRunner().invoke(cli, list(args), input=stdin, catch_exceptions=False)


def http_json(api: ApiClient, route: str, body: bytes) -> Any:
    r = api.post(route, content=body, headers={"content-type": "application/json"})
    assert r.status_code == 200, r.text
    return r


def test_every_endpoint_family_has_a_subcommand() -> None:
    names = {p.values[0] for p in FAMILIES} | {"import"}
    assert {ep.name for ep in ENDPOINTS} == names
    assert names | {"batch", "serve"} <= set(cli.commands)


def test_every_calculation_route_and_sheet_is_reachable_from_the_command_line(
    api: ApiClient,
) -> None:
    # the service's own schema lists its routes: every JSON calculation has a subcommand and
    # every printable sheet or chart is one of a subcommand's formats
    paths = set(api.get("/openapi.json").json()["paths"])
    json_routes = {p for p in paths if p.startswith("/v1/") and "/reports/" not in p}
    json_routes -= {p for p in paths if "/charts/" in p}
    assert json_routes == {ep.path for ep in ENDPOINTS}
    drawn = {p for p in paths if "/reports/" in p or "/charts/" in p}
    assert drawn == {r for ep in ENDPOINTS for r in (ep.report, ep.chart) if r is not None}


@pytest.mark.parametrize(("command", "route", "demo"), FAMILIES)
def test_json_output_equals_the_http_answer_byte_for_byte(
    api: ApiClient, command: str, route: str, demo: str
) -> None:
    body = (DATA / demo).read_bytes()
    out = invoke(command, str(DATA / demo), "--format", "json")
    assert out.exit_code == 0, out.stderr
    assert out.stdout_bytes == http_json(api, route, body).content


@pytest.mark.parametrize(
    ("command", "route", "demo"),
    [p for p in FAMILIES if p.values[0] not in {"dyno-correct"}],
)
def test_default_output_is_the_answers_summary(
    api: ApiClient, command: str, route: str, demo: str
) -> None:
    body = (DATA / demo).read_bytes()
    out = invoke(command, "-", stdin=body)
    assert out.exit_code == 0, out.stderr
    assert out.stdout == http_json(api, route, body).json()["summary"] + "\n"


def test_dyno_import_equals_the_http_answer(api: ApiClient) -> None:
    text = (DATA / "demo_dyno_export.csv").read_bytes()
    out = invoke("import", str(DATA / "demo_dyno_export.csv"), "-p", "units=us", "-f", "json")
    r = api.post(
        "/v1/torque-curves/import?units=us", content=text, headers={"content-type": "text/csv"}
    )
    assert r.status_code == 200, r.text
    assert out.exit_code == 0, out.stderr
    assert out.stdout_bytes == r.content


@pytest.mark.parametrize(
    ("fmt", "accept", "route"),
    [
        pytest.param("text", "text/plain", "/v1/reports/shift-plan", id="text-report"),
        pytest.param("html", "text/html", "/v1/reports/shift-plan", id="html-report"),
        pytest.param("svg", "image/svg+xml", "/v1/charts/tractive-force", id="svg-chart"),
    ],
)
def test_report_and_chart_formats_equal_the_http_answer(
    api: ApiClient, tmp_path: Any, fmt: str, accept: str, route: str
) -> None:
    body = (DATA / "demo_coupe_us.json").read_bytes()
    target = tmp_path / f"plan.{fmt}"
    out = invoke("shift-plan", str(DATA / "demo_coupe_us.json"), "-f", fmt, "-o", str(target))
    r = api.post(
        route, content=body, headers={"content-type": "application/json", "accept": accept}
    )
    assert r.status_code == 200, r.text
    assert out.exit_code == 0, out.stderr
    assert target.read_bytes() == r.content


@pytest.mark.parametrize(
    ("command", "route", "demo"),
    [
        pytest.param(
            "coast-down",
            "/v1/reports/road-load/coast-down",
            "demo_coastdown_metric.json",
            id="coast-down",
        ),
        pytest.param(
            "shift-window",
            "/v1/reports/shift-window",
            "demo_shift_window_metric.json",
            id="window",
        ),
        pytest.param(
            "weather", "/v1/reports/weather-correction", "demo_weather_metric.json", id="weather"
        ),
    ],
)
@pytest.mark.parametrize(("fmt", "accept"), [("text", "text/plain"), ("pdf", "application/pdf")])
def test_track_sheets_are_formats_of_their_subcommands(
    api: ApiClient, tmp_path: Any, command: str, route: str, demo: str, fmt: str, accept: str
) -> None:
    target = tmp_path / f"sheet.{fmt}"
    out = invoke(command, str(DATA / demo), "-f", fmt, "-o", str(target))
    r = api.post(
        route,
        content=(DATA / demo).read_bytes(),
        headers={"content-type": "application/json", "accept": accept},
    )
    assert r.status_code == 200, r.text
    assert out.exit_code == 0, out.stderr
    assert target.read_bytes() == r.content


def test_pdf_report_is_written_to_the_output_file(tmp_path: Any) -> None:
    target = tmp_path / "run.pdf"
    demo = str(DATA / "demo_sedan_run_metric.json")
    out = invoke("run", demo, "--format", "pdf", "-o", str(target))
    assert out.exit_code == 0, out.stderr
    assert target.read_bytes().startswith(b"%PDF-")


@pytest.mark.parametrize(
    ("command", "route", "body"),
    [
        pytest.param("shift-plan", "/v1/shift-plan", b'{"units": "us"}', id="missing-fields"),
        pytest.param("run", "/v1/acceleration-run", b'{"units": ', id="not-json"),
        pytest.param(
            "spacing",
            "/v1/gear-spacing",
            json.dumps(
                {
                    **json.loads((DATA / "demo_gear_spacing_us.json").read_text()),
                    "units": "imperial",
                }
            ).encode(),
            id="bad-enum",
        ),
    ],
)
def test_bad_input_gives_the_same_problem_details_and_exit_status_2(
    api: ApiClient, command: str, route: str, body: bytes
) -> None:
    out = invoke(command, stdin=body)
    r = api.post(route, content=body, headers={"content-type": "application/json"})
    assert out.exit_code == 2
    assert out.stdout == ""
    assert r.status_code in {400, 422}
    assert json.loads(out.stderr) == r.json()
    assert "Traceback" not in out.stderr


def test_a_core_error_gives_the_same_problem_details(api: ApiClient) -> None:
    body = json.loads((DATA / "demo_coupe_us.json").read_text())
    body["drivetrain"]["gear_ratios"] = [3.1, 3.3, 1.48]  # not descending: core rejects it
    raw = json.dumps(body).encode()
    out = invoke("shift-plan", stdin=raw)
    r = api.post("/v1/shift-plan", content=raw, headers={"content-type": "application/json"})
    assert r.status_code == 422, r.text
    assert out.exit_code == 2
    assert json.loads(out.stderr) == r.json()


def test_a_missing_file_is_a_usage_error_with_status_2(tmp_path: Any) -> None:
    out = invoke("run", str(tmp_path / "absent.json"))
    assert out.exit_code == 2
    assert "cannot read" in out.stderr


@pytest.mark.parametrize("command", [*(ep.name for ep in ENDPOINTS), "batch", "serve"])
def test_every_subcommand_has_help_with_an_example(command: str) -> None:
    out = invoke(command, "--help")
    assert out.exit_code == 0
    assert "Example" in out.stdout
    assert "gearwork " + command in out.stdout
