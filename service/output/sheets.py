"""Plain-text sheets for work orders: at most 80 columns, printable ASCII.

Every summary and text report is built from these pieces, so a sheet looks and wraps the
same whichever endpoint writes it.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Iterable, Sequence

from core import Notice
from service.mapping.documents import notice_text
from service.output.cautions import SHORT_CAUTION
from service.units import UnitSystem

__all__ = [
    "WIDTH",
    "cell",
    "printable",
    "printable_line",
    "summary_sheet",
    "title_line",
    "wrap_text",
]

WIDTH = 80


def wrap_text(text: str, indent: str = "") -> list[str]:
    """Lines of at most 80 columns, continuation lines indented two spaces."""
    return textwrap.wrap(
        text, WIDTH, initial_indent=indent, subsequent_indent="  ", break_on_hyphens=False
    )


def cell(value: float | None, width: int, fmt: str, signed: bool = False) -> str:
    """A number right-aligned in ``width`` columns, ``-`` for a missing one."""
    if value is None or not math.isfinite(value):
        return "-".rjust(width)
    return format(value, ("+" if signed else "") + fmt).rjust(width)


def title_line(head: str, reference: str | None) -> str:
    """The sheet's heading with the caller's reference flush right."""
    ref = f"ref: {reference}" if reference else ""
    return head + ref.rjust(WIDTH - len(head))


def printable_line(line: str) -> str:
    """One line as printable ASCII, cut to 80 columns, trailing blanks dropped.

    >>> printable_line("3,5 N·m   ")
    '3,5 N?m'
    """
    return line.encode("ascii", "replace").decode("ascii")[:WIDTH].rstrip()


def printable(lines: Iterable[str]) -> str:
    """Lines joined into a sheet, each made printable."""
    return "\n".join(printable_line(line) for line in lines)


def summary_sheet(
    head: str,
    reference: str | None,
    body: list[str],
    notices: Sequence[Notice],
    units: UnitSystem,
    caution: str = SHORT_CAUTION,
) -> str:
    """A titled sheet: heading and reference, body, warnings (in the caller's ``units``) and
    the caution."""
    lines = [title_line(head, reference), *body]
    if notices:
        lines += ["", "Warnings:"]
        for n in notices:
            lines += wrap_text(notice_text(n, units), "- ")
    lines += ["", *wrap_text("Caution: " + caution)]
    return printable(lines)
