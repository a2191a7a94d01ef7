"""The PNG chart painted from the page layout: a valid file, the same picture every time,
the page's items where the layout puts them, in the caller's units."""

from __future__ import annotations

import io
import struct
import subprocess
import sys
import zlib
from typing import Any

import numpy as np
import pytest
from matplotlib.image import imread
from numpy.typing import NDArray
from PIL import Image

from service.mapping.calculations import compute_acceleration_run, compute_shift_plan
from service.output.chart_data import RunChart, TractiveForceChart, run_chart, tractive_force_chart
from service.output.chart_layout import chart_items
from service.output.chart_page import (
    ENVELOPE,
    INKS,
    PAPER,
    Polyline,
    Text,
)
from service.output.png_chart import PNG_DPI, SIZE_IN, png_chart
from service.output.png_coverage import text_mask
from service.schemas.acceleration import AccelerationRunRequest
from service.schemas.shift_plan import ShiftPlanRequest
from tests.conftest import ApiClient, load_demo

URL = "/v1/charts/tractive-force"
PX = PNG_DPI / 72.0  # pixels per point
SIZE = (round(SIZE_IN[0] * PNG_DPI), round(SIZE_IN[1] * PNG_DPI))


def _chunks(png: bytes) -> list[tuple[bytes, bytes]]:
    """(type, data) of every chunk, each CRC checked: ISO/IEC 15948 (PNG), sections 5.2
    (signature), 5.3 (length, type, data, CRC-32 over type and data, as zlib.crc32)."""
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    chunks, at = [], 8
    while at < len(png):
        (length,) = struct.unpack(">I", png[at : at + 4])
        kind, data = png[at + 4 : at + 8], png[at + 8 : at + 8 + length]
        (crc,) = struct.unpack(">I", png[at + 8 + length : at + 12 + length])
        assert crc == zlib.crc32(kind + data), kind
        chunks.append((kind, data))
        at += 12 + length
    return chunks


def _rgb(ink: str) -> tuple[int, int, int]:
    return int(ink[1:3], 16), int(ink[3:5], 16), int(ink[5:7], 16)


def _pixels(png: bytes) -> NDArray[np.uint8]:
    """The picture as RGB rows, decoded by matplotlib's reader (not the writer's library)."""
    image = imread(io.BytesIO(png), format="png")
    return np.rint(np.asarray(image)[..., :3] * 255.0).astype(np.uint8)


def _plan_chart(name: str) -> TractiveForceChart:
    body = load_demo(name)
    keys = ("units", "reference", "engine", "drivetrain", "vehicle", "shift_criterion")
    request = {k: body[k] for k in keys if k in body}
    return tractive_force_chart(compute_shift_plan(ShiftPlanRequest.model_validate(request)))


def _run_chart() -> RunChart:
    body = AccelerationRunRequest.model_validate(load_demo("demo_sedan_run_metric"))
    return run_chart(compute_acceleration_run(body))


CHARTS = [
    pytest.param(lambda: _plan_chart("demo_coupe_us"), id="force-us"),
    pytest.param(lambda: _plan_chart("demo_sedan_run_metric"), id="force-metric-with-car"),
    pytest.param(_run_chart, id="run-metric"),
]


@pytest.mark.parametrize("make", CHARTS)
def test_png_is_a_valid_indexed_picture_of_the_page_size(make: Any) -> None:
    chunks = _chunks(png_chart(make()))
    kinds = [k for k, _ in chunks]
    assert kinds[0] == b"IHDR" and kinds[-1] == b"IEND" and b"PLTE" in kinds
    width, height, depth, colour, compression, filtering, interlace = struct.unpack(
        ">IIBBBBB", chunks[0][1]
    )
    # ISO/IEC 15948 section 11.2.2: colour type 3 is indexed colour, here with 8-bit indices
    assert (width, height) == SIZE
    assert (depth, colour, compression, filtering, interlace) == (8, 3, 0, 0, 0)
    palette = dict(chunks)[b"PLTE"]
    assert len(palette) % 3 == 0 and len(palette) // 3 <= 256
    raw = zlib.decompress(b"".join(d for k, d in chunks if k == b"IDAT"))
    assert len(raw) == height * (1 + width)  # a filter-type byte, then one index a pixel
    rows = np.frombuffer(raw, np.uint8).reshape(height, 1 + width)
    assert rows[:, 0].max() <= 4  # filter types 0-4 (section 9.2)
    assert rows[:, 1:].max() < len(palette) // 3
    # pHYs (section 11.3.5.3): pixels per metre, unit 1 = metre; 120 dpi = 4724 px/m
    x_ppm, y_ppm, unit = struct.unpack(">IIB", dict(chunks)[b"pHYs"])
    assert (x_ppm, y_ppm, unit) == (round(PNG_DPI / 0.0254),) * 2 + (1,)


@pytest.mark.parametrize("make", CHARTS)
def test_same_chart_paints_the_same_bytes_twice(make: Any) -> None:
    chart = make()
    assert png_chart(chart) == png_chart(chart)


def test_paper_envelope_and_gear_inks_land_where_the_layout_puts_them() -> None:
    chart = _plan_chart("demo_coupe_us")
    pixels = _pixels(png_chart(chart))
    assert tuple(pixels[3, 3]) == _rgb(PAPER)  # the page's corner
    curves = [i for i in chart_items(chart) if isinstance(i, Polyline)]
    first = curves[0]  # first gear: solid, 1.5 pt wide
    k = first.x.size // 2 + 1
    x, y = round(float(first.x[k]) * PX - 0.5), round(float(first.y[k]) * PX - 0.5)
    assert np.abs(pixels[y, x].astype(int) - _rgb(INKS[0])).max() <= 12
    # well inside the envelope, below the last gear's curve and above the axis
    last = curves[-1]
    k = last.x.size // 3
    x, y = round(float(last.x[k]) * PX), round(float(last.y[k]) * PX + 30)
    assert tuple(pixels[y, x]) == _rgb(ENVELOPE)


@pytest.mark.parametrize(
    ("name", "speed", "force"),
    [
        pytest.param("demo_coupe_us", "Road speed [mph]", "Tractive force [lbf]", id="us"),
        pytest.param("demo_hatch_metric", "Road speed [km/h]", "Tractive force [N]", id="metric"),
    ],
)
def test_every_label_is_painted_in_the_callers_units(name: str, speed: str, force: str) -> None:
    chart = _plan_chart(name)
    texts = [i for i in chart_items(chart) if isinstance(i, Text)]
    assert {speed, force} <= {t.text for t in texts}
    pixels = _pixels(png_chart(chart))
    paper = np.array(_rgb(PAPER))
    for t in texts:
        anchor = {"start": "ls", "middle": "ms", "end": "rs"}[t.anchor]
        mask = text_mask(
            t.text,
            t.x * PX,
            t.y * PX,
            t.size * PX,
            anchor,
            bold=t.bold,
            italic=t.italic,
            rotated=t.rotated,
        )
        box = pixels[
            mask.top : mask.top + mask.image.height, mask.left : mask.left + mask.image.width
        ]
        inked = np.abs(box.astype(int) - paper).max(axis=2) > 60
        assert inked.sum() >= len(t.text.replace(" ", "")), t.text


@pytest.mark.parametrize(
    ("query", "headers"),
    [
        pytest.param("?format=png", {"accept": "image/svg+xml"}, id="query-wins"),
        pytest.param("", {"accept": "image/png"}, id="accept"),
    ],
)
def test_png_is_served_by_query_or_accept(
    api: ApiClient, hatch_metric: dict[str, Any], query: str, headers: dict[str, str]
) -> None:
    r = api.post(URL + query, json=hatch_metric, headers=headers)
    assert r.status_code == 200, r.text
    assert r.headers["content-type"] == "image/png"
    assert "Accept" in r.headers["vary"].split(", ")
    with Image.open(io.BytesIO(r.content)) as image:
        assert image.size == SIZE


def test_the_png_writer_does_not_load_matplotlib() -> None:
    code = "import sys, service.output.png_chart; print('matplotlib' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"
