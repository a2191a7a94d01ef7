"""The blocks of a typeset PDF sheet: headings, facts, tables, notes, key figures, cautions.

Type is the PDF standard Helvetica (nothing to embed, every reader has it); figures are set
right-aligned in their columns with the unit under the column name; rules are light.
Every builder measures with the font it will draw in, so the flow's heights are exact.
"""

from __future__ import annotations

from collections.abc import Sequence
from functools import lru_cache

from service.output.model import Column, KeyFigure, Section, Table
from service.output.pdf_ink import Ink
from service.output.pdf_layout import Block, em_width, latin, text_width, wrap

__all__ = [
    "INK",
    "NAVY",
    "cautions_block",
    "key_figure_block",
    "section_blocks",
]

NAVY = (20, 33, 61)
INK = (22, 22, 22)
GREY = (85, 85, 85)
RULE = (205, 205, 205)
RUST = (154, 59, 27)
BODY_PT = 8.0
ROW_MM = 4.0
LABEL_MM = 30.0
PAD_MM = 1.7  # each side of a table cell
GUTTER_MM = 7.0  # between tables set side by side
SIDE_BY_SIDE_ROWS = 12  # tables this short may share a row
MIN_SIDE_BY_SIDE_SCALE = 0.85  # ... set at most this much narrower
KEEP_FACTS = 24  # a section with at most this many facts keeps them on one page


def _heading(pdf: Ink, width: float, text: str) -> Block:
    def draw(pdf: Ink, y: float) -> None:
        pdf.set_font("helvetica", "B", 9)
        pdf.set_text_color(*NAVY)
        pdf.text(pdf.l_margin, y + 3.6, latin(text.upper()))
        pdf.set_draw_color(140, 140, 140)
        pdf.set_line_width(0.2)
        pdf.line(pdf.l_margin, y + 5.0, pdf.l_margin + width, y + 5.0)

    return Block(6.6, draw, keep_with_next=True, gap_before=3.0)


def _fact(pdf: Ink, width: float, label: str, value: str) -> Block:
    pdf.set_font("helvetica", "", BODY_PT)
    lines = wrap(pdf, value, width - LABEL_MM)

    def draw(pdf: Ink, y: float) -> None:
        pdf.set_text_color(*GREY)
        pdf.set_font("helvetica", "B", BODY_PT - 0.5)
        pdf.text(pdf.l_margin, y + 2.9, latin(label))
        pdf.set_text_color(*INK)
        pdf.set_font("helvetica", "", BODY_PT)
        for i, line in enumerate(lines):
            pdf.text(pdf.l_margin + LABEL_MM, y + 2.9 + 3.5 * i, line)

    return Block(3.5 * len(lines) + 0.4, draw)


def _note(pdf: Ink, width: float, text: str, bullet: bool, size: float = BODY_PT - 0.8) -> Block:
    pdf.set_font("helvetica", "", size)
    indent = 3.0 if bullet else 0.0
    lines = wrap(pdf, text, width - indent)
    step = size * 0.44

    def draw(pdf: Ink, y: float) -> None:
        pdf.set_font("helvetica", "", size)
        pdf.set_text_color(*(INK if bullet else GREY))
        if bullet:
            pdf.text(pdf.l_margin + 0.6, y + step * 0.85, "-")
        for i, line in enumerate(lines):
            pdf.text(pdf.l_margin + indent, y + step * (0.85 + i), line)

    return Block(step * len(lines) + 0.6, draw)


def _widths(pdf: Ink, table: Table, size: float) -> list[float]:
    """Each column's width [mm]: its widest text plus padding (kept for the render)."""
    return list(_column_widths(table, size, pdf.k))


@lru_cache(maxsize=64)
def _column_widths(table: Table, size: float, k: float) -> tuple[float, ...]:
    def width(fontkey: str, pt: float, text: str) -> float:
        return em_width(fontkey, latin(text)) * pt * 0.001 / k

    out = []
    for i, col in enumerate(table.columns):
        head = width("helveticaB", size - 0.5, col.name)
        unit = width("helvetica", size - 1.0, col.unit)
        cells = max((width("helvetica", size, r[i]) for r in table.rows), default=0.0)
        out.append(max(head, unit, cells) + 2 * PAD_MM)
    return tuple(out)


def _fit(pdf: Ink, table: Table, width: float) -> tuple[float, list[float]]:
    """Font size and column widths [mm]: the body size, smaller when many columns."""
    size = BODY_PT
    widths = _widths(pdf, table, size)
    while sum(widths) > width and size > 5.5:
        size -= 0.5
        widths = _widths(pdf, table, size)
    if sum(widths) > width:  # last resort: squeeze the padding
        scale = width / sum(widths)
        widths = [w * scale for w in widths]
    return size, widths


def _cell(pdf: Ink, text: str, x: float, w: float, y: float, col: Column) -> None:
    text = latin(text)
    if col.text:
        pdf.text(x + PAD_MM, y, text)
    else:
        pdf.text(x + w - PAD_MM - text_width(pdf, text), y, text)


def _table_blocks(pdf: Ink, width: float, table: Table) -> list[Block]:
    size, widths = _fit(pdf, table, width)
    has_units = any(c.unit for c in table.columns)
    head_h = 4.2 + (2.9 if has_units else 0.0)
    row_h = ROW_MM * size / BODY_PT
    total = sum(widths)

    def head(pdf: Ink, y: float) -> None:
        x = pdf.l_margin
        for col, w in zip(table.columns, widths, strict=True):
            pdf.set_font("helvetica", "B", size - 0.5)
            pdf.set_text_color(*INK)
            _cell(pdf, col.name, x, w, y + 3.2, col)
            if col.unit:
                pdf.set_font("helvetica", "", size - 1.0)
                pdf.set_text_color(*GREY)
                _cell(pdf, col.unit, x, w, y + 6.0, col)
            x += w
        pdf.set_draw_color(*INK)
        pdf.set_line_width(0.3)
        pdf.line(pdf.l_margin, y + head_h - 0.4, pdf.l_margin + total, y + head_h - 0.4)

    def row(cells: Sequence[str], last: bool) -> Block:
        def draw(pdf: Ink, y: float) -> None:
            pdf.set_font("helvetica", "", size)
            pdf.set_text_color(*INK)
            x = pdf.l_margin
            for cell, col, w in zip(cells, table.columns, widths, strict=True):
                _cell(pdf, cell, x, w, y + row_h * 0.72, col)
                x += w
            pdf.set_draw_color(*(INK if last else RULE))
            pdf.set_line_width(0.25 if last else 0.1)
            pdf.line(pdf.l_margin, y + row_h, pdf.l_margin + total, y + row_h)

        return Block(row_h, draw)

    rows = table.rows or (("none", *("" for _ in table.columns[1:])),)
    header = Block(head_h, head)
    title_h = 4.6

    def titled(pdf: Ink, y: float) -> None:
        pdf.set_font("helvetica", "B", BODY_PT)
        pdf.set_text_color(*NAVY)
        pdf.text(pdf.l_margin, y + 3.2, latin(table.title))
        head(pdf, y + title_h)

    first = Block(title_h + head_h, titled, keep_with_next=True, gap_before=2.4)
    blocks = [first]
    for k, cells in enumerate(rows):
        block = row(cells, k == len(rows) - 1)
        block.repeat = header
        block.keep_with_next = k < 2 or (k >= len(rows) - 3 and k < len(rows) - 1)
        blocks.append(block)
    if table.note:
        blocks[-1].keep_with_next = True
        note = _note(pdf, width, table.note, bullet=False, size=BODY_PT - 1.2)
        note.gap_before = 0.8
        blocks.append(note)
    return blocks


def _side_by_side(pdf: Ink, width: float, left: Table, right: Table) -> Block | None:
    """Two short tables in one row when both fit at full size, else None."""
    if max(len(left.rows), len(right.rows)) > SIDE_BY_SIDE_ROWS:
        return None
    w_left = sum(_widths(pdf, left, BODY_PT))
    w_right = sum(_widths(pdf, right, BODY_PT))
    scale = (width - GUTTER_MM) / (w_left + w_right)
    if scale < MIN_SIDE_BY_SIDE_SCALE:
        return None
    if scale < 1.0:  # a little smaller type keeps them side by side (``_fit`` shrinks it)
        w_left, w_right = w_left * scale, w_right * scale
    parts = (_table_blocks(pdf, w_left, left), _table_blocks(pdf, w_right, right))
    heights = [sum(b.height for b in part) + sum(b.gap_before for b in part[1:]) for part in parts]

    def draw(pdf: Ink, y: float) -> None:
        margin = pdf.l_margin
        for part, x in zip(parts, (margin, margin + w_left + GUTTER_MM), strict=True):
            pdf.set_left_margin(x)
            at = y
            for k, block in enumerate(part):
                at += block.gap_before if k else 0.0
                block.draw(pdf, at)
                at += block.height
        pdf.set_left_margin(margin)

    return Block(max(heights), draw, gap_before=2.4)


def section_blocks(pdf: Ink, width: float, section: Section) -> list[Block]:
    """A section: its heading kept with what follows, facts, tables (two short ones side by
    side when they fit), notes."""
    blocks = [_heading(pdf, width, section.heading)]
    facts = [_fact(pdf, width, label, value) for label, value in section.facts]
    if len(facts) <= KEEP_FACTS:  # a short list of facts is read as one: keep it whole
        for fact in facts[:-1]:
            fact.keep_with_next = True
    blocks += facts
    tables = list(section.tables)
    while tables:
        pair = _side_by_side(pdf, width, tables[0], tables[1]) if len(tables) > 1 else None
        if pair is not None:
            blocks.append(pair)
            tables = tables[2:]
        else:
            blocks += _table_blocks(pdf, width, tables.pop(0))
    for note in section.notes:
        block = _note(pdf, width, note, bullet=True)
        block.gap_before = 0.6
        blocks.append(block)
    return blocks


def key_figure_block(pdf: Ink, width: float, figures: Sequence[KeyFigure]) -> Block:
    """The figures a reader looks for first, set large in a row of boxes."""
    per_row = min(max(len(figures), 1), 4)
    rows = [figures[i : i + per_row] for i in range(0, len(figures), per_row)]
    box_w, box_h = width / per_row, 15.0

    def draw(pdf: Ink, y: float) -> None:
        for r, row in enumerate(rows):
            top = y + r * (box_h + 1.5)
            for i, fig in enumerate(row):
                x = pdf.l_margin + i * box_w
                pdf.set_fill_color(244, 241, 235)
                pdf.rect(x + 0.6, top, box_w - 1.2, box_h, style="F")
                pdf.set_font("helvetica", "B", 6.3)
                pdf.set_text_color(*GREY)
                pdf.text(x + 2.6, top + 3.8, latin(fig.label.upper()))
                pdf.set_font("helvetica", "B", 15)
                pdf.set_text_color(*NAVY)
                value = latin(fig.value)
                pdf.text(x + 2.6, top + 10.0, value)
                shown = text_width(pdf, value)
                pdf.set_font("helvetica", "", 8)
                pdf.set_text_color(*INK)
                pdf.text(x + 3.6 + shown, top + 10.0, latin(fig.unit))
                if fig.note:
                    pdf.set_font("helvetica", "", 6.3)
                    pdf.set_text_color(*GREY)
                    note = wrap(pdf, fig.note, box_w - 5.0)[0]
                    pdf.text(x + 2.6, top + 13.4, note)

    return Block(len(rows) * (box_h + 1.5), draw, gap_before=2.0)


def cautions_block(pdf: Ink, width: float, cautions: Sequence[str]) -> Block:
    """Every caution in a ruled box, kept whole."""
    size = 7.0
    pdf.set_font("helvetica", "", size)
    wrapped = [wrap(pdf, c, width - 9.0) for c in cautions]
    step = size * 0.42
    height = 7.5 + step * sum(len(w) for w in wrapped) + 0.8 * len(wrapped)

    def draw(pdf: Ink, y: float) -> None:
        pdf.set_draw_color(*NAVY)
        pdf.set_line_width(0.35)
        pdf.rect(pdf.l_margin, y, width, height - 1.0)
        pdf.set_font("helvetica", "B", 7.5)
        pdf.set_text_color(*RUST)
        pdf.text(pdf.l_margin + 3.0, y + 4.2, "CAUTIONS")
        pdf.set_font("helvetica", "", size)
        pdf.set_text_color(*INK)
        at = y + 7.2
        for lines in wrapped:
            pdf.text(pdf.l_margin + 3.0, at, "-")
            for line in lines:
                pdf.text(pdf.l_margin + 5.6, at, line)
                at += step
            at += 0.8

    return Block(height, draw, gap_before=3.0)
