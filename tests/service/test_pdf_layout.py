"""The page flow of typeset PDF sheets: what moves to the next page, and with what.

The rules are the common practice of book and report typesetting: a heading is never the
last line of a page ("keep with next"), a table continued on a new page repeats its
column heads, and a closing block does not stand alone on a page of its own.
"""

from __future__ import annotations

import pytest

from service.output.pdf_ink import Ink
from service.output.pdf_layout import Block, flow, latin, wrap


def _noop(pdf: Ink, y: float) -> None:
    del pdf, y


def _block(height: float, **kwargs: object) -> Block:
    return Block(height, _noop, **kwargs)  # type: ignore[arg-type]


def test_blocks_that_fit_share_one_page() -> None:
    pages = flow([_block(10.0), _block(20.0), _block(30.0)], 0.0, 0.0, 100.0)
    assert len(pages) == 1
    assert [p.y for p in pages[0]] == [0.0, 10.0, 30.0]


def test_a_heading_never_ends_a_page_without_what_follows() -> None:
    heading = _block(5.0, keep_with_next=True)
    blocks = [_block(90.0), heading, _block(10.0)]
    pages = flow(blocks, 0.0, 0.0, 100.0)
    assert [len(p) for p in pages] == [1, 2]
    assert pages[1][0].block is heading and pages[1][0].y == 0.0


def test_the_closing_block_moves_with_the_block_before_it() -> None:
    rows = [_block(10.0) for _ in range(9)]
    rows[-1].keep_with_next = True  # as the sheet marks the last content block
    cautions = _block(15.0)
    pages = flow([*rows, cautions], 0.0, 0.0, 100.0)
    assert len(pages) == 2
    assert [p.block for p in pages[1]] == [rows[-1], cautions]


def test_a_row_starting_a_page_repeats_the_column_heads() -> None:
    header = _block(6.0)
    rows = [_block(10.0, repeat=header) for _ in range(12)]
    pages = flow(rows, 0.0, 0.0, 100.0)
    assert len(pages) == 2
    assert pages[1][0].with_repeat and not pages[1][1].with_repeat
    assert pages[1][1].y == pytest.approx(16.0)  # heads (6) + first row (10)


def test_a_gap_is_dropped_at_the_top_of_a_page() -> None:
    pages = flow([_block(95.0), _block(10.0, gap_before=4.0)], 0.0, 0.0, 100.0)
    assert pages[1][0].y == 0.0


def test_the_appendix_starts_a_page_and_no_page_is_left_empty() -> None:
    pages = flow([_block(10.0), _block(10.0, new_page=True)], 0.0, 0.0, 100.0)
    assert [len(p) for p in pages] == [1, 1]
    assert all(pages)


def test_text_wraps_to_the_width_and_becomes_latin_1() -> None:
    from fpdf import FPDF

    pdf = FPDF(unit="mm")
    pdf.add_page()
    ink = Ink(pdf)
    ink.set_font("helvetica", "", 8)
    lines = wrap(ink, "word " * 40, 50.0)
    assert len(lines) > 1 and all(line.split() for line in lines)
    assert latin("N·m ≤ 5") == "N·m ? 5"
