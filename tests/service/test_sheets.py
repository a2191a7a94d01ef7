"""Printable sheets of every advising answer: formats, letterhead, job block, pages as pictures.

The PDF sheets are checked the way a reader sees them: poppler's pdftoppm (an independent
PDF renderer, Debian's poppler-utils) draws each page to PNG, and the tests count pages and
look for ink. Paper sizes are those of ISO 216 (A4, 210 x 297 mm) and ANSI/ASME Y14.1
(US Letter, 8.5 x 11 in).
"""

from __future__ import annotations

import shutil
import subprocess
from collections.abc import Iterator
from pathlib import Path
from typing import Any

import numpy as np
import pytest
from matplotlib.image import imread

from service.output.letterhead import Letterhead, get_letterhead
from service.output.pdf import render_pdf
from service.output.shift_plan_report import shift_plan_report
from service.settings import get_settings
from tests.conftest import DATA, ApiClient, load_demo

POPPLER = shutil.which("pdftoppm") is not None and shutil.which("pdfinfo") is not None
needs_poppler = pytest.mark.skipif(not POPPLER, reason="poppler-utils (pdftoppm) not installed")
JOB = {
    "customer": "R. Okonkwo",
    "vehicle": "Coupe, six-speed, 255/40R18",
    "technician": "D. Varga",
    "date": "2026-11-30",
    "work_order": "WO-2291",
}


def _log_request() -> dict[str, Any]:
    body = load_demo("demo_log_request_metric")
    body["log"] = {"text": (DATA / "demo_log_pass_metric.csv").read_text()}
    return body


# sheet path -> (demo request, pages of its PDF)
SHEETS: dict[str, tuple[str, int]] = {
    "shift-plan": ("demo_coupe_us", 1),
    "acceleration-run": ("demo_sedan_run_metric", 2),
    "comparison": ("demo_comparison_us", 1),
    "final-drive-sweep": ("demo_sweep_us", 1),
    "gear-spacing": ("demo_gear_spacing_us", 1),
    "speedometer-correction": ("demo_speedometer_us", 1),
    "log-analysis": ("demo_log_request_metric", 1),
    "dyno-correction": ("demo_dyno_correction_metric", 1),
    "chassis-dyno": ("demo_chassis_metric", 1),
    "road-load/coast-down": ("demo_coastdown_metric", 2),
    "shift-window": ("demo_shift_window_metric", 2),
    "weather-correction": ("demo_weather_metric", 1),
    "calibration/pass": ("demo_calibration_metric", 2),
}


def _body(sheet: str) -> dict[str, Any]:
    name = SHEETS[sheet][0]
    return _log_request() if sheet == "log-analysis" else load_demo(name)


def _sheet(api: ApiClient, sheet: str, fmt: str, **extra: Any) -> bytes:
    body = {**_body(sheet), **extra}
    r = api.post(f"/v1/reports/{sheet}", params={"format": fmt}, json=body)
    assert r.status_code == 200, r.text
    return r.content


def _pages(pdf: bytes, tmp: Path) -> list[np.ndarray]:
    """Each page drawn by pdftoppm at 40 dpi, as a greyscale array (1 white, 0 black)."""
    source = tmp / "sheet.pdf"
    source.write_bytes(pdf)
    subprocess.run(["pdftoppm", "-r", "40", "-png", str(source), str(tmp / "p")], check=True)
    pages = []
    for png in sorted(tmp.glob("p-*.png")):
        image = imread(png)
        pages.append(image[..., :3].mean(axis=2))
    return pages


def _ink_reach(page: np.ndarray) -> float:
    """How far down the page the content reaches, as a share of its height, footer aside."""
    body = page[: int(page.shape[0] * 0.93)]  # the footer line sits in the last 7 %
    inked = np.flatnonzero((body < 0.8).any(axis=1))
    return 0.0 if inked.size == 0 else float(inked[-1] + 1) / page.shape[0]


@pytest.fixture
def shop(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> Iterator[Letterhead]:
    """A shop's letterhead from the environment, with a logo."""
    import matplotlib.pyplot as plt

    logo = tmp_path / "logo.png"
    plt.imsave(logo, np.linspace(0.0, 1.0, 300).reshape(10, 30), cmap="Greys")
    monkeypatch.setenv("GEARWORK_SHOP_NAME", "Forge Lane Performance")
    monkeypatch.setenv("GEARWORK_SHOP_ADDRESS", "12 Forge Lane|Millbrook 4410")
    monkeypatch.setenv("GEARWORK_SHOP_PHONE", "+1 555 0100")
    monkeypatch.setenv("GEARWORK_SHOP_LOGO", str(logo))
    get_settings.cache_clear()
    get_letterhead.cache_clear()
    yield get_letterhead()
    monkeypatch.undo()
    get_settings.cache_clear()
    get_letterhead.cache_clear()


@pytest.mark.parametrize("fmt", ["text", "html", "pdf"])
@pytest.mark.parametrize("sheet", list(SHEETS))
def test_every_sheet_prints_in_every_format(api: ApiClient, sheet: str, fmt: str) -> None:
    content = _sheet(api, sheet, fmt)
    if fmt == "text":
        lines = content.decode("ascii").splitlines()
        assert all(len(line) <= 80 for line in lines)
        assert lines[0].startswith("GEARWORK ") and "CAUTIONS" in lines
    elif fmt == "html":
        assert content.startswith(b"<!DOCTYPE html>") and b"Cautions" in content
    else:
        assert content.startswith(b"%PDF-") and content.rstrip().endswith(b"%%EOF")


@pytest.mark.parametrize(
    ("url", "accept", "media"),
    [
        pytest.param("/v1/reports/comparison", None, "text/html", id="report-no-accept"),
        pytest.param("/v1/reports/comparison", "application/json", "text/html", id="report-json"),
        pytest.param("/v1/reports/comparison", "*/*", "text/html", id="report-any"),
        pytest.param("/v1/charts/tractive-force", None, "image/svg+xml", id="chart-no-accept"),
        pytest.param(
            "/v1/charts/tractive-force", "application/json", "image/svg+xml", id="chart-json"
        ),
    ],
)
def test_plain_call_gets_the_default_format(
    api: ApiClient, url: str, accept: str | None, media: str
) -> None:
    body = load_demo("demo_comparison_us" if "comparison" in url else "demo_coupe_us")
    headers = {"accept": accept} if accept is not None else {}
    r = api.post(url, json=body, headers=headers)
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].split(";")[0] == media


@pytest.mark.parametrize(
    ("url", "fmt", "media"),
    [
        pytest.param("/v1/reports/shift-plan", "pdf", "application/pdf", id="pdf"),
        pytest.param("/v1/reports/shift-plan", "text", "text/plain", id="text"),
        pytest.param("/v1/charts/tractive-force", "png", "image/png", id="png"),
        pytest.param("/v1/charts/tractive-force", "svg", "image/svg+xml", id="svg"),
    ],
)
def test_format_query_overrides_accept_and_keys_the_cache(
    api: ApiClient, url: str, fmt: str, media: str
) -> None:
    body = load_demo("demo_coupe_us")
    r = api.post(url, params={"format": fmt}, json=body, headers={"accept": "text/html"})
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].split(";")[0] == media


def test_comparison_sheet_prints_each_setups_warnings_after_its_name(api: ApiClient) -> None:
    body = load_demo("demo_comparison_us")
    answer = api.post("/v1/comparison", json=body).json()
    html = api.post("/v1/reports/comparison", json=body, headers={"accept": "text/html"}).text
    said = [(s["name"], w["message"]) for s in answer["setups"] for w in s["warnings"]]
    assert said  # the demo's tall gearing runs into its drag and rev limits
    notes = html[html.index("Warnings</h2>") :]
    for name, message in said:  # "name[, other]: message", every sentence once
        assert notes.count(message) == 1
        line = notes[: notes.index(message)].rsplit("<li>", 1)[1]
        assert name in line.removesuffix(": ").split(", ")


def test_unknown_format_is_422_naming_format(api: ApiClient) -> None:
    r = api.post("/v1/reports/shift-plan?format=docx", json=load_demo("demo_coupe_us"))
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "query.format"


@needs_poppler
@pytest.mark.parametrize("sheet", list(SHEETS))
def test_demo_sheet_pages_are_counted_and_none_is_mostly_empty(
    api: ApiClient, sheet: str, tmp_path: Path
) -> None:
    pages = _pages(_sheet(api, sheet, "pdf", job=JOB), tmp_path)
    assert len(pages) == SHEETS[sheet][1]
    for page in pages:
        # every page, the last included, carries content at least a third of the way down
        assert _ink_reach(page) > 1 / 3


@needs_poppler
@pytest.mark.parametrize(
    ("units", "size"),
    [
        pytest.param("us", "612 x 792 pts (letter)", id="us-letter"),  # 8.5 x 11 in
        pytest.param("metric", "595.28 x 841.89 pts (A4)", id="metric-a4"),  # 210 x 297 mm
    ],
)
def test_demo_shift_plan_is_one_page_on_its_paper(
    api: ApiClient, units: str, size: str, tmp_path: Path
) -> None:
    pdf = _sheet(api, "shift-plan", "pdf", units=units, job=JOB)
    source = tmp_path / "plan.pdf"
    source.write_bytes(pdf)
    info = subprocess.run(["pdfinfo", str(source)], capture_output=True, text=True, check=True)
    assert "Pages:           1" in info.stdout
    assert size in info.stdout


@needs_poppler
def test_appendix_adds_the_trace_on_pages_of_its_own(api: ApiClient, tmp_path: Path) -> None:
    body = load_demo("demo_sedan_run_metric")
    r = api.post("/v1/reports/acceleration-run?format=pdf&appendix=true", json=body)
    assert r.status_code == 200, r.text
    assert len(_pages(r.content, tmp_path)) == 3
    text = api.post("/v1/reports/acceleration-run?format=text&appendix=true", json=body).text
    assert "APPENDIX" in text and "The run over time" in text
    plain = api.post("/v1/reports/acceleration-run?format=text", json=body).text
    assert "The run over time" not in plain


@pytest.mark.parametrize("sheet", ["shift-plan", "speedometer-correction"])
def test_same_request_gives_the_same_pdf_bytes(api: ApiClient, sheet: str) -> None:
    one = _sheet(api, sheet, "pdf", reference="SAME-PDF")
    two = _sheet(api, sheet, "pdf", reference="SAME-PDF")
    assert one == two


@needs_poppler
def test_letterhead_and_job_block_print_on_every_format(
    api: ApiClient, shop: Letterhead, tmp_path: Path
) -> None:
    assert not shop.neutral and shop.logo.startswith(b"\x89PNG")
    job = {**JOB, "date": "2026-12-01"}  # a body of its own: the result cache never answers
    text = _sheet(api, "gear-spacing", "text", job=job).decode()
    assert text.splitlines()[:3] == ["Forge Lane Performance", "12 Forge Lane", "Millbrook 4410"]
    assert "Work order:     WO-2291" in text and "Technician:     D. Varga" in text
    html = _sheet(api, "gear-spacing", "html", job=job).decode()
    assert "Forge Lane Performance" in html and "data:image/png;base64," in html
    assert "R. Okonkwo" in html
    pdf = tmp_path / "spacing.pdf"
    pdf.write_bytes(_sheet(api, "gear-spacing", "pdf", job=job))
    words = subprocess.run(
        ["pdftotext", str(pdf), "-"], capture_output=True, text=True, check=True
    ).stdout
    for expected in ("Forge Lane Performance", "Phone +1 555 0100", "R. Okonkwo", "WO-2291"):
        assert expected in words
    assert b"/Subtype /Image" in pdf.read_bytes()


def test_without_settings_the_header_is_neutral(api: ApiClient) -> None:
    text = _sheet(api, "gear-spacing", "text").decode()
    assert text.startswith("GEARWORK GEAR SPACING")


@pytest.mark.parametrize(
    ("field", "value"),
    [
        pytest.param("customer", "x" * 61, id="too-long"),
        pytest.param("technician", "D. Varga\n", id="not-printable"),
        pytest.param("fax", "555", id="unknown-field"),
    ],
)
def test_job_block_is_bounded_printable_text(api: ApiClient, field: str, value: str) -> None:
    body = {**load_demo("demo_coupe_us"), "job": {field: value}}
    r = api.post("/v1/reports/shift-plan", json=body)
    assert r.status_code == 422, r.text
    assert r.json()["field"] == f"job.{field}"


def test_speedometer_sheet_shows_odometer_and_no_stand_in_axle(api: ApiClient) -> None:
    body = load_demo("demo_speedometer_us")
    for side in ("original", "new"):
        body[side].pop("final_drive_ratio")
    body["driven_teeth"] = None
    text = api.post("/v1/reports/speedometer-correction?format=text", json=body).text
    assert "Odometer" in text and "12000.0" in text
    assert "final drive" not in text.lower() and "axle" not in text.lower()
    assert "closed course" not in text.lower()  # no full-throttle caution on this sheet
    answer = api.post("/v1/speedometer-correction", json=body).json()
    assert answer["original"]["final_drive_ratio"] is None
    assert "Odometer" in answer["summary"]


def test_cruise_table_flags_rpm_above_the_rev_limit(api: ApiClient) -> None:
    body = load_demo("demo_sedan_run_metric")
    plan = {k: body[k] for k in ("units", "reference", "engine", "drivetrain", "vehicle")}
    plan["cruise_speeds"] = [130]  # beyond first and second gear at 6500 rpm
    text = api.post("/v1/reports/shift-plan?format=text", json=plan).text
    assert "* above the 6500 rpm rev limit" in text
    row = next(line for line in text.splitlines() if line.lstrip().startswith("130.0"))
    assert row.split()[1].endswith("*") and not row.split()[-1].endswith("*")


def test_metric_comparison_times_0_to_100_kmh(api: ApiClient) -> None:
    body = load_demo("demo_comparison_us")
    body["units"] = "metric"
    body["vehicle"]["mass"] = 1540
    r = api.post("/v1/comparison", json=body)
    assert r.status_code == 200, r.text
    answer = r.json()
    assert answer["setups"][0]["run"]["zero_to_100_kmh"] is not None
    assert "0-100 km/h" in answer["summary"] and "0-60 mph" not in answer["summary"]
    sheet = api.post("/v1/reports/comparison?format=text", json=body).text
    assert "0-100 km/h" in sheet and "0-60 mph" not in sheet


def test_ten_gear_tables_stay_aligned(api: ApiClient) -> None:
    body = load_demo("demo_coupe_us")
    body["drivetrain"]["gear_ratios"] = [4.7, 3.3, 2.5, 1.9, 1.5, 1.2, 1.0, 0.84, 0.7, 0.6]
    text = api.post("/v1/reports/shift-plan?format=text", json=body).text
    lines = text.splitlines()
    start = lines.index("Gears")
    rows = lines[start + 4 : start + 14]
    assert [r.split()[0] for r in rows] == [str(g) for g in range(1, 11)]
    assert len({len(r) for r in rows}) == 1  # right-aligned figures end in one column


def test_logo_is_drawn_once_per_page(shop: Letterhead, tmp_path: Path) -> None:
    from service.mapping.shift_plan import compute_shift_plan
    from service.schemas.shift_plan import ShiftPlanRequest

    outcome = compute_shift_plan(ShiftPlanRequest.model_validate(load_demo("demo_coupe_us")))
    pdf = render_pdf(shift_plan_report(outcome), None, "a4", shop)
    assert pdf.count(b"/Subtype /Image") == 1


@needs_poppler
def test_paper_setting_overrides_the_units(
    api: ApiClient, monkeypatch: pytest.MonkeyPatch, tmp_path: Path
) -> None:
    monkeypatch.setenv("GEARWORK_SHEET_PAPER", "a4")
    get_settings.cache_clear()
    try:
        pdf = _sheet(api, "shift-plan", "pdf", reference="PAPER-A4")  # a US request
    finally:
        monkeypatch.undo()
        get_settings.cache_clear()
    source = tmp_path / "plan.pdf"
    source.write_bytes(pdf)
    info = subprocess.run(["pdfinfo", str(source)], capture_output=True, text=True, check=True)
    assert "595.28 x 841.89 pts (A4)" in info.stdout and "Pages:           1" in info.stdout


def _sentences(count: int) -> Iterator[tuple[str, str]]:
    """Invented sentences: words of 1 to 12 characters, now and then a long one (up to 79,
    past the plain limit), with the indents the sheets use."""
    rng = np.random.default_rng(2291)
    letters = np.array(list("abcdefghijk,.;()-0123456789"))
    for _ in range(count):
        sizes = rng.integers(1, 13, size=int(rng.integers(1, 50)))
        sizes[rng.random(sizes.size) < 0.03] = rng.choice([30, 60, 77, 78, 79])
        words = ["".join(rng.choice(letters, size=int(n))) for n in sizes]
        yield " ".join(words), str(rng.choice(["", "- ", "  ", "-"]))


def test_wrap_text_gives_the_lines_textwrap_gives() -> None:
    # reference: Python's textwrap.wrap (width 80, continuation indent two spaces, no
    # breaks on hyphens), which the plain-sentence fill must match line for line
    import textwrap

    from service.output.sheets import wrap_text

    for text, indent in _sentences(3000):
        expected = textwrap.wrap(
            text, 80, initial_indent=indent, subsequent_indent="  ", break_on_hyphens=False
        )
        assert wrap_text(text, indent) == expected, (text, indent)
    for text in ("", " lead", "trail ", "two  spaces", "tab\there", "caf\u00e9 au lait"):
        assert wrap_text(text) == textwrap.wrap(text, 80, subsequent_indent="  ")
