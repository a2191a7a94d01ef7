"""Coverage masks for the PNG chart: how much of each pixel an item covers (0-255).

The PNG writer (``service.output.png_chart``) paints every item of the page onto the
picture through its mask, in drawing order, so every edge is antialiased however the items
overlap:

- axis-aligned lines (grid, axes, ticks, drops) from their exact overlap with each pixel,
  dash patterns sampled eight times a pixel;
- curves drawn at ``SUPER`` times the resolution and averaged down, only over their own
  bounding box;
- markers and badges as sprites drawn once at ``SPRITE`` times the resolution (for each
  quarter-pixel offset) and kept;
- text by FreeType at the final size from matplotlib's bundled DejaVu Sans (hinted, the
  glyphs the SVG names first), each distinct label rendered once and kept.

All coordinates here are pixels of the final picture, x right and y down, pixel (i, j)
covering [i, i + 1) x [j, j + 1). Caches are bounded (``functools.lru_cache``) and keyed on
values only, so what they return is the same whether or not they hit.
"""

from __future__ import annotations

import functools
import importlib.util
import math
from collections.abc import Sequence
from pathlib import Path
from typing import NamedTuple

import numpy as np
from numpy.typing import NDArray
from PIL import Image, ImageDraw, ImageFont

from service.output.chart_page import marker_points

__all__ = [
    "SPRITE",
    "SUPER",
    "Mask",
    "Sprite",
    "box_mask",
    "line_mask",
    "sprite",
    "steep_edges",
    "stroke_mask",
    "text_mask",
]

FloatArray = NDArray[np.float64]
Point = tuple[float, float]
SUPER = 2  # curves and fills are drawn at this multiple of the picture's resolution
SPRITE = 8  # markers and badges are drawn at this multiple
SAMPLES = 8  # dash pattern samples per pixel
QUARTER = 4  # sprites are kept for each 1/4-pixel offset


class Mask(NamedTuple):
    """Coverage (an 8-bit "L" image) whose top-left pixel lands on (``left``, ``top``)."""

    image: Image.Image
    left: int
    top: int


class Sprite(NamedTuple):
    """A marker's pixels (RGB) and its coverage, top-left on (``left``, ``top``)."""

    pixels: Image.Image
    coverage: Image.Image
    left: int
    top: int


def _font_dir() -> Path:
    """matplotlib's bundled fonts, found without importing matplotlib."""
    spec = importlib.util.find_spec("matplotlib")
    if spec is None or not spec.submodule_search_locations:
        raise RuntimeError("matplotlib, which ships the DejaVu fonts, is not installed")
    return Path(next(iter(spec.submodule_search_locations))) / "mpl-data" / "fonts" / "ttf"


@functools.cache
def _font(size_px: float, bold: bool, italic: bool) -> ImageFont.FreeTypeFont:
    style = ("-Bold" if bold else "") + ("Oblique" if italic and bold else "")
    style = style or ("-Oblique" if italic else "")
    path = _font_dir() / f"DejaVuSans{style}.ttf"
    # the basic layout: FreeType alone, no shaping library whose version could move glyphs
    return ImageFont.truetype(str(path), size_px, layout_engine=ImageFont.Layout.BASIC)


@functools.lru_cache(maxsize=1024)
def _text(text: str, size_px: float, bold: bool, italic: bool, anchor: str) -> Mask:
    """The text's coverage with its anchor point at (0, 0)."""
    font = _font(size_px, bold, italic)
    left, top, right, bottom = (math.floor(v) for v in font.getbbox(text, anchor=anchor))
    image = Image.new("L", (max(right - left, 1), max(bottom - top, 1)), 0)
    ImageDraw.Draw(image).text((-left, -top), text, fill=255, font=font, anchor=anchor)
    return Mask(image, left, top)


@functools.lru_cache(maxsize=256)
def _turned(text: str, size_px: float, bold: bool, italic: bool, anchor: str) -> Mask:
    """The text's coverage turned a quarter anticlockwise (reading upwards)."""
    flat = _text(text, size_px, bold, italic, anchor)
    # (u, v) -> (v, width - u): the anchor (-left, -top) of the flat mask moves with it
    turned = flat.image.transpose(Image.Transpose.ROTATE_90)
    return Mask(turned, flat.top, -(flat.image.width + flat.left))


def text_mask(
    text: str,
    x: float,
    y: float,
    size_px: float,
    anchor: str,
    *,
    bold: bool,
    italic: bool,
    rotated: bool,
) -> Mask:
    """Coverage of a label whose anchor ("ls", "ms" or "rs": start, middle or end of the
    baseline) is at (x, y), on whole pixels (hinted glyphs look best there)."""
    make = _turned if rotated else _text
    m = make(text, size_px, bold, italic, anchor)
    return Mask(m.image, round(x) + m.left, round(y) + m.top)


def _overlap(start: float, end: float, size: int) -> FloatArray:
    """Share of each pixel [i, i + 1) of a row of ``size`` inside [start, end]."""
    edges = np.arange(size + 1, dtype=float)
    share: FloatArray = np.clip(
        np.minimum(edges[1:], end) - np.maximum(edges[:-1], start), 0.0, 1.0
    )
    return share


def _to_image(share: FloatArray) -> Image.Image:
    return Image.fromarray(np.rint(share * 255.0).astype(np.uint8), "L")


@functools.lru_cache(maxsize=512)
def _row(
    start: float,
    length: float,
    width: float,
    middle: float,
    dash: tuple[float, ...],
    back: bool,
    vertical: bool,
) -> Image.Image:
    """A horizontal line from ``start`` (into its first pixel) for ``length``, ``width``
    wide about ``middle`` (into its first row); the dashes run from its right end when
    ``back``; turned into a vertical one (transposed) when ``vertical``."""
    cols = math.ceil(start + length)
    along = _overlap(start, start + length, cols)
    if dash:
        at = (np.arange(cols * SAMPLES) + 0.5) / SAMPLES
        phase = np.mod(start + length - at if back else at - start, sum(dash))
        on = np.searchsorted(np.cumsum(dash), phase, side="right") % 2 == 0
        along = np.minimum(along, on.reshape(cols, SAMPLES).mean(axis=1))
    rows = math.ceil(middle + width / 2.0)
    across = _overlap(middle - width / 2.0, middle + width / 2.0, rows)
    share = np.outer(across, along)
    return _to_image(share.T if vertical else share)


def line_mask(
    x1: float, y1: float, x2: float, y2: float, width: float, dash: tuple[float, ...]
) -> Mask:
    """Coverage of an axis-aligned line, its dash pattern starting at (x1, y1), centred on
    the nearest middle of a pixel row or column, so a thin line stays crisp."""
    vertical = abs(x1 - x2) < abs(y1 - y2)
    a1, a2, c = (y1, y2, x1) if vertical else (x1, x2, y1)
    c = math.floor(c) + 0.5
    along0, across0 = math.floor(min(a1, a2)), math.floor(c - width / 2.0)
    image = _row(
        round(min(a1, a2) - along0, 3),
        round(abs(a2 - a1), 3),
        round(width, 3),
        round(c - across0, 3),
        tuple(round(d, 3) for d in dash),
        a2 < a1,
        vertical,
    )
    return Mask(image, across0, along0) if vertical else Mask(image, along0, across0)


@functools.lru_cache(maxsize=256)
def _box(x: float, y: float, w: float, h: float, alpha: float) -> Image.Image:
    return _to_image(
        np.outer(_overlap(y, y + h, math.ceil(y + h)), _overlap(x, x + w, math.ceil(x + w)))
        * alpha
    )


def box_mask(x: float, y: float, w: float, h: float, alpha: float) -> Mask:
    """Coverage of a rectangle from its top-left corner, scaled by ``alpha`` in [0, 1]."""
    left, top = math.floor(x), math.floor(y)
    image = _box(round(x - left, 3), round(y - top, 3), round(w, 3), round(h, 3), alpha)
    return Mask(image, left, top)


def _grown(points: Sequence[Point], d: float) -> list[Point]:
    """The polygon grown outwards by ``d`` (inwards when negative), corners mitred."""
    n = len(points)
    twice_area = sum(
        points[i][0] * points[(i + 1) % n][1] - points[(i + 1) % n][0] * points[i][1]
        for i in range(n)
    )
    sign = 1.0 if twice_area > 0 else -1.0
    normals = []
    for i in range(n):
        (x0, y0), (x1, y1) = points[i], points[(i + 1) % n]
        size = math.hypot(x1 - x0, y1 - y0)
        normals.append((sign * (y1 - y0) / size, sign * (x0 - x1) / size))
    grown = []
    for i in range(n):
        (ax, ay), (bx, by) = normals[i - 1], normals[i]
        f = d / (1.0 + ax * bx + ay * by)
        grown.append((points[i][0] + f * (ax + bx), points[i][1] + f * (ay + by)))
    return grown


def _rgb(ink: str) -> tuple[int, int, int]:
    return int(ink[1:3], 16), int(ink[3:5], 16), int(ink[5:7], 16)


@functools.lru_cache(maxsize=1024)
def _sprite(
    kind: str, size: float, face: str, edge: str, edge_width: float, fx: float, fy: float
) -> Sprite:
    """A marker ``size`` across [px] with an edge ``edge_width`` wide centred on its
    outline, its centre (fx, fy) into the middle pixel; "O" is a circle ``size`` across."""
    half = math.ceil((size / 2.0) * 1.15 + edge_width) + 1
    side = 2 * half + 1
    scale = SPRITE
    cx, cy = (half + fx) * scale, (half + fy) * scale
    shares = []
    for grow in (edge_width / 2.0, -edge_width / 2.0):
        mask = Image.new("L", (side * scale, side * scale), 0)
        draw = ImageDraw.Draw(mask)
        if kind in ("o", "O"):
            r = (size / 2.0 + grow) * scale
            draw.ellipse((cx - r, cy - r, cx + r - 1, cy + r - 1), fill=255)
        else:
            # Pillow fills from floor(x0) to floor(x1) inclusive: half a fine pixel in from
            # the outline, that is every fine pixel whose centre lies inside it
            outline = _grown(marker_points(kind, 0.0, 0.0, size), grow - 0.5 / scale)
            draw.polygon([(cx + u * scale, cy + v * scale) for u, v in outline], 255)
        shares.append(mask.reduce(scale))
    ring, inside = shares
    pixels = Image.new("RGB", ring.size, _rgb(edge))
    pixels.paste(_rgb(face), (0, 0, *ring.size), inside)
    return Sprite(pixels, ring, -half, -half)


def sprite(
    kind: str, x: float, y: float, size: float, face: str, edge: str, edge_width: float
) -> Sprite:
    """A marker or badge centred on (x, y), placed to a quarter of a pixel."""
    qx, qy = math.floor(x * QUARTER) / QUARTER, math.floor(y * QUARTER) / QUARTER
    ix, iy = math.floor(qx), math.floor(qy)
    s = _sprite(kind, round(size, 3), face, edge, round(edge_width, 3), qx - ix, qy - iy)
    return Sprite(s.pixels, s.coverage, ix + s.left, iy + s.top)


def _dashes(x: FloatArray, y: FloatArray, dash: tuple[float, ...]) -> list[list[Point]]:
    """The dashes of a polyline, the pattern starting at its first point (one walk along
    the points: a few dozen dashes cost less in plain Python than in array calls)."""
    xs, ys = x.tolist(), y.tolist()
    pieces: list[list[Point]] = []
    k, left, on = 0, dash[0], True  # pattern element, its length still to run, pen down
    piece = [(xs[0], ys[0])]
    for i in range(len(xs) - 1):
        x0, y0, x1, y1 = xs[i], ys[i], xs[i + 1], ys[i + 1]
        size, at = math.hypot(x1 - x0, y1 - y0), 0.0
        while size - at > left:
            at += left
            point = (x0 + (x1 - x0) * at / size, y0 + (y1 - y0) * at / size)
            if on:
                piece.append(point)
                pieces.append(piece)
            else:
                piece = [point]
            on, k = not on, (k + 1) % len(dash)
            left = dash[k]
        left -= size - at
        if on:
            piece.append((x1, y1))
    if on and len(piece) > 1:
        pieces.append(piece)
    return pieces


def stroke_mask(
    x: FloatArray,
    y: FloatArray,
    width: float,
    dash: tuple[float, ...],
    clip: tuple[float, float, float, float] | None,
) -> Mask | None:
    """Coverage of a polyline ``width`` wide (butt ends), dashed from its first point,
    inside ``clip`` (left, top, right, bottom) when given; None when nothing shows."""
    reach = width / 2.0 + 1.0
    left, top = math.floor(float(x.min()) - reach), math.floor(float(y.min()) - reach)
    right, bottom = math.ceil(float(x.max()) + reach), math.ceil(float(y.max()) + reach)
    if clip is not None:
        left, top = max(left, math.floor(clip[0])), max(top, math.floor(clip[1]))
        right, bottom = min(right, math.ceil(clip[2])), min(bottom, math.ceil(clip[3]))
    if right <= left or bottom <= top:
        return None
    k = SUPER
    image = Image.new("L", ((right - left) * k, (bottom - top) * k), 0)
    draw = ImageDraw.Draw(image)
    xs, ys = (x - left) * k - 0.5, (y - top) * k - 0.5
    thick = max(1, round(width * k))
    if dash:
        for piece in _dashes(xs, ys, tuple(d * k for d in dash)):
            draw.line(piece, fill=255, width=thick)
    else:
        draw.line(list(zip(xs.tolist(), ys.tolist(), strict=True)), fill=255, width=thick)
    return Mask(image.reduce(k), left, top)


def steep_edges(x: FloatArray, y: FloatArray) -> list[int]:
    """Indices i of the closed outline's near-vertical edges from point i to i + 1 (four
    times taller than wide, and over two pixels), where a plain fill shows a staircase."""
    dx, dy = np.diff(x, append=x[:1]), np.diff(y, append=y[:1])
    found: list[int] = np.flatnonzero(np.abs(dy) > np.maximum(4.0 * np.abs(dx), 2.0)).tolist()
    return found
