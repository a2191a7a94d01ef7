"""Blocks of a typeset PDF sheet and the page flow that places them.

A sheet is a list of blocks, each with a measured height and a way to draw itself at a
given top. The flow puts them on pages in order: a block that does not fit starts a new
page; a block marked ``keep_with_next`` moves with the block after it (so a heading never
ends a page without its table, and the cautions never stand alone); a table row that
starts a page draws its table's column heads above it again.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field
from functools import lru_cache

from fpdf.fonts import CORE_FONTS_CHARWIDTHS

from service.output.pdf_ink import Ink

__all__ = ["Block", "Placed", "em_width", "flow", "latin", "text_width", "wrap"]


@dataclass
class Block:
    """A piece of a sheet: its height [mm] and how to draw it with its top at ``y``."""

    height: float
    draw: Callable[[Ink, float], None]
    keep_with_next: bool = False
    repeat: Block | None = None  # drawn above this block when it starts a page
    gap_before: float = 0.0  # dropped at the top of a page
    new_page: bool = False  # always start a page (the appendix)
    extra: dict[str, float] = field(default_factory=dict)


@dataclass(frozen=True)
class Placed:
    """A block placed on a page at ``y`` [mm] (its header first, when it has one)."""

    block: Block
    y: float
    with_repeat: bool


@lru_cache(maxsize=16384)
def latin(text: str) -> str:
    """Text the PDF standard fonts can show (Latin-1), anything else as ``?``.

    >>> latin("3,5 N·m ≥ 2")
    '3,5 N·m ? 2'
    """
    return text.encode("latin-1", "replace").decode("latin-1")


@lru_cache(maxsize=8192)
def em_width(fontkey: str, text: str) -> int:
    """Advance width of ``text`` in thousandths of an em, from the standard font metrics."""
    widths = CORE_FONTS_CHARWIDTHS[fontkey]
    return sum(widths.get(ch, 500) for ch in text)


def text_width(pdf: Ink, text: str) -> float:
    """Width [mm] of ``text`` in the current standard font: the font's metrics, summed."""
    return em_width(pdf.fontkey, text) * pdf.font_size_pt * 0.001 / pdf.k


def wrap(pdf: Ink, text: str, width: float) -> list[str]:
    """Words of ``text`` in lines no wider than ``width`` [mm] in the current font."""
    lines: list[str] = []
    line = ""
    for word in latin(text).split():
        trial = f"{line} {word}" if line else word
        if line and text_width(pdf, trial) > width:
            lines.append(line)
            line = word
        else:
            line = trial
    return [*lines, line] if line else lines or [""]


def _chain_height(blocks: list[Block], start: int) -> float:
    """Height of the block at ``start`` and every block it keeps with."""
    total, k = 0.0, start
    while True:
        total += blocks[k].height + (blocks[k].gap_before if k > start else 0.0)
        if not blocks[k].keep_with_next or k + 1 >= len(blocks):
            return total
        k += 1


def flow(blocks: list[Block], first_top: float, top: float, bottom: float) -> list[list[Placed]]:
    """Pages of placed blocks: ``first_top`` is where page 1's flow starts, ``top`` the
    others', ``bottom`` where every page's flow must end [mm from the top edge]."""
    pages: list[list[Placed]] = [[]]
    y = first_top
    for k, block in enumerate(blocks):
        empty = not pages[-1]
        gap = 0.0 if empty else block.gap_before
        if not empty and (block.new_page or y + gap + _chain_height(blocks, k) > bottom):
            pages.append([])
            y, gap, empty = top, 0.0, True
        repeat = empty and block.repeat is not None
        pages[-1].append(Placed(block, y + gap, repeat))
        y += gap + block.height + (block.repeat.height if repeat and block.repeat else 0.0)
    return pages
