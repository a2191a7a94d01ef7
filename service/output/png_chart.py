"""Charts as PNG, painted with Pillow from the page laid out by ``service.output.chart_layout``:
the same layout, inks, dashes, markers, labels and ticks as the SVG, at 120 dpi.

Each item of the page is painted in drawing order through its coverage mask
(``service.output.png_coverage``), so every edge is antialiased. The picture is then mapped
onto a palette of the chart's inks and their blends with the paper and the envelope tint
(the colours of those edges), which keeps the look and leaves a third of the bytes to
compress.

Nothing depends on the clock, the machine's fonts or a text-shaping library, so the same
chart always gives the same bytes.
"""

from __future__ import annotations

import enum
import functools
import io
from collections.abc import Sequence

import numpy as np
from PIL import Image, ImageDraw

from service.output import chart_page as page
from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_layout import chart_items
from service.output.chart_page import (
    CLIP_BOX,
    ENVELOPE,
    HEIGHT_PT,
    PAPER,
    WIDTH_PT,
)
from service.output.png_coverage import (
    Mask,
    box_mask,
    line_mask,
    sprite,
    steep_edges,
    stroke_mask,
    text_mask,
)
from service.output.svg_chart import svg_chart

__all__ = [
    "PNG_DPI",
    "SIZE_IN",
    "ChartFormat",
    "chart_picture",
    "png_chart",
    "render_chart",
    "svg_markup",
]

SIZE_IN = (WIDTH_PT / 72.0, HEIGHT_PT / 72.0)
PNG_DPI = 120
PNG_COMPRESSION = 1  # zlib level: see bench/charts.py for size against time
PX = PNG_DPI / 72.0  # pixels per point
RAMP = 12  # blend steps of an ink into the paper (half as many into the envelope tint)
BAND = 32  # rows of a large mask painted at a time
SPARSE = 40_000  # pixels of a mask above which it is painted band by band
SMALL = 1_000  # pixels of a mask below which a colour is painted through it directly
_ANCHORS = {"start": "ls", "middle": "ms", "end": "rs"}

RGB = tuple[int, int, int]


class ChartFormat(enum.StrEnum):
    """Image formats a chart renders to, by media type."""

    SVG = "image/svg+xml"
    PNG = "image/png"


@functools.cache
def _rgb(ink: str) -> RGB:
    return int(ink[1:3], 16), int(ink[3:5], 16), int(ink[5:7], 16)


def _put(picture: Image.Image, rgb: RGB, left: int, top: int, mask: Image.Image) -> None:
    box = (left, top, left + mask.width, top + mask.height)
    if mask.width * mask.height <= SMALL:
        picture.paste(rgb, box, mask)
    else:  # Pillow blends an image through a mask about twice as fast as a colour
        picture.paste(Image.new("RGB", mask.size, rgb), box, mask)


def _paint(picture: Image.Image, ink: str, mask: Mask | None) -> None:
    """Paint ``ink`` through ``mask``; a large mask band by band, each cut to where it
    covers anything (a curve's box is mostly empty, and painting costs by the pixel)."""
    if mask is None:
        return
    m, rgb = mask.image, _rgb(ink)
    if m.width * m.height <= SPARSE:
        _put(picture, rgb, mask.left, mask.top, m)
        return
    for y in range(0, m.height, BAND):
        band = m.crop((0, y, m.width, min(y + BAND, m.height)))
        inked = band.getbbox()
        if inked is not None:
            _put(picture, rgb, mask.left + inked[0], mask.top + y + inked[1], band.crop(inked))


def _line(
    picture: Image.Image, x1: float, y1: float, x2: float, y2: float, s: page.Stroke
) -> None:
    dash = tuple(d * PX for d in s.dash)
    _paint(picture, s.ink, line_mask(x1 * PX, y1 * PX, x2 * PX, y2 * PX, s.width * PX, dash))


def _polyline(picture: Image.Image, item: page.Polyline) -> None:
    s = item.stroke
    left, top, right, bottom = CLIP_BOX
    clip = (left * PX, top * PX, right * PX, bottom * PX) if item.clipped else None
    dash = tuple(d * PX for d in s.dash)
    _paint(picture, s.ink, stroke_mask(item.x * PX, item.y * PX, s.width * PX, dash, clip))


def _stamp(
    picture: Image.Image, kind: str, x: float, y: float, size: float, face: str, edge: page.Stroke
) -> None:
    s = sprite(kind, x * PX, y * PX, size * PX, face, edge.ink, edge.width * PX)
    box = (s.left, s.top, s.left + s.pixels.width, s.top + s.pixels.height)
    picture.paste(s.pixels, box, s.coverage)


def _fill(picture: Image.Image, draw: ImageDraw.ImageDraw, item: page.Polygon) -> None:
    """A filled outline: a plain fill, its near-vertical edges (where a plain fill shows a
    staircase) smoothed by a pixel-wide antialiased line of the fill along them."""
    x, y = item.x * PX, item.y * PX
    # corners only: points on a straight run between their neighbours add nothing
    bend = (np.roll(x, -1) - x) * (y - np.roll(y, 1)) != (np.roll(y, -1) - y) * (x - np.roll(x, 1))
    x, y = x[bend], y[bend]
    ink = _rgb(item.fill)
    draw.polygon(list(zip((x - 0.5).tolist(), (y - 0.5).tolist(), strict=True)), fill=ink)
    for i in steep_edges(x, y):
        j = (i + 1) % x.size
        _paint(picture, item.fill, stroke_mask(x[[i, j]], y[[i, j]], 1.0, (), None))


def _paint_item(picture: Image.Image, draw: ImageDraw.ImageDraw, item: page.Item) -> None:
    if isinstance(item, page.Text):
        mask = text_mask(
            item.text,
            item.x * PX,
            item.y * PX,
            item.size * PX,
            _ANCHORS[item.anchor],
            bold=item.bold,
            italic=item.italic,
            rotated=item.rotated,
        )
        _paint(picture, item.fill, mask)
    elif isinstance(item, page.Polyline):
        _polyline(picture, item)
    elif isinstance(item, page.Marker):
        _stamp(picture, item.kind, item.x, item.y, item.size, item.fill, item.edge)
    elif isinstance(item, page.Circle):
        _stamp(picture, "O", item.x, item.y, 2.0 * item.r, item.fill, item.edge)
    elif isinstance(item, page.Polygon):
        _fill(picture, draw, item)
    elif isinstance(item, page.Line):
        _line(picture, item.x1, item.y1, item.x2, item.y2, item.stroke)
    elif isinstance(item, page.LineGroup):
        for line in item.lines:
            _line(picture, *line, item.stroke)
    elif isinstance(item, page.Frame):
        _line(picture, item.left, item.top, item.left, item.foot, item.stroke)
        _line(picture, item.left, item.foot, item.right, item.foot, item.stroke)
        for line in item.ticks:
            _line(picture, *line, item.stroke)
    else:
        mask = box_mask(item.x * PX, item.y * PX, item.w * PX, item.h * PX, item.opacity)
        _paint(picture, item.fill, mask)


def _blends(ink: RGB, ground: RGB, steps: int) -> list[RGB]:
    """``ink`` faded into ``ground`` in ``steps`` equal steps, the ground itself left out."""
    return [
        (
            round(ink[0] + (ground[0] - ink[0]) * i / steps),
            round(ink[1] + (ground[1] - ink[1]) * i / steps),
            round(ink[2] + (ground[2] - ink[2]) * i / steps),
        )
        for i in range(1, steps)
    ]


def _near(a: RGB, b: RGB) -> int:
    return (a[0] - b[0]) ** 2 + (a[1] - b[1]) ** 2 + (a[2] - b[2]) ** 2


@functools.lru_cache(maxsize=16)
def _palette(inks: frozenset[str]) -> Image.Image:
    """The chart's inks, then greys and each ink's blends into the paper and into the
    envelope tint (the colours of antialiased edges and text), at most 256 entries.

    Pillow maps a colour to the entry nearest its value rounded down to a multiple of four
    in each channel, so a blend nearer than the ink itself to an ink's rounded value is left
    out: every flat ink maps to itself."""
    flats = sorted({_rgb(ink) for ink in inks})
    paper, tint = _rgb(PAPER), _rgb(ENVELOPE)
    blends = [(v, v, v) for v in range(0, 256, 8)]
    for ink in flats:
        if len(set(ink)) > 1:  # a neutral ink on the paper is among the greys
            blends += _blends(ink, paper, RAMP)
        if ink != tint:
            blends += _blends(ink, tint, RAMP // 2)
    corners = [((r & ~3, g & ~3, b & ~3), (r, g, b)) for r, g, b in flats]
    entries = dict.fromkeys(flats)
    for blend in blends:
        if all(_near(blend, corner) > _near(ink, corner) for corner, ink in corners):
            entries.setdefault(blend)
    palette = Image.new("P", (1, 1))
    palette.putpalette([v for rgb in list(entries)[:256] for v in rgb])
    return palette


def _inks(items: Sequence[page.Item]) -> frozenset[str]:
    found = {PAPER}
    for item in items:
        if isinstance(item, (page.Polyline, page.Line, page.LineGroup, page.Frame)):
            found.add(item.stroke.ink)
        elif isinstance(item, (page.Marker, page.Circle)):
            found.update((item.fill, item.edge.ink))
        elif isinstance(item, (page.Polygon, page.Rect, page.Text)):
            found.add(item.fill)
    return frozenset(found)


def chart_picture(chart: TractiveForceChart | RunChart) -> tuple[Image.Image, Image.Image]:
    """The chart painted in RGB at 120 dpi, and the palette it is written in."""
    items = chart_items(chart)
    picture = Image.new("RGB", (round(WIDTH_PT * PX), round(HEIGHT_PT * PX)), _rgb(PAPER))
    draw = ImageDraw.Draw(picture)
    for item in items:
        _paint_item(picture, draw, item)
    return picture, _palette(_inks(items))


def png_chart(chart: TractiveForceChart | RunChart) -> bytes:
    """The chart as a PNG picture (8-bit palette, 120 dpi), the same bytes for the same chart."""
    picture, palette = chart_picture(chart)
    indexed = picture.quantize(palette=palette, dither=Image.Dither.NONE)
    out = io.BytesIO()
    indexed.save(out, format="PNG", compress_level=PNG_COMPRESSION, dpi=(PNG_DPI, PNG_DPI))
    return out.getvalue()


def render_chart(chart: TractiveForceChart | RunChart, fmt: ChartFormat) -> bytes:
    """The chart as SVG or PNG bytes, the same bytes for the same chart."""
    return svg_chart(chart) if fmt is ChartFormat.SVG else png_chart(chart)


def svg_markup(chart: TractiveForceChart | RunChart) -> str:
    """The chart as an ``<svg>`` element to inline in HTML (no XML prolog or doctype)."""
    text = svg_chart(chart).decode("utf-8")
    return text[text.index("<svg") :]
