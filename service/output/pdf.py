"""A report as a typeset PDF sheet (fpdf2): letterhead, job block, key figures, chart, tables.

One template for every sheet the service prints. Page 1 carries the letterhead (the shop's
from settings, or the service's neutral header), the title and reference, the job block
when the request gives one, the units and the short caution, the key figures set large,
and the chart when the sheet has one; the sections follow as typeset blocks (see
``service.output.pdf_layout``), then the cautions in full, kept with the content before them,
then the appendix when asked for. Later pages carry a one-line running head. Every page
has a footer with the page count. Paper is A4 or US Letter (``GEARWORK_SHEET_PAPER``, or
by the request's units). Fonts are the PDF standard fonts (nothing to embed, nothing to
parse per request) and no dates are written, so the same request gives the same bytes.
"""

from __future__ import annotations

import io
from datetime import UTC, datetime

from fpdf import FPDF

from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_data_track import PlotChart
from service.output.letterhead import Letterhead, get_letterhead
from service.output.model import Report
from service.output.pdf_blocks import (
    GREY,
    INK,
    NAVY,
    RUST,
    cautions_block,
    key_figure_block,
    section_blocks,
)
from service.output.pdf_chart import Box, draw_pdf_chart
from service.output.pdf_chart_track import draw_track_chart
from service.output.pdf_ink import Ink
from service.output.pdf_layout import Block, Placed, flow, latin, text_width, wrap

__all__ = ["PAPERS", "paper_for", "render_pdf"]

PAPERS = {"a4": (210.0, 297.0), "letter": (215.9, 279.4)}  # [mm]
SIDE_MM, TOP_MM, BOTTOM_MM = 14.0, 11.0, 13.0
CHART_MM = 66.0
_FIXED_DATE = datetime(2000, 1, 1, tzinfo=UTC)  # written as the date: same bytes


def paper_for(setting: str, units: str) -> str:
    """The paper name: the setting, or for ``auto`` US Letter in US units, else A4.

    >>> paper_for("auto", "us"), paper_for("auto", "metric"), paper_for("a4", "us")
    ('letter', 'a4', 'a4')
    """
    if setting in PAPERS:
        return setting
    return "letter" if units == "us" else "a4"


def _letterhead(pdf: Ink, head: Letterhead, width: float) -> float:
    """The letterhead at the top of page 1; returns its height [mm]."""
    x, y = pdf.l_margin, TOP_MM
    if head.logo:
        pdf.pdf.image(
            io.BytesIO(head.logo), x=x + width - 40.0, y=y, w=40.0, h=14.0, keep_aspect_ratio=True
        )
    if head.neutral:
        pdf.set_font("helvetica", "B", 8)
        pdf.set_text_color(*GREY)
        pdf.set_char_spacing(2.2)
        pdf.text(x, y + 3.5, "GEARWORK")
        pdf.set_char_spacing(0)
        pdf.set_font("helvetica", "", 7)
        pdf.text(x, y + 7.2, "Gearing and shift-point calculation")
        height = 9.0
    else:
        pdf.set_font("helvetica", "B", 13)
        pdf.set_text_color(*NAVY)
        pdf.text(x, y + 5.0, latin(head.name))
        pdf.set_font("helvetica", "", 7.5)
        pdf.set_text_color(*INK)
        for i, line in enumerate(head.lines):
            pdf.text(x, y + 9.0 + 3.3 * i, latin(line))
        height = max(14.0, 7.5 + 3.3 * len(head.lines))
    pdf.set_draw_color(*NAVY)
    pdf.set_line_width(0.6)
    pdf.line(x, y + height + 1.0, x + width, y + height + 1.0)
    return height + 2.0


def _title(pdf: Ink, report: Report, width: float, y: float) -> float:
    x = pdf.l_margin
    pdf.set_font("helvetica", "B", 17)
    pdf.set_text_color(*NAVY)
    pdf.text(x, y + 7.0, latin(report.kind))
    if report.reference:
        pdf.set_font("helvetica", "", 6.5)
        pdf.set_text_color(*GREY)
        pdf.text(x + width - text_width(pdf, "REFERENCE"), y + 2.6, "REFERENCE")
        pdf.set_font("courier", "B", 11)
        pdf.set_text_color(*INK)
        ref = latin(report.reference)
        pdf.text(x + width - text_width(pdf, ref), y + 7.0, ref)
    y += 10.0
    if report.job:
        pdf.set_fill_color(244, 241, 235)
        cols = 3
        rows = (len(report.job) + cols - 1) // cols
        pdf.rect(x, y, width, 4.2 * rows + 1.6, style="F")
        for k, (label, value) in enumerate(report.job):
            cx, cy = x + 2.0 + (k % cols) * width / cols, y + 3.6 + 4.2 * (k // cols)
            pdf.set_font("helvetica", "B", 6.5)
            pdf.set_text_color(*GREY)
            pdf.text(cx, cy, latin(label.upper()))
            shift = text_width(pdf, latin(label.upper())) + 1.6
            pdf.set_font("helvetica", "", 8)
            pdf.set_text_color(*INK)
            room = width / cols - shift - 4.0
            pdf.text(cx + shift, cy, wrap(pdf, value, room)[0] if value else "")
        y += 4.2 * rows + 3.0
    pdf.set_font("helvetica", "", 6.8)
    pdf.set_text_color(*GREY)
    for line in wrap(pdf, "Units: " + report.units, width):
        pdf.text(x, y + 2.6, line)
        y += 3.0
    pdf.set_text_color(*INK)
    lines = wrap(pdf, "Caution: " + report.short_caution, width - 3.0)
    pdf.set_fill_color(*RUST)
    pdf.rect(x, y + 0.6, 0.7, 3.0 * len(lines), style="F")
    for line in lines:
        pdf.text(x + 2.4, y + 2.9, line)
        y += 3.0
    return y + 1.0


SheetChart = TractiveForceChart | RunChart | PlotChart


def _chart_block(report: Report, chart: SheetChart, width: float) -> Block:
    def draw(pdf: Ink, y: float) -> None:
        x = pdf.l_margin
        pdf.set_font("helvetica", "B", 9.5)
        pdf.set_text_color(*NAVY)
        pdf.text(x, y + 4.0, latin(chart.title))
        pdf.set_font("helvetica", "", 6.5)
        pdf.set_text_color(*GREY)
        pdf.text(x, y + 7.4, latin(chart.subtitle))
        box = Box(x + 14.0, y + 11.0, width - 22.0, CHART_MM - 24.0)
        if isinstance(chart, PlotChart):
            draw_track_chart(pdf, box, chart)
        else:
            draw_pdf_chart(pdf, box, chart)
        pdf.set_font("helvetica", "", 6.5)
        pdf.set_text_color(*GREY)
        pdf.text(x, y + CHART_MM - 1.5, wrap(pdf, report.chart_caption, width)[0])

    return Block(CHART_MM, draw, gap_before=2.0)


def _blocks(pdf: Ink, report: Report, chart: SheetChart | None, width: float) -> list[Block]:
    blocks: list[Block] = []
    if report.key_figures:
        blocks.append(key_figure_block(pdf, width, report.key_figures))
    if chart is not None:
        blocks.append(_chart_block(report, chart, width))
    for section in report.sections:
        blocks += section_blocks(pdf, width, section)
    if blocks:
        blocks[-1].keep_with_next = True  # the cautions never stand alone on a page
    blocks.append(cautions_block(pdf, width, report.cautions))
    for k, section in enumerate(report.appendix):
        part = section_blocks(pdf, width, section)
        part[0].new_page = k == 0
        blocks += part
    return blocks


def _running_head(pdf: Ink, report: Report, head: Letterhead, width: float) -> None:
    pdf.set_font("helvetica", "B", 7)
    pdf.set_text_color(*NAVY)
    name = "GEARWORK" if head.neutral else head.name
    pdf.text(pdf.l_margin, TOP_MM + 3.0, latin(f"{name}  |  {report.kind}"))
    if report.reference:
        ref = latin(f"ref {report.reference}")
        pdf.text(pdf.l_margin + width - text_width(pdf, ref), TOP_MM + 3.0, ref)
    pdf.set_draw_color(*NAVY)
    pdf.set_line_width(0.3)
    pdf.line(pdf.l_margin, TOP_MM + 4.6, pdf.l_margin + width, TOP_MM + 4.6)


def _footer(pdf: Ink, report: Report, number: int, count: int, width: float) -> None:
    y = pdf.h - BOTTOM_MM + 6.0
    pdf.set_font("helvetica", "", 6.5)
    pdf.set_text_color(*GREY)
    pdf.text(pdf.l_margin, y, latin(f"{report.kind}  |  page {number} of {count}"))
    note = "Calculated from the data supplied, not measured."
    pdf.text(pdf.l_margin + width - text_width(pdf, note), y, note)


def _draw(pdf: Ink, placed: Placed) -> None:
    y = placed.y
    repeat = placed.block.repeat
    if placed.with_repeat and repeat is not None:
        repeat.draw(pdf, y)
        y += repeat.height
    placed.block.draw(pdf, y)


def render_pdf(
    report: Report,
    chart: SheetChart | None,
    paper: str = "a4",
    letterhead: Letterhead | None = None,
) -> bytes:
    """The sheet as PDF bytes, the same bytes for the same report, paper and letterhead."""
    head = letterhead or get_letterhead()
    page_w, page_h = PAPERS[paper]
    pdf = FPDF(unit="mm", format=(page_w, page_h))
    pdf.set_margins(SIDE_MM, TOP_MM, SIDE_MM)
    pdf.set_auto_page_break(False)
    pdf.set_creation_date(_FIXED_DATE)
    pdf.set_title(latin(f"{report.kind} {report.reference or ''}".strip()))
    pdf.set_creator("gearwork")
    pdf.set_producer("gearwork")
    width = page_w - 2 * SIDE_MM
    pdf.add_page()
    ink = Ink(pdf)
    top = TOP_MM + _letterhead(ink, head, width)
    first_top = _title(ink, report, width, top)
    pages = flow(_blocks(ink, report, chart, width), first_top, TOP_MM + 7.0, page_h - BOTTOM_MM)
    for number, page in enumerate(pages, start=1):
        if number > 1:
            ink.flush()
            pdf.add_page()
            _running_head(ink, report, head, width)
        for placed in page:
            _draw(ink, placed)
        _footer(ink, report, number, len(pages), width)
    ink.flush()
    return bytes(pdf.output())
