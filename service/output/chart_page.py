"""A chart's page as drawing items: the page and its axes box, the inks, dash patterns and
markers of the gears, and the items (lines, fills, markers, labels) in page points (1/72 in,
y down) that ``service.output.chart_layout`` lays out and the SVG and PNG writers draw.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

__all__ = [
    "AX_H",
    "AX_W",
    "AX_X",
    "AX_Y",
    "CHAR_EM",
    "CLIP_BOX",
    "DASHES",
    "ENVELOPE",
    "HEIGHT_PT",
    "INKS",
    "LINE_WIDTH",
    "MARKERS",
    "MARKER_SIZE",
    "PAPER",
    "SQUARE_HALF",
    "WIDTH_PT",
    "Circle",
    "Frame",
    "GearLook",
    "Item",
    "Line",
    "LineGroup",
    "Marker",
    "Polygon",
    "Polyline",
    "Rect",
    "Stroke",
    "Text",
    "gear_look",
    "marker_points",
]

FloatArray = NDArray[np.float64]

WIDTH_PT, HEIGHT_PT = 540.0, 331.2  # 7.5 x 4.6 in
# the axes box: left 0.1, bottom 0.115, 0.86 wide, 0.735 high (of the page, from its foot);
# AX_Y is its foot (the x axis) measured from the top of the page
AX_X, AX_Y, AX_W, AX_H = 0.1 * WIDTH_PT, 0.885 * HEIGHT_PT, 0.86 * WIDTH_PT, 0.735 * HEIGHT_PT
CLIP_BOX = (AX_X, AX_Y - AX_H, AX_X + AX_W, AX_Y)  # left, top, right, bottom [pt]
PAPER = "#ffffff"
ENVELOPE = "#ece6dc"  # warm tint under the best-gear envelope
INKS = ("#14213d", "#9a3b1b", "#23645a", "#5c3470", "#5f5514", "#2f4f86")
DASHES: tuple[tuple[float, ...], ...] = (  # dash, gap, ... in line widths
    (),
    (7.0, 2.2),
    (1.6, 1.8),
    (7.0, 2.0, 1.6, 2.0),
    (3.6, 1.8),
    (10.0, 2.0, 1.6, 2.0, 1.6, 2.0),
)
MARKERS = ("o", "s", "^", "D", "v", "P")
LINE_WIDTH = 1.5
MARKER_SIZE = 3.6
SQUARE_HALF = 0.8  # half the side of a square marker [marker radii]
CHAR_EM = 0.58  # mean advance of DejaVu Sans digits and letters [em], for label boxes


@dataclass(frozen=True, slots=True)
class Stroke:
    """How a line is drawn: ink, width [pt] and dash pattern (on, off, ... [pt])."""

    ink: str
    width: float
    dash: tuple[float, ...] = ()


@dataclass(frozen=True, slots=True)
class Polyline:
    """An open line through points [pt]; ``clipped`` to the axes box."""

    x: FloatArray
    y: FloatArray
    stroke: Stroke
    round_join: bool = False
    clipped: bool = True


@dataclass(frozen=True, slots=True)
class Polygon:
    """A filled outline [pt], clipped to the axes box (the best-gear envelope)."""

    x: FloatArray
    y: FloatArray
    fill: str


@dataclass(frozen=True, slots=True)
class Line:
    """One straight line [pt]."""

    x1: float
    y1: float
    x2: float
    y2: float
    stroke: Stroke


@dataclass(frozen=True, slots=True)
class LineGroup:
    """Straight lines in one stroke: (x1, y1, x2, y2) each [pt]."""

    lines: tuple[tuple[float, float, float, float], ...]
    stroke: Stroke


@dataclass(frozen=True, slots=True)
class Frame:
    """The left and bottom axis lines meeting at (``left``, ``foot``), with tick marks."""

    left: float
    top: float
    foot: float
    right: float
    ticks: tuple[tuple[float, float, float, float], ...]
    stroke: Stroke


@dataclass(frozen=True, slots=True)
class Marker:
    """A data marker of ``kind`` (one of ``MARKERS``) centred on (x, y), ``size`` across."""

    kind: str
    x: float
    y: float
    size: float
    fill: str
    edge: Stroke


@dataclass(frozen=True, slots=True)
class Circle:
    """A circle (the gear badge) [pt]."""

    x: float
    y: float
    r: float
    fill: str
    edge: Stroke


@dataclass(frozen=True, slots=True)
class Rect:
    """A filled rectangle [pt] from its top-left corner, ``opacity`` in [0, 1]."""

    x: float
    y: float
    w: float
    h: float
    fill: str
    opacity: float


@dataclass(frozen=True, slots=True)
class Text:
    """A label with its baseline at ``y`` [pt]; ``anchor`` start, middle or end of the text
    at ``x``; ``rotated``: turned a quarter anticlockwise about (x, y), reading upwards."""

    x: float
    y: float
    text: str
    size: float
    fill: str
    anchor: str = "start"
    bold: bool = False
    italic: bool = False
    rotated: bool = False


Item = Polyline | Polygon | Line | LineGroup | Frame | Marker | Circle | Rect | Text


@dataclass(frozen=True, slots=True)
class GearLook:
    """How one gear is told apart: ink, dash pattern [line widths], marker, filled marker."""

    ink: str
    dash: tuple[float, ...]
    marker: str
    filled: bool


def gear_look(gear: int) -> GearLook:
    """The look of a gear (1 for first): ink, dash pattern and marker all differ, so the
    gears stay apart in greyscale; gears 7-12 repeat 1-6 with filled markers."""
    i = gear - 1
    return GearLook(
        INKS[i % len(INKS)], DASHES[i % len(DASHES)], MARKERS[i % len(MARKERS)], i >= len(MARKERS)
    )


def marker_points(kind: str, x: float, y: float, size: float) -> list[tuple[float, float]]:
    """Corners [pt] of a polygonal marker (every kind but the circle ``"o"``)."""
    r = size / 2.0
    if kind == "s":
        h = SQUARE_HALF * r
        offsets = [(-h, -h), (h, -h), (h, h), (-h, h)]
    elif kind == "^":
        offsets = [(0.0, -r), (r, r), (-r, r)]
    elif kind == "v":
        offsets = [(0.0, r), (r, -r), (-r, -r)]
    elif kind == "D":
        offsets = [(0.0, -r * 1.15), (r * 1.15, 0.0), (0.0, r * 1.15), (-r * 1.15, 0.0)]
    else:  # "P": a plus sign
        a, b = r / 3.0, r
        offsets = [(-a, -b), (a, -b), (a, -a), (b, -a), (b, a), (a, a), (a, b), (-a, b)]
        offsets += [(-a, a), (-b, a), (-b, -a), (-a, -a)]
    return [(x + dx, y + dy) for dx, dy in offsets]
