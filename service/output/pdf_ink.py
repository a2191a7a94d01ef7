"""Drawing operators for a PDF page, written straight into its content stream.

fpdf2 keeps the document (pages, fonts, images, compression, cross-references); the page
content, a few hundred text runs, rules and chart paths per sheet, is written here as PDF
operators (ISO 32000-1, sections 8 and 9) with the graphics state cached, which costs a
tenth of fpdf2's per-call path (measured in ``bench/sheets.py``). The methods are named as
fpdf2's, so the layout code reads the same; coordinates are mm from the top-left corner.
"""

from __future__ import annotations

import math
from collections.abc import Iterator, Sequence
from contextlib import contextmanager
from functools import lru_cache

from fpdf import FPDF

__all__ = ["Ink"]

RGB = tuple[int, int, int]
_STYLES = {"": "", "B": "B", "I": "I", "BI": "BI"}


def _escape(text: str) -> str:
    return text.replace("\\", "\\\\").replace("(", "\\(").replace(")", "\\)").replace("\r", "")


@lru_cache(maxsize=256)
def _rgb(color: RGB) -> str:
    return f"{color[0] / 255:.3f} {color[1] / 255:.3f} {color[2] / 255:.3f}"


class Ink:
    """A page's drawing state and operators, flushed into the page with ``flush``."""

    def __init__(self, pdf: FPDF) -> None:
        self.pdf = pdf
        self.k = pdf.k  # points per mm
        self.h = pdf.h  # page height [mm]
        self.l_margin = pdf.l_margin
        self.fontkey = "helvetica"
        self.font_size_pt = 8.0
        self._fill: RGB = (0, 0, 0)
        self._text: RGB = (0, 0, 0)
        self._draw: RGB = (0, 0, 0)
        self._ops: list[str] = []
        self._state: dict[str, str] = {}
        self._fonts_on_page: set[str] = set()
        self._angle: tuple[float, float, float] | None = None
        self._angle_origin = (0.0, 0.0)

    # state -------------------------------------------------------------------------
    def set_font(self, family: str, style: str = "", size: float = 8.0) -> None:
        self.fontkey = family.lower() + _STYLES[style.upper()]
        self.font_size_pt = size

    def set_text_color(self, r: int, g: int, b: int) -> None:
        self._text = (r, g, b)

    def set_fill_color(self, r: int, g: int, b: int) -> None:
        self._fill = (r, g, b)

    def set_draw_color(self, r: int, g: int, b: int) -> None:
        self._draw = (r, g, b)

    def set_line_width(self, width: float) -> None:
        self._set("w", f"{width * self.k:.2f} w")

    def set_dash_pattern(self, dash: float = 0.0, gap: float = 0.0) -> None:
        pattern = f"[{dash * self.k:.2f} {gap * self.k:.2f}] 0 d" if dash > 0 else "[] 0 d"
        self._set("d", pattern)

    def set_left_margin(self, margin: float) -> None:
        self.l_margin = margin

    def _set(self, key: str, op: str) -> None:
        if self._state.get(key) != op:
            self._state[key] = op
            self._ops.append(op)

    def _nonstroke(self, color: RGB) -> None:
        self._set("rg", f"{_rgb(color)} rg")

    def _stroke(self) -> None:
        self._set("RG", f"{_rgb(self._draw)} RG")

    def _xy(self, x: float, y: float) -> str:
        return f"{x * self.k:.2f} {(self.h - y) * self.k:.2f}"

    # drawing -----------------------------------------------------------------------
    def text(self, x: float, y: float, text: str) -> None:
        """``text`` with its baseline starting at (x, y) [mm], in the current font."""
        if not text:
            return
        font = self._font_number()
        self._nonstroke(self._text)
        if self._angle is None:
            place = f"{self._xy(x, y)} Td"
        else:
            cos, sin, _ = self._angle
            x, y = self._turn(x, y)
            place = f"{cos:.4f} {sin:.4f} {-sin:.4f} {cos:.4f} {self._xy(x, y)} Tm"
        self._ops.append(f"BT /F{font} {self.font_size_pt:.2f} Tf {place} ({_escape(text)}) Tj ET")

    def _font_number(self) -> int:
        fonts = self.pdf.fonts
        if self.fontkey not in fonts:
            family = "courier" if self.fontkey.startswith("courier") else "helvetica"
            self.pdf.set_font(family, self.fontkey[len(family) :], self.font_size_pt)
        font = fonts[self.fontkey]
        if self.fontkey not in self._fonts_on_page:
            self._fonts_on_page.add(self.fontkey)
            self.pdf._set_font_for_page(font, self.font_size_pt)  # registers the resource
        return int(font.i)

    def line(self, x1: float, y1: float, x2: float, y2: float) -> None:
        self._stroke()
        self._ops.append(f"{self._xy(x1, y1)} m {self._xy(x2, y2)} l S")

    def _path(self, points: Sequence[tuple[float, float]]) -> str:
        """A path through ``points``: one ``%`` over every coordinate, not a call a point."""
        flat: list[float] = []
        k, h = self.k, self.h
        for x, y in points:
            flat += (x * k, (h - y) * k)
        # a tenth of a point (0.035 mm) is finer than print resolves; the stream stays small
        return ("%.1f %.1f m " + "%.1f %.1f l " * (len(points) - 1)) % tuple(flat)

    def polyline(self, points: Sequence[tuple[float, float]], style: str = "D") -> None:
        if len(points) < 2:
            return
        self._stroke()
        self._ops.append(self._path(points) + " S")

    def polygon(self, points: Sequence[tuple[float, float]], style: str = "D") -> None:
        if len(points) < 3:
            return
        self._paint(self._path(points) + " h", style)

    def rect(self, x: float, y: float, w: float, h: float, style: str = "D") -> None:
        if self._angle is not None:
            corners = [(x, y), (x + w, y), (x + w, y + h), (x, y + h)]
            self.polygon([self._turn(px, py) for px, py in corners], style)
            return
        corner = f"{x * self.k:.2f} {(self.h - y - h) * self.k:.2f}"
        self._paint(f"{corner} {w * self.k:.2f} {h * self.k:.2f} re", style)

    def _turn(self, x: float, y: float) -> tuple[float, float]:
        """(x, y) [mm] turned about the rotation's centre (y grows down the page)."""
        if self._angle is None:
            return x, y
        cos, sin, _ = self._angle
        ox, oy = self._angle_origin
        return ox + (x - ox) * cos + (y - oy) * sin, oy - (x - ox) * sin + (y - oy) * cos

    def _paint(self, path: str, style: str) -> None:
        fill, draw = "F" in style.upper(), "D" in style.upper() or not style
        if fill:
            self._nonstroke(self._fill)
        if draw:
            self._stroke()
        self._ops.append(path + (" B" if fill and draw else " f" if fill else " S"))

    @contextmanager
    def rotation(self, angle: float, x: float, y: float) -> Iterator[None]:
        """Text and rectangles drawn inside turn ``angle`` degrees anticlockwise about
        (x, y)."""
        rad = math.radians(angle)
        self._angle = (math.cos(rad), math.sin(rad), rad)
        self._angle_origin = (x, y)
        try:
            yield
        finally:
            self._angle = None

    def set_char_spacing(self, spacing: float) -> None:
        self._ops.append(f"{spacing:.2f} Tc")

    def flush(self) -> None:
        """Write the page's operators (in a saved graphics state) and start afresh."""
        if self._ops:
            self.pdf._out("q\n" + "\n".join(self._ops) + "\nQ")
        self._ops = []
        self._state = {}
        self._fonts_on_page = set()
