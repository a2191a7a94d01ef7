"""A report as PDF through matplotlib's PDF backend: a title block, the chart, the tables.

The first page carries the title block (kind, reference, units, the short caution) and
the chart; the sections follow in Courier, line for line as on the text report, over as many
pages as they need, breaking at a blank line where one is near. Pages are A4 with margins
wide enough (at least 20 mm top and bottom) that printing on US Letter, centred or fitted,
loses nothing. No dates are written, so the same request gives the same bytes.
"""

from __future__ import annotations

import io
import logging

from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.backends.backend_pdf import PdfPages
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle

from service.chart_data import RunChart, TractiveForceChart
from service.charts import INKS, draw_chart, drawing
from service.report_model import Report
from service.report_text import report_body_lines, wrap_text

__all__ = ["render_pdf"]

PAGE_IN = (8.27, 11.69)  # A4 portrait
LEFT_IN, RIGHT_IN, TOP_IN, BOTTOM_IN = 0.8, 0.8, 0.85, 0.85
MONO = "Courier"
BODY_PT = 8.3  # 80 columns of Courier are 48 em: 5.5 in at this size
# the PDF standard fonts: nothing to embed or subset (subsetting TrueType cost ~0.8 s a
# report), every reader has them, and the text stays searchable; all text is ASCII
PDF_RC = {
    "pdf.use14corefonts": True,
    "font.family": "Helvetica",
    "font.weight": "medium",  # the standard fonts' regular weight
    "axes.labelweight": "medium",
}
LINE_PT = BODY_PT * 1.3
TITLE_BLOCK_IN = 1.45


def _not_a_weight_note(record: logging.LogRecord) -> bool:
    # the standard fonts have no "normal" weight, only "medium"; matplotlib says so once
    # per font lookup, which is expected here and not worth a log line
    return not str(record.msg).startswith("findfont: Failed to find font weight")


logging.getLogger("matplotlib.font_manager").addFilter(_not_a_weight_note)
CHART_IN = 3.9
NAVY = INKS[0]


def _y(fig_height_in: float, from_top_in: float) -> float:
    return 1.0 - from_top_in / fig_height_in


def _page(report: Report, number: int, count: int) -> Figure:
    fig = Figure(figsize=PAGE_IN, dpi=72, facecolor="#ffffff")
    FigureCanvasAgg(fig)
    w, h = PAGE_IN
    ref = f"ref {report.reference}   |   " if report.reference else ""
    fig.text(
        LEFT_IN / w,
        (BOTTOM_IN - 0.35) / h,
        f"gearwork   |   {report.kind}   |   {ref}page {number} of {count}",
        fontsize=7,
        color="#555555",
    )
    fig.text(
        1.0 - RIGHT_IN / w,
        (BOTTOM_IN - 0.35) / h,
        "Calculated from the data supplied, not measured.",
        ha="right",
        fontsize=7,
        color="#555555",
    )
    return fig


def _title_block(fig: Figure, report: Report) -> None:
    w, h = PAGE_IN
    x0, x1 = LEFT_IN / w, 1.0 - RIGHT_IN / w
    top, bottom = _y(h, TOP_IN), _y(h, TOP_IN + TITLE_BLOCK_IN)
    fig.patches.append(
        Rectangle(
            (x0, bottom),
            x1 - x0,
            top - bottom,
            transform=fig.transFigure,
            fill=False,
            edgecolor=NAVY,
            linewidth=1.4,
        )
    )
    pad = 0.14 / w
    fig.text(x0 + pad, _y(h, TOP_IN + 0.27), "G E A R W O R K", fontsize=7.5, color="#555555")
    fig.text(
        x0 + pad,
        _y(h, TOP_IN + 0.62),
        report.kind,
        fontsize=19,
        fontweight="bold",
        color=NAVY,
    )
    fig.text(x1 - pad, _y(h, TOP_IN + 0.27), "Reference", ha="right", fontsize=7.5, color="#555")
    fig.text(
        x1 - pad,
        _y(h, TOP_IN + 0.62),
        report.reference or "none given",
        ha="right",
        fontsize=12 if report.reference else 9,
        fontweight="bold",
        family=MONO,
        color="#161616",
    )
    notes = wrap_text("Units: " + report.units) + wrap_text("Caution: " + report.short_caution)
    for i, line in enumerate(notes[:6]):
        fig.text(x0 + pad, _y(h, TOP_IN + 0.84 + 0.11 * i), line, fontsize=6.6, family=MONO)


def _chart(fig: Figure, chart: TractiveForceChart | RunChart) -> None:
    w, h = PAGE_IN
    x0 = LEFT_IN / w
    top = TOP_IN + TITLE_BLOCK_IN + 0.3
    fig.text(x0, _y(h, top), chart.title, fontsize=10.5, fontweight="bold", color=NAVY)
    fig.text(x0, _y(h, top + 0.2), chart.subtitle, fontsize=7, color="#4d4d4d")
    axes_top, axes_bottom = top + 0.35, top + CHART_IN - 0.3
    left = x0 + 0.55 / w
    ax = fig.add_axes(
        (left, _y(h, axes_bottom), 1.0 - RIGHT_IN / w - left, (axes_bottom - axes_top) / h)
    )
    draw_chart(ax, chart)


def _text(fig: Figure, lines: list[str], from_top_in: float) -> None:
    w, h = PAGE_IN
    for i, line in enumerate(lines):
        if line:
            fig.text(
                LEFT_IN / w,
                _y(h, from_top_in + i * LINE_PT / 72.0),
                line,
                va="top",
                fontsize=BODY_PT,
                family=MONO,
                color="#161616",
            )


def _capacity(space_in: float) -> int:
    return max(1, int(space_in * 72.0 // LINE_PT))


def _paginate(lines: list[str], first: int, rest: int) -> list[list[str]]:
    """Split lines into pages, breaking at a blank line within the last eighth if any."""
    pages: list[list[str]] = []
    start = 0
    while start < len(lines):
        room = first if not pages else rest
        end = min(start + room, len(lines))
        if end < len(lines):
            for k in range(end, max(start + 1, end - room // 8), -1):
                if lines[k - 1] == "":
                    end = k
                    break
        pages.append(lines[start:end])
        start = end
        while start < len(lines) and lines[start] == "" and start > 0:
            start += 1
    return pages


def render_pdf(report: Report, chart: TractiveForceChart | RunChart) -> bytes:
    """The report as PDF bytes, the same bytes for the same report."""
    h = PAGE_IN[1]
    body_top_first = TOP_IN + TITLE_BLOCK_IN + 0.3 + CHART_IN + 0.15
    pages = _paginate(
        report_body_lines(report),
        _capacity(h - body_top_first - BOTTOM_IN),
        _capacity(h - TOP_IN - BOTTOM_IN),
    )
    out = io.BytesIO()
    title = f"{report.kind} {report.reference}" if report.reference else report.kind
    metadata = {
        "Title": title,
        "Creator": "gearwork",
        "Producer": "gearwork",
        "CreationDate": None,
        "ModDate": None,
    }
    with drawing(PDF_RC), PdfPages(out, metadata=metadata) as pdf:
        for number, lines in enumerate(pages, start=1):
            fig = _page(report, number, len(pages))
            if number == 1:
                _title_block(fig, report)
                _chart(fig, chart)
                _text(fig, lines, body_top_first)
            else:
                _text(fig, lines, TOP_IN)
            pdf.savefig(fig)
    return out.getvalue()
