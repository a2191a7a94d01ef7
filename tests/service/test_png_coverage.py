"""Coverage masks of the PNG chart held to the areas of the shapes they cover (closed forms)."""

from __future__ import annotations

import math

import numpy as np
import pytest
from numpy.testing import assert_allclose
from PIL import Image

from service.output.chart_page import ENVELOPE, INKS, PAPER
from service.output.png_chart import _inks, _palette
from service.output.png_coverage import line_mask, sprite, stroke_mask


def _area(image: Image.Image) -> float:
    """Covered area [px^2]: the sum of the coverage."""
    return float(np.asarray(image, dtype=float).sum() / 255.0)


@pytest.mark.parametrize(
    ("x1", "y1", "x2", "y2"),
    [
        pytest.param(10.3, 20.7, 210.9, 20.7, id="horizontal"),
        pytest.param(40.2, 300.6, 40.2, 55.1, id="vertical-upwards"),
    ],
)
def test_solid_line_covers_its_rectangle(x1: float, y1: float, x2: float, y2: float) -> None:
    # a line w wide and L long covers the rectangle L x w (butt ends)
    mask = line_mask(x1, y1, x2, y2, 1.33, ())
    length = abs(x2 - x1) + abs(y2 - y1)
    assert_allclose(_area(mask.image), length * 1.33, rtol=5e-3)


def test_dashed_line_covers_its_duty_cycle() -> None:
    # on 3 px, off 2 px over 500 px: 100 whole periods, 3/5 of the length inked
    mask = line_mask(0.25, 10.5, 500.25, 10.5, 1.0, (3.0, 2.0))
    assert_allclose(_area(mask.image), 500.0 * 3.0 / 5.0, rtol=5e-3)


def test_stroke_of_a_straight_polyline_covers_its_rectangle() -> None:
    # a slanted segment 2.5 px wide: area = length x width, drawn at twice the resolution
    x, y = np.array([20.0, 220.0]), np.array([30.0, 130.0])
    mask = stroke_mask(x, y, 2.5, (), None)
    assert mask is not None
    assert_allclose(_area(mask.image), math.hypot(200.0, 100.0) * 2.5, rtol=0.02)


def test_circle_marker_covers_pi_r_squared() -> None:
    # ring and face together: the disc out to the edge's outer side, pi (r + w/2)^2
    s = sprite("o", 100.3, 50.6, 6.0, "#ffffff", "#14213d", 1.6)
    assert_allclose(_area(s.coverage), math.pi * (3.0 + 0.8) ** 2, rtol=0.01)


def test_square_marker_covers_its_side_squared() -> None:
    # side 2 * 0.8 * r = 4.8 px, grown by half the 1 px edge on every side: 5.8 px; the
    # sprite samples 8 points a pixel, so each side is resolved to 1/8 px: 2 x 1/8 / 5.8
    s = sprite("s", 10.0, 10.0, 6.0, "#ffffff", "#9a3b1b", 1.0)
    assert_allclose(_area(s.coverage), 5.8**2, rtol=2 * 0.125 / 5.8)


def test_every_flat_ink_keeps_its_exact_colour_in_the_palette() -> None:
    inks = frozenset({*INKS, PAPER, ENVELOPE, "#111111", "#333333", "#555555", "#8f8f8f"})
    flats = [tuple(int(ink[i : i + 2], 16) for i in (1, 3, 5)) for ink in sorted(inks)]
    picture = Image.new("RGB", (len(flats), 1))
    for i, rgb in enumerate(flats):
        picture.putpixel((i, 0), rgb)
    palette = _palette(inks)
    mapped = picture.quantize(palette=palette, dither=Image.Dither.NONE).convert("RGB")
    assert [mapped.getpixel((i, 0)) for i in range(len(flats))] == flats
    assert len(palette.getpalette() or []) // 3 <= 256
    assert _inks([]) == frozenset({PAPER})
