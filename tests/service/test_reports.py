"""POST /v1/reports/shift-plan and /v1/reports/acceleration-run: text, HTML and PDF."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from html.parser import HTMLParser
from typing import Any

import httpx
import pytest

from service.http.negotiation import choose_media_type
from service.output.cautions import CAUTIONS
from tests.conftest import ApiClient, load_demo

PLAN_URL = "/v1/reports/shift-plan"
RUN_URL = "/v1/reports/acceleration-run"
OFFERED = ["text/html", "text/plain", "application/pdf"]


class _Page(HTMLParser):
    """Collects the tags, the text and the <title> of a page; fails on unclosed tags."""

    VOID = frozenset({"meta", "br", "link", "img", "hr", "input"})

    def __init__(self) -> None:
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []
        self.open: list[str] = []
        self.text: list[str] = []
        self.title = ""
        self._in_title = False

    def handle_starttag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)
        self._in_title = tag == "title"
        if tag not in self.VOID:
            self.open.append(tag)

    def handle_startendtag(self, tag: str, attrs: list[tuple[str, str | None]]) -> None:
        self.tags.append(tag)

    def handle_endtag(self, tag: str) -> None:
        assert self.open and self.open[-1] == tag, f"</{tag}> closes <{self.open[-1:]}>"
        self.open.pop()
        self._in_title = False

    def handle_data(self, data: str) -> None:
        self.text.append(data)
        if self._in_title:
            self.title += data


def _parse(html: str) -> _Page:
    page = _Page()
    page.feed(html)
    page.close()
    assert page.open == [], f"unclosed: {page.open}"
    return page


def _post(api: ApiClient, url: str, body: dict[str, Any], accept: str) -> httpx.Response:
    return api.post(url, json=body, headers={"accept": accept})


@pytest.fixture(scope="module")
def plan_text(api: ApiClient) -> str:
    r = _post(api, PLAN_URL, load_demo("demo_coupe_us"), "text/plain")
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "text/plain; charset=utf-8"
    return r.text


@pytest.fixture(scope="module")
def plan_html(api: ApiClient) -> str:
    r = _post(api, PLAN_URL, load_demo("demo_coupe_us"), "text/html")
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "text/html; charset=utf-8"
    assert "Accept" in [v.strip() for v in r.headers["vary"].split(",")]
    return r.text


@pytest.fixture(scope="module")
def run_text(api: ApiClient) -> str:
    r = _post(api, RUN_URL, load_demo("demo_sedan_run_metric"), "text/plain")
    assert r.status_code == 200, r.text
    return r.text


def test_text_report_fits_a_work_order(plan_text: str) -> None:
    lines = plan_text.splitlines()
    assert all(len(line) <= 80 for line in lines)
    assert all(ch.isprintable() and ch.isascii() for line in lines for ch in line)
    assert lines[0].startswith("GEARWORK SHIFT PLAN") and lines[0].endswith("ref: WO-2291")


def test_text_report_names_its_inputs_units_and_cautions(plan_text: str) -> None:
    for fact in ("Curve", "Peaks", "Rev limit", "Gear ratios", "Final drive", "Tire"):
        assert f"\n{fact} " in plan_text
    assert "1500-7000 rpm" in plan_text and "255/40R18" in plan_text
    assert "Units: us: torque lbf*ft" in plan_text
    flat = " ".join(plan_text.split())
    for caution in CAUTIONS:
        assert " ".join(caution.split()) in flat


def test_text_report_agrees_with_the_json_shift_plan(
    api: ApiClient, coupe_us: dict[str, Any], plan_text: str
) -> None:
    doc = api.post("/v1/shift-plan", json=coupe_us).json()
    rows = {
        line.split()[0]: line.split()
        for line in plan_text.splitlines()
        if line[:1].isdigit() and "-" in line.split()[0]
    }
    for s in doc["shifts"]:
        row = rows[f"{s['from_gear']}-{s['to_gear']}"]
        assert row[1] == f"{s['shift_rpm']:.0f}" and row[3] == f"{s['rpm_after']:.0f}"


def test_run_text_report_carries_times_vehicle_and_launch(run_text: str) -> None:
    lines = run_text.splitlines()
    assert all(len(line) <= 80 and line.isascii() for line in lines)
    assert "ref: RUN-0412" in lines[0]
    assert any(line.startswith("1/4 mile") for line in lines)
    for fact in ("Vehicle", "Road load", "Air", "Launch", "Shifts", "Run"):
        assert f"\n{fact} " in run_text
    assert "CAUTIONS" in run_text


def test_html_report_is_one_page_with_chart_tables_and_cautions(plan_html: str) -> None:
    page = _parse(plan_html)
    assert page.title == "Shift plan WO-2291 - gearwork"
    assert page.tags.count("svg") == 1 and page.tags.count("table") == 2  # gears, shifts
    assert "@page" in plan_html and "@media print" in plan_html
    text = " ".join(" ".join(page.text).split())
    assert "WO-2291" in text and "255/40R18" in text
    for caution in CAUTIONS:
        assert caution in text


def test_html_report_chart_is_well_formed_svg(plan_html: str) -> None:
    svg = plan_html[plan_html.index("<svg") : plan_html.index("</svg>") + len("</svg>")]
    root = ET.fromstring(svg)
    labels = [t.text for t in root.iter("{http://www.w3.org/2000/svg}text")]
    assert "Road speed [mph]" in labels and "Tractive force [lbf]" in labels


def test_reference_is_escaped_in_html(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    coupe_us["reference"] = "A<b>&\"c'$x$"
    r = _post(api, PLAN_URL, coupe_us, "text/html")
    assert r.status_code == 200, r.text
    assert "<b>" not in r.text
    assert "A&lt;b&gt;&amp;&quot;c&#x27;$x$" in r.text
    _parse(r.text)
    svg = r.text[r.text.index("<svg") : r.text.index("</svg>") + len("</svg>")]
    ET.fromstring(svg)  # the chart's subtitle carries the reference too


def test_pdf_report_is_a_pdf_named_after_the_reference(api: ApiClient) -> None:
    r = _post(api, PLAN_URL, load_demo("demo_coupe_us"), "application/pdf")
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "application/pdf"
    assert r.headers["content-disposition"] == 'inline; filename="shift-plan-WO-2291.pdf"'
    assert r.content.startswith(b"%PDF-") and r.content.rstrip().endswith(b"%%EOF")
    assert b"(Shift plan WO-2291)" in r.content  # the document title
    assert r.content.count(b"/Type /Page\n") + r.content.count(b"/Type /Page ") >= 1


def test_run_report_renders_in_every_format(api: ApiClient) -> None:
    sedan = load_demo("demo_sedan_run_metric")
    html = _post(api, RUN_URL, sedan, "text/html")
    assert html.status_code == 200, html.text
    page = _parse(html.text)
    assert page.tags.count("svg") == 1 and "RUN-0412" in page.title
    assert "Time from first motion [s]" in html.text
    pdf = _post(api, RUN_URL, sedan, "application/pdf")
    assert pdf.status_code == 200 and pdf.content.startswith(b"%PDF-")


@pytest.mark.parametrize(
    ("accept", "media"),
    [
        pytest.param("*/*", "text/html", id="anything"),
        pytest.param("", "text/html", id="empty"),
        pytest.param("text/*", "text/html", id="any-text"),
        pytest.param("text/plain, text/html;q=0.5", "text/plain", id="quality"),
        pytest.param("application/pdf;q=0.9, */*;q=0.1", "application/pdf", id="pdf-first"),
        # a JSON-only client (curl --json, most HTTP libraries) gets the default document
        pytest.param("application/json", "text/html", id="json-gets-default"),
        pytest.param("application/json, text/plain;q=0.5", "text/plain", id="json-then-text"),
    ],
)
def test_accept_header_picks_the_format(
    api: ApiClient, coupe_us: dict[str, Any], accept: str, media: str
) -> None:
    r = _post(api, PLAN_URL, coupe_us, accept)
    assert r.status_code == 200, r.text
    assert r.headers["content-type"].split(";")[0] == media


@pytest.mark.parametrize(
    "accept",
    [
        pytest.param("image/png", id="image"),
        pytest.param("text/html;q=0, text/plain;q=0, application/pdf;q=0", id="all-refused"),
    ],
)
@pytest.mark.parametrize(
    "url", [pytest.param(PLAN_URL, id="plan"), pytest.param(RUN_URL, id="run")]
)
def test_unsupported_accept_is_406_problem(api: ApiClient, url: str, accept: str) -> None:
    body = load_demo("demo_sedan_run_metric" if url == RUN_URL else "demo_coupe_us")
    r = _post(api, url, body, accept)
    assert r.status_code == 406, r.text
    assert r.headers["content-type"] == "application/problem+json"
    problem = r.json()
    assert problem["status"] == 406 and problem["type"].endswith("not-acceptable")
    assert "text/html, text/plain, application/pdf" in problem["detail"]


def test_bad_input_is_422_naming_the_field(api: ApiClient, coupe_us: dict[str, Any]) -> None:
    coupe_us["engine"]["curve"]["rpm"][1] = 1000
    r = _post(api, PLAN_URL, coupe_us, "application/pdf")
    assert r.status_code == 422, r.text
    assert r.headers["content-type"] == "application/problem+json"
    assert r.json()["field"] == "engine.curve.rpm[1]"


def test_bad_run_input_is_422_naming_the_field(api: ApiClient) -> None:
    sedan = load_demo("demo_sedan_run_metric")
    sedan["shifts"] = {"criterion": "custom", "rpm": [6000, 6000]}
    r = _post(api, RUN_URL, sedan, "text/plain")
    assert r.status_code == 422, r.text
    assert r.json()["field"] == "shifts.rpm"


@pytest.mark.parametrize("accept", ["text/html", "application/pdf", "text/plain"])
def test_same_request_gives_the_same_bytes(api: ApiClient, accept: str) -> None:
    # two spellings of one body: the result cache keys on the bytes, so both are computed
    body = load_demo("demo_coupe_us")
    body["reference"] = f"SAME-{accept.split('/')[1]}"
    headers = {"accept": accept, "content-type": "application/json"}
    one = api.post(PLAN_URL, content=json.dumps(body), headers=headers)
    two = api.post(PLAN_URL, content=json.dumps(body, indent=2), headers=headers)
    assert one.status_code == two.status_code == 200
    assert one.content == two.content


def test_many_gears_split_the_tables_to_fit_80_columns(
    api: ApiClient, coupe_us: dict[str, Any]
) -> None:
    coupe_us["drivetrain"]["gear_ratios"] = [4.7, 3.1, 2.1, 1.67, 1.29, 1.0, 0.84, 0.67, 0.56]
    r = api.post(PLAN_URL, params={"appendix": "true", "format": "text"}, json=coupe_us)
    assert r.status_code == 200, r.text
    assert all(len(line) <= 80 for line in r.text.splitlines())
    assert "Tractive force by gear, gears 7-9" in r.text


def test_vehicle_adds_performance_to_the_plan_report(api: ApiClient) -> None:
    sedan = load_demo("demo_sedan_run_metric")
    plan = {k: sedan[k] for k in ("units", "reference", "engine", "drivetrain", "vehicle")}
    plan["cruise_speeds"] = [100]
    r = _post(api, PLAN_URL, plan, "text/plain")
    assert r.status_code == 200, r.text
    assert "PERFORMANCE OF THE DESCRIBED CAR" in r.text and "Traction limit" in r.text
    assert all(len(line) <= 80 for line in r.text.splitlines())


@pytest.mark.parametrize(
    ("accept", "expected"),
    [
        pytest.param(None, "text/html", id="missing-is-default"),
        pytest.param("text/plain;q=0.5, application/pdf", "application/pdf", id="q-ranks"),
        pytest.param("text/*;q=0.2, text/plain", "text/plain", id="specific-beats-range"),
        pytest.param("text/plain;q=0, */*", "text/html", id="q-zero-refuses"),
        pytest.param("text/plain;q=abc, application/pdf;q=0.1", "application/pdf", id="bad-q"),
        pytest.param("nonsense, */plain", None, id="malformed"),
        pytest.param("image/*", None, id="nothing-offered"),
    ],
)
def test_negotiation_follows_rfc_9110_quality_and_specificity(
    accept: str | None, expected: str | None
) -> None:
    # RFC 9110, section 12.5.1: the most specific range sets a type's quality; q=0 refuses
    assert choose_media_type(accept, OFFERED) == expected
