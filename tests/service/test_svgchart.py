"""The direct SVG chart writer: tick choice against matplotlib, well-formed bytes."""

from __future__ import annotations

import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from matplotlib.ticker import MaxNLocator
from numpy.testing import assert_allclose

from service.mapping.calculations import compute_shift_plan
from service.output.chart_data import tractive_force_chart
from service.output.chart_layout import nice_ticks
from service.output.svg_chart import svg_chart
from service.schemas.shift_plan import ShiftPlanRequest

DATA = Path(__file__).resolve().parents[1] / "data"


@pytest.mark.parametrize("intervals", [pytest.param(6, id="y"), pytest.param(7, id="x")])
@pytest.mark.parametrize(
    "top", [pytest.param(t, id=str(t)) for t in (0.9, 2.2, 17.0, 53.0, 206.0, 3360.0, 21600.0)]
)
def test_nice_ticks_match_matplotlib_max_n_locator(top: float, intervals: int) -> None:
    # reference: matplotlib.ticker.MaxNLocator with the same steps and bin count, the
    # locator the matplotlib drawing uses, restricted to the axis range [0, top]
    locator = MaxNLocator(nbins=intervals, steps=[1, 2, 2.5, 5, 10])
    expected = [t for t in locator.tick_values(0.0, top) if -1e-9 <= t <= top * (1 + 1e-9)]
    assert_allclose(nice_ticks(top, intervals), expected, rtol=1e-12, atol=1e-12)


def test_svg_chart_is_well_formed_and_carries_every_gear_and_shift() -> None:
    body = ShiftPlanRequest.model_validate(json.loads((DATA / "demo_coupe_us.json").read_text()))
    chart = tractive_force_chart(compute_shift_plan(body))
    root = ET.fromstring(svg_chart(chart))
    ns = "{http://www.w3.org/2000/svg}"
    texts = [t.text for t in root.iter(f"{ns}text")]
    assert all(str(g.gear) in texts for g in chart.gears)
    assert sum(1 for t in texts if t and t.endswith(" rpm")) == len(chart.shifts)
    assert len(list(root.iter(f"{ns}polyline"))) == len(chart.gears)
