"""Charts written straight to SVG from the page laid out by ``service.output.chart_layout``
(a chart is a few dozen elements; building a matplotlib figure for them cost 30-50x the
calculation it draws).

Text stays text in DejaVu Sans with fallbacks, coordinates are rounded to 0.01 pt and
nothing depends on the clock, so the same chart always gives the same bytes.
"""

from __future__ import annotations

from html import escape

from service.output import chart_page as page
from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_layout import chart_items
from service.output.chart_page import (
    AX_H,
    AX_W,
    AX_X,
    AX_Y,
    HEIGHT_PT,
    PAPER,
    SQUARE_HALF,
    WIDTH_PT,
    marker_points,
)

__all__ = ["svg_chart"]

FONT = "'DejaVu Sans', Verdana, Arial, Helvetica, sans-serif"
_PAIR = "{:.2f},{:.2f}"
_CLIP = ' clip-path="url(#plot)"'


def _n(x: float) -> str:
    """A coordinate: rounded to 0.01 and without a needless ".0"."""
    text = f"{x:.2f}".rstrip("0").rstrip(".")
    return "0" if text == "-0" else text


def _points(item: page.Polyline | page.Polygon) -> str:
    """``x,y`` pairs to 0.01 pt, one format call per point (the bulk of the document: a
    chart has about a thousand)."""
    return " ".join(map(_PAIR.format, item.x.tolist(), item.y.tolist()))


def _dash(stroke: page.Stroke) -> str:
    return f' stroke-dasharray="{",".join(_n(d) for d in stroke.dash)}"' if stroke.dash else ""


def _stroke(stroke: page.Stroke) -> str:
    return f'stroke="{stroke.ink}" stroke-width="{_n(stroke.width)}"{_dash(stroke)}'


def _line(x1: float, y1: float, x2: float, y2: float) -> str:
    return f'<line x1="{_n(x1)}" y1="{_n(y1)}" x2="{_n(x2)}" y2="{_n(y2)}"'


def _text(
    x: float,
    y: float,
    text: str,
    size: float,
    fill: str,
    *,
    anchor: str = "start",
    weight: str = "",
    italic: bool = False,
    rotate: bool = False,
    baseline: str = "",
) -> str:
    attrs = [f'x="{_n(x)}"', f'y="{_n(y)}"', f'font-size="{_n(size)}"', f'fill="{fill}"']
    if anchor != "start":
        attrs.append(f'text-anchor="{anchor}"')
    if weight:
        attrs.append(f'font-weight="{weight}"')
    if italic:
        attrs.append('font-style="italic"')
    if baseline:
        attrs.append(f'dominant-baseline="{baseline}"')
    if rotate:
        attrs.append(f'transform="rotate(-90 {_n(x)} {_n(y)})"')
    return f"<text {' '.join(attrs)}>{escape(text)}</text>"


def _marker(kind: str, x: float, y: float, size: float, fill: str, edge: str, lw: float) -> str:
    style = f'fill="{fill}" stroke="{edge}" stroke-width="{_n(lw)}"'
    if kind == "o":
        return f'<circle cx="{_n(x)}" cy="{_n(y)}" r="{_n(size / 2.0)}" {style}/>'
    if kind == "s":
        h = SQUARE_HALF * (size / 2.0)
        return (
            f'<rect x="{_n(x - h)}" y="{_n(y - h)}" width="{_n(2 * h)}" height="{_n(2 * h)}" '
            f"{style}/>"
        )
    text = " ".join(f"{_n(px)},{_n(py)}" for px, py in marker_points(kind, x, y, size))
    return f'<polygon points="{text}" {style}/>'


def _element(item: page.Item) -> str:
    if isinstance(item, page.Text):
        return _text(
            item.x,
            item.y,
            item.text,
            item.size,
            item.fill,
            anchor=item.anchor,
            weight="bold" if item.bold else "",
            italic=item.italic,
            rotate=item.rotated,
        )
    if isinstance(item, page.Marker):
        m = item
        return _marker(m.kind, m.x, m.y, m.size, m.fill, m.edge.ink, m.edge.width)
    if isinstance(item, page.Polyline):
        join = ' stroke-linejoin="round"' if item.round_join else ""
        s = item.stroke
        return (
            f'<polyline points="{_points(item)}" fill="none" stroke="{s.ink}" '
            f'stroke-width="{_n(s.width)}"{join}{_dash(s)}{_CLIP if item.clipped else ""}/>'
        )
    if isinstance(item, page.Polygon):
        return f'<polygon points="{_points(item)}" fill="{item.fill}"{_CLIP}/>'
    if isinstance(item, page.Circle):
        return (
            f'<circle cx="{_n(item.x)}" cy="{_n(item.y)}" r="{_n(item.r)}" '
            f'fill="{item.fill}" {_stroke(item.edge)}/>'
        )
    if isinstance(item, page.Line):
        return f"{_line(item.x1, item.y1, item.x2, item.y2)} {_stroke(item.stroke)}/>"
    if isinstance(item, page.Rect):
        return (
            f'<rect x="{_n(item.x)}" y="{_n(item.y)}" width="{_n(item.w)}" '
            f'height="{_n(item.h)}" fill="{item.fill}" fill-opacity="{_n(item.opacity)}"/>'
        )
    if isinstance(item, page.LineGroup):
        return f"<g {_stroke(item.stroke)}>{''.join(_line(*xy) + '/>' for xy in item.lines)}</g>"
    f = item
    return (
        f'<path d="M{_n(f.left)},{_n(f.top)} V{_n(f.foot)} H{_n(f.right)}" fill="none" '
        f"{_stroke(f.stroke)}/><g {_stroke(f.stroke)}>"
        f"{''.join(_line(*xy) + '/>' for xy in f.ticks)}</g>"
    )


def svg_chart(chart: TractiveForceChart | RunChart) -> bytes:
    """The chart as a stand-alone SVG document (UTF-8), the same bytes for the same chart."""
    head = (
        '<?xml version="1.0" encoding="utf-8" standalone="no"?>\n'
        f'<svg xmlns="http://www.w3.org/2000/svg" width="{_n(WIDTH_PT)}pt" '
        f'height="{_n(HEIGHT_PT)}pt" viewBox="0 0 {_n(WIDTH_PT)} {_n(HEIGHT_PT)}" '
        f'font-family="{FONT}">\n'
        f'<defs><clipPath id="plot"><rect x="{_n(AX_X)}" y="{_n(AX_Y - AX_H)}" '
        f'width="{_n(AX_W)}" height="{_n(AX_H)}"/></clipPath></defs>\n'
        f'<rect width="100%" height="100%" fill="{PAPER}"/>\n'
    )
    body = "\n".join(map(_element, chart_items(chart)))
    return (head + body + "\n</svg>\n").encode("utf-8")
