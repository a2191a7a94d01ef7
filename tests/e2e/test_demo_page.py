"""GET /demo end to end: headless Chromium (Debian's package) driven by Playwright.

The browser is Debian's ``chromium`` at /usr/bin/chromium, installed by
scripts/setup_browser.sh (run here when it is missing); ``playwright install`` is never
used. The page is served by the ``server`` fixture (tests/e2e/conftest.py) with its strict
Content-Security-Policy, so an inline script or handler would be refused and show up as a
console error, which fails every test here. Screenshots go to artifacts/ (demo-us.png,
demo-metric.png).
"""

from __future__ import annotations

import contextlib
import json
import math
import re
import subprocess
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from numpy.testing import assert_allclose
from playwright.sync_api import Browser, Page, Route, sync_playwright
from scipy import constants

ROOT = Path(__file__).resolve().parents[2]
CHROMIUM = Path("/usr/bin/chromium")
ARTIFACTS = ROOT / "artifacts"
LAUNCH_ARGS = [
    "--headless",
    "--no-sandbox",
    "--disable-gpu",
    "--disable-quic",
    "--no-first-run",
    "--disable-background-networking",
    "--disable-component-update",
    "--disable-sync",
]
# the demo coupe's axle ratio as the page loads it, and the one the test moves it to
AXLE_BEFORE, AXLE_AFTER = 3.55, 4.10
# every field the shared link carries (element ids)
FORM_FIELDS = [
    "curve", "rev-limit", "gears", "axle", "efficiency", "tire-size", "tire-diameter", "mass",
    "drive", "front-share", "grip", "wheelbase", "cg-height", "cd", "frontal-area",
    "launch-rpm", "shift-time", "cruise", "stock-tire", "stock-axle", "speedo-drive",
    "shift-rule",
]  # fmt: skip
# scipy.constants: lbf in N, foot and inch in m
LBF_FT_NM = constants.lbf * constants.foot
INCH_MM = constants.inch * 1000.0
# REFERENCES.md (road speed): rpm per (mph * overall ratio / tire diameter in inches),
# 63360 in per mile / (60 min per h * pi)
RPM_PER_MPH_IN = constants.mile / constants.inch / (60.0 * math.pi)


@pytest.fixture(scope="module")
def chromium() -> Path:
    if not CHROMIUM.exists():
        with contextlib.suppress(subprocess.TimeoutExpired):
            subprocess.run(
                ["bash", str(ROOT / "scripts" / "setup_browser.sh")], check=False, timeout=900
            )
    if not CHROMIUM.exists():
        pytest.skip(
            "Chromium not found at /usr/bin/chromium after scripts/setup_browser.sh "
            "(it installs Debian's chromium with apt-get and needs root)"
        )
    return CHROMIUM


@pytest.fixture(scope="module")
def browser(chromium: Path) -> Iterator[Browser]:
    with sync_playwright() as p:
        b = p.chromium.launch(executable_path=str(chromium), args=LAUNCH_ARGS, headless=True)
        try:
            yield b
        finally:
            b.close()


def _open(browser: Browser, url: str, errors: list[str]) -> Page:
    context = browser.new_context(viewport={"width": 1360, "height": 1000})
    pg = context.new_page()
    pg.on("pageerror", lambda exc: errors.append(str(exc)))
    # the browser logs every failed fetch; a 422 or 503 is the page's own error test at work
    pg.on(
        "console",
        lambda msg: (
            errors.append(msg.text)
            if msg.type == "error" and not re.search(r"status of (422|503)", msg.text)
            else None
        ),
    )
    pg.goto(url)
    pg.wait_for_function("() => document.body.dataset.state === 'ready'")
    return pg


@pytest.fixture
def page(browser: Browser, server: str) -> Iterator[Page]:
    errors: list[str] = []
    pg = _open(browser, server + "/demo", errors)
    yield pg
    pg.context.close()
    assert errors == [], errors


def _updates(page: Page) -> str:
    value: str = page.evaluate("document.body.dataset.updates")
    return value


def _wait_for_update(page: Page, before: str, state: str) -> None:
    page.wait_for_function(
        "([n, s]) => document.body.dataset.updates !== n && document.body.dataset.state === s",
        arg=[before, state],
    )


def _shift_rows(page: Page) -> tuple[Any, Any]:
    rows: list[list[float]] = page.evaluate(
        """() => [...document.querySelectorAll('#shift-table tbody tr')]
             .map((tr) => [Number(tr.dataset.shiftRpm), Number(tr.dataset.shiftSpeed)])"""
    )
    table = np.array(rows)
    return table[:, 0], table[:, 1]


def _most_pull(page: Page) -> Any:
    values: list[float] = page.evaluate(
        """() => [...document.querySelectorAll('#gear-table tbody tr')]
             .map((tr) => Number(tr.dataset.maxForce))"""
    )
    return np.array(values)


def _elapsed(page: Page, mark: str) -> float:
    value: float = page.evaluate(
        "(m) => Number(document.querySelector(`#run-table tr[data-mark='${m}']`).dataset.elapsed)",
        mark,
    )
    return value


def _form(page: Page) -> dict[str, str]:
    values: dict[str, str] = page.evaluate(
        "(ids) => Object.fromEntries(ids.map((id) => [id, document.getElementById(id).value]))",
        FORM_FIELDS,
    )
    return values


def _painted_pixels(page: Page) -> int:
    count: int = page.evaluate(
        """() => {
             const c = document.getElementById('chart');
             const d = c.getContext('2d').getImageData(0, 0, c.width, c.height).data;
             let n = 0;
             for (let i = 3; i < d.length; i += 4) if (d[i] > 0) n += 1;
             return n;
           }"""
    )
    return count


def _switch_units(page: Page, system: str) -> None:
    before = _updates(page)
    page.check(f"input[name=units][value={system}]", force=True)
    _wait_for_update(page, before, "ready")


def _status(page: Page) -> str:
    return page.text_content("#status") or ""


def test_axle_ratio_change_keeps_shift_rpm_and_lowers_shift_speeds(page: Page) -> None:
    before = _updates(page)
    page.select_option("#shift-rule", "tractive_force")  # where the next gear pulls harder
    _wait_for_update(page, before, "ready")
    rpm_before, speed_before = _shift_rows(page)
    assert rpm_before.size == 5  # six-speed demo coupe
    before = _updates(page)
    page.fill("#axle", f"{AXLE_AFTER:.2f}")
    _wait_for_update(page, before, "ready")
    rpm_after, speed_after = _shift_rows(page)
    # the final drive multiplies every gear's force alike, so a crossover between two gears
    # stays at the same rpm (closed form in REFERENCES.md: "the final drive cancels") and a
    # rev-limit shift stays at the limit; road speed at a given rpm scales as 1/ratio
    assert_allclose(rpm_after, rpm_before, rtol=1e-4)
    assert_allclose(speed_after, speed_before * AXLE_BEFORE / AXLE_AFTER, rtol=2e-3)
    assert page.input_value("#axle-slider") == f"{AXLE_AFTER:.1f}"
    assert page.get_attribute("#chart", "data-series") == "6"
    assert _painted_pixels(page) > 5000


@pytest.mark.parametrize("rule", ["net_acceleration", "tractive_force"])
def test_the_shift_table_and_the_run_shift_at_the_same_rpm(page: Page, rule: str) -> None:
    if page.input_value("#shift-rule") != rule:
        before = _updates(page)
        page.select_option("#shift-rule", rule)
        _wait_for_update(page, before, "ready")
    plan_rpm = _shift_rows(page)[0]
    run_rpm: list[float] = page.evaluate(
        "JSON.parse(document.querySelector('#run-table tbody').dataset.shiftRpm)"
    )
    # one shift rule for both answers, so the run leaves each gear where the table says
    assert_allclose(run_rpm, plan_rpm, rtol=1e-3)


def test_switching_units_converts_the_form_and_keeps_every_force_and_time(page: Page) -> None:
    force_lbf = _most_pull(page)
    quarter_s = _elapsed(page, "1/4 mile")
    assert "340" in page.input_value("#curve").split("\n")[6]  # 4500 rpm, 340 lbf*ft
    diameter_in = float(page.input_value("#tire-diameter"))
    ARTIFACTS.mkdir(exist_ok=True)
    page.screenshot(path=str(ARTIFACTS / "demo-us.png"), full_page=True)

    _switch_units(page, "metric")
    # the same car, so the same physical force: lbf -> N by scipy.constants.lbf; the form's
    # torque is kept to 0.01 N*m and the service rounds forces, hence rtol 2e-4
    assert_allclose(_most_pull(page), force_lbf * constants.lbf, rtol=2e-4)
    assert_allclose(_elapsed(page, "1/4 mile"), quarter_s, rtol=2e-3)
    torque_nm = float(page.input_value("#curve").split("\n")[6].split(",")[1])
    assert_allclose(torque_nm, 340 * LBF_FT_NM, rtol=2e-5)  # scipy.constants: lbf * foot
    assert_allclose(float(page.input_value("#tire-diameter")), diameter_in * INCH_MM, rtol=1e-3)
    assert "N·m" in (page.text_content("label[for=curve]") or "")
    page.screenshot(path=str(ARTIFACTS / "demo-metric.png"), full_page=True)

    # and back: the form shows the figures it started with, not a rounded round trip
    _switch_units(page, "us")
    assert page.input_value("#curve").split("\n")[6] == "4500, 340"
    assert page.input_value("#mass") == "3550"
    assert_allclose(_most_pull(page), force_lbf, rtol=1e-6)


def test_a_demo_car_loads_in_the_units_chosen(page: Page) -> None:
    before = _updates(page)
    page.select_option("#preset", "sedan")  # its own figures are metric; the page is in US
    _wait_for_update(page, before, "ready")
    # scipy.constants.pound: 1520 kg in lb, shown to the pound
    assert_allclose(float(page.input_value("#mass")), 1520 / constants.pound, atol=0.5)
    assert page.input_value("#curve").split("\n")[6] == "4000, 197.67"  # 268 N*m in lbf*ft
    _switch_units(page, "metric")
    assert page.input_value("#mass") == "1520"  # converted back exactly
    before = _updates(page)
    page.select_option("#preset", "coupe")  # its own figures are US
    _wait_for_update(page, before, "ready")
    assert_allclose(float(page.input_value("#mass")), 3550 * constants.pound, atol=0.05)


def test_shared_link_restores_the_whole_form_and_the_result(page: Page, browser: Browser) -> None:
    _switch_units(page, "metric")
    for selector, value in (("#axle", "4.10"), ("#tire-size", "265/35R18"), ("#mass", "1655")):
        before = _updates(page)
        page.fill(selector, value)
        _wait_for_update(page, before, "ready")
    page.click("#share")
    link = page.input_value("#share-link")
    assert link == page.get_attribute("#permalink", "href") == page.url
    form, pull, shifts = _form(page), _most_pull(page), _shift_rows(page)
    quarter_s = _elapsed(page, "1/4 mile")

    errors: list[str] = []
    other = _open(browser, link, errors)
    try:
        assert _form(other) == form
        assert other.is_checked("input[name=units][value=metric]")
        assert_allclose(_most_pull(other), pull, rtol=1e-9)
        assert_allclose(_shift_rows(other)[1], shifts[1], rtol=1e-9)
        assert _elapsed(other, "1/4 mile") == quarter_s
    finally:
        other.context.close()
    assert errors == [], errors


def test_rejected_gear_ratios_show_a_sentence_naming_the_field(page: Page) -> None:
    before = _updates(page)
    page.fill("#gears", "3.10, 2.05, 2.40")
    _wait_for_update(page, before, "error")
    text = _status(page).strip()
    # a plain sentence that names the field as the form does, no request path or backticks
    assert text.startswith("Gear ratios") and text.endswith(".")
    assert "`" not in text and "drivetrain." not in text
    assert page.get_attribute("#status p", "data-field") == "drivetrain.gear_ratios[2]"
    assert "invalid" in (page.get_attribute("#gears", "class") or "")
    assert (page.text_content("#gears-error") or "").strip() == text  # said beside the field too
    before = _updates(page)
    page.fill("#gears", "3.10, 2.05, 1.48")
    _wait_for_update(page, before, "ready")
    assert page.get_attribute("#chart", "data-series") == "3"
    assert "invalid" not in (page.get_attribute("#gears", "class") or "")


@pytest.mark.parametrize(
    ("field", "message", "sentence"),
    [
        pytest.param(
            "drivetrain.gear_ratios[2]",
            "`drivetrain.gear_ratios` must be strictly descending: gear 3 (2.4) is not below "
            "gear 2 (2.05)",
            "Gear ratios must be strictly descending: gear 3 (2.4) is not below gear 2 (2.05).",
            id="core-message",
        ),
        pytest.param(
            "vehicle.mass",
            "Input should be greater than 0",
            "Mass should be greater than 0.",
            id="schema-message",
        ),
        pytest.param(
            "drivetrain.gear_ratios[1]",
            "Input should be greater than 0",
            "Gear ratios, value 2, should be greater than 0.",
            id="list-index",
        ),
        pytest.param(
            "",
            "`cruise_speeds` must each lie in (0, 500]",
            "Highway speeds must each be above 0 and at most 500.",
            id="no-field-interval",
        ),
        pytest.param(
            "drivetrain.efficiency",
            "drivetrain.efficiency must be at most 1, got 1.5",
            "Driveline efficiency must be at most 1, got 1.5.",
            id="bare-path",
        ),
        pytest.param(
            "original.tire.size",
            "String should have at least 4 characters",
            "Calibrated tire size should have at least 4 characters.",
            id="speedometer-field",
        ),
    ],
)
def test_problem_details_become_sentences_in_the_forms_words(
    page: Page, field: str, message: str, sentence: str
) -> None:
    # RFC 9457 problem details: each item of `errors` has the field path and a message
    out: dict[str, Any] = page.evaluate(
        "([f, m]) => window.GearworkForm.sentence({field: f, message: m})", [field, message]
    )
    assert out["text"] == sentence


@pytest.mark.parametrize(
    ("selector", "value", "name"),
    [
        pytest.param("#mass", "-5", "Mass", id="car-mass"),
        pytest.param("#tire-size", "not a tire", "Tire size", id="tire-size"),
        pytest.param("#stock-axle", "0", "Calibrated axle ratio", id="speedometer-axle"),
    ],
)
def test_refused_inputs_are_named_in_plain_words(
    page: Page, selector: str, value: str, name: str
) -> None:
    before = _updates(page)
    page.fill(selector, value)
    _wait_for_update(page, before, "error")
    text = _status(page)
    assert name in text and "`" not in text, text
    assert "invalid" in (page.get_attribute(selector, "class") or "")


def test_pasted_curve_with_a_header_and_decimal_commas_gives_the_same_pull(page: Page) -> None:
    force = _most_pull(page)
    rows = page.input_value("#curve").split("\n")
    pasted = "Engine speed [rpm]\tPower [hp]\tTorque [lbf*ft]\n" + "\n".join(
        f"{r.split(', ')[0]}\t0\t{r.split(', ')[1]},0" for r in rows
    )
    before = _updates(page)
    page.fill("#curve", pasted)
    _wait_for_update(page, before, "ready")
    assert_allclose(_most_pull(page), force, rtol=1e-9)
    before = _updates(page)
    page.fill("#curve", "rpm;torque\n" + "\n".join(r.replace(", ", ";") for r in rows))
    _wait_for_update(page, before, "ready")
    assert_allclose(_most_pull(page), force, rtol=1e-9)


@pytest.mark.parametrize(
    ("text", "system", "rpm", "torque"),
    [
        pytest.param(
            "Engine Speed (rpm);Torque [N*m]\n2000;200,5\n3000;240,0\n4000;250,0",
            "metric",
            [2000, 3000, 4000],
            [200.5, 240.0, 250.0],
            id="semicolons-decimal-commas",
        ),
        pytest.param(
            "Engine Speed (rpm);Torque [N*m]\n2000;200,5\n3000;240,0\n4000;250,0",
            "us",
            [2000, 3000, 4000],
            # the header's N*m converted for a US form: scipy.constants lbf * foot
            [v / LBF_FT_NM for v in (200.5, 240.0, 250.0)],
            id="header-unit-converted",
        ),
        pytest.param(
            "RPM,Power (hp),Torque (lb-ft)\r\n2000,76.2,200\r\n3000,125.7,220\r\n",
            "us",
            [2000, 3000],
            [200.0, 220.0],
            id="csv-torque-third-column",
        ),
        pytest.param(
            "\ufeffrpm\ttorque\n2000\t200,5\n3000\t240\n",
            "metric",
            [2000, 3000],
            [200.5, 240.0],
            id="tabs-with-bom",
        ),
        pytest.param(
            "2000 200,5\n3000 240\n# comment\n4000, 250.5",
            "metric",
            [2000, 3000, 4000],
            [200.5, 240.0, 250.5],
            id="blanks-and-commas",
        ),
    ],
)
def test_pasted_curves_are_read_as_spreadsheets_write_them(
    page: Page, text: str, system: str, rpm: list[float], torque: list[float]
) -> None:
    curve: dict[str, Any] = page.evaluate(
        "([t, s]) => window.GearworkForm.parseCurve(t, s)", [text, system]
    )
    assert curve["rpm"] == rpm
    assert_allclose(curve["torque"], torque, rtol=1e-12)


def test_decimal_commas_between_commas_are_refused_with_a_way_out(page: Page) -> None:
    before = _updates(page)
    page.fill("#curve", "2000,200,5\n3000,240,0\n4000,250,0")
    _wait_for_update(page, before, "error")
    assert "semicolon or a tab" in _status(page)
    assert "invalid" in (page.get_attribute("#curve", "class") or "")


def test_a_typed_tire_size_moves_the_diameter(page: Page) -> None:
    before = _updates(page)
    page.fill("#tire-size", "275/40R18")
    _wait_for_update(page, before, "ready")
    # REFERENCES.md (ISO 4000-1 designation): D = rim + 2 * width * aspect / 25.4 [in]
    expected_in = 18 + 2 * 275 * 0.40 / 25.4
    assert_allclose(float(page.input_value("#tire-diameter")), expected_in, atol=0.006)
    assert_allclose(float(page.input_value("#tire-diameter-slider")), expected_in, atol=0.006)


def test_highway_rpm_and_speedometer_error_match_the_closed_forms(page: Page) -> None:
    top_overall = 0.79 * AXLE_BEFORE  # demo coupe: sixth gear and axle ratio
    diameter_in = 18 + 2 * 255 * 0.40 / 25.4  # 255/40R18, REFERENCES.md tire formula
    rpm_65: list[float] = page.evaluate(
        """() => [...document.querySelectorAll('#cruise-table tbody tr')]
             .map((tr) => Number(tr.querySelectorAll('td')[2].dataset.rpm))"""
    )
    # REFERENCES.md road speed: rpm = mph * overall * 336.135 / D_in (the page shows 65 mph
    # second of 55, 65, 75); the service rounds rpm to whole numbers
    assert_allclose(rpm_65[-1], 65 * top_overall * RPM_PER_MPH_IN / diameter_in, atol=0.6)
    # the speedometer was set for 245/40R18 on the same axle: it turns with the driveshaft,
    # so it reads D_old / D_new of the truth (closed form; error = shown / true - 1)
    stock_in = 18 + 2 * 245 * 0.40 / 25.4
    error = float(page.get_attribute("#speedo-headline", "data-error-percent") or "nan")
    assert_allclose(error, (stock_in / diameter_in - 1) * 100, atol=2e-3)
    assert "low" in (page.text_content("#speedo-headline") or "")


def test_a_wheel_sensor_speedometer_ignores_the_axle_ratio(page: Page) -> None:
    diameter_in = 18 + 2 * 255 * 0.40 / 25.4  # 255/40R18 on the demo coupe
    stock_in = 18 + 2 * 245 * 0.40 / 25.4  # calibrated for 245/40R18
    for selector, value in (("#speedo-drive", "wheel"), ("#axle", f"{AXLE_AFTER:.2f}")):
        before = _updates(page)
        if selector.endswith("drive"):
            page.select_option(selector, value)
        else:
            page.fill(selector, value)
        _wait_for_update(page, before, "ready")
        error = float(page.get_attribute("#speedo-headline", "data-error-percent") or "nan")
        # closed form: a sensor at the wheel sees only the tire, D_old / D_new of the truth
        assert_allclose(error, (stock_in / diameter_in - 1) * 100, atol=2e-3)
    before = _updates(page)
    page.select_option("#speedo-drive", "transmission_output")
    _wait_for_update(page, before, "ready")
    # at the gearbox output the axle counts too: shown / true = (D_old / D_new) * (f_new / f_old)
    error = float(page.get_attribute("#speedo-headline", "data-error-percent") or "nan")
    expected = (stock_in / diameter_in * AXLE_AFTER / AXLE_BEFORE - 1) * 100
    assert_allclose(error, expected, atol=2e-3)
    assert "high" in (page.text_content("#speedo-headline") or "")


def test_print_button_prints_a_sheet_without_the_controls(page: Page) -> None:
    page.evaluate("() => { window.printed = 0; window.print = () => { window.printed += 1; }; }")
    page.click("#print")
    assert page.evaluate("window.printed") == 1
    page.emulate_media(media="print")
    assert not page.is_visible("#print") and not page.is_visible("#share")
    assert page.is_visible("#chart") and page.is_visible("#run-table")


def test_a_busy_service_is_asked_again_after_its_retry_after(page: Page) -> None:
    calls: list[int] = []

    def busy_once(route: Route) -> None:
        calls.append(1)
        if len(calls) > 1:
            route.continue_()
            return
        # RFC 9457 problem details with Retry-After (RFC 9110, 10.2.3), as an admission
        # limit answers
        problem = {"type": "about:blank", "title": "Busy", "status": 503, "detail": "Busy."}
        route.fulfill(
            status=503,
            headers={"Retry-After": "1", "Content-Type": "application/problem+json"},
            body=json.dumps(problem),
        )

    page.route("**/v1/acceleration-run", busy_once)
    before = _updates(page)
    page.fill("#axle", f"{AXLE_AFTER:.2f}")
    _wait_for_update(page, before, "error")
    assert "busy" in _status(page) and "1 s" in _status(page)
    before = _updates(page)
    _wait_for_update(page, before, "ready")  # asked again by itself, nothing typed
    assert len(calls) == 2
