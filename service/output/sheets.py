"""Plain-text sheets for work orders: at most 80 columns, printable ASCII.

Every summary and text report is built from these pieces, so a sheet looks and wraps the
same whichever endpoint writes it.
"""

from __future__ import annotations

import math
import textwrap
from collections.abc import Iterable, Sequence

from core import Notice
from service.output.cautions import SHORT_CAUTION

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
    """Lines of at most 80 columns, continuation lines indented two spaces: the lines of
    ``textwrap.wrap`` (without breaking on hyphens).

    A sentence of printable ASCII words, each of at most 78 characters, one space between
    them, is filled word by word here, as textwrap fills it: a word joins the line while
    the line, its space and the word fit; every other text goes to textwrap itself.

    >>> wrap_text(" ".join(["one two three"] * 9), "- ")[1]
    '  three one two three one two three one two three'
    """
    words = _plain_words(text, indent)
    if words is None:
        return textwrap.wrap(
            text, WIDTH, initial_indent=indent, subsequent_indent="  ", break_on_hyphens=False
        )
    lines = []
    line, room = indent + words[0], WIDTH - len(indent) - len(words[0])
    for word in words[1:]:
        if len(word) < room:
            line += " " + word
            room -= len(word) + 1
        else:
            lines.append(line)
            line, room = "  " + word, WIDTH - 2 - len(word)
    lines.append(line)
    return lines


def _plain_words(text: str, indent: str) -> list[str] | None:
    """The words of a sentence of printable ASCII with single spaces between words of at
    most 78 characters and an indent of at most two; None for any other text."""
    if not (text and text.isascii() and text.isprintable() and len(indent) <= 2):
        return None
    if text[0] == " " or text[-1] == " " or "  " in text:
        return None
    words = text.split(" ")
    if max(map(len, words)) > WIDTH - 2:
        return None
    return words


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
    """Lines joined into a sheet, each made printable (lines of ASCII only are already:
    they are only cut and stripped)."""
    lines = list(lines)
    if all(line.isascii() for line in lines):
        return "\n".join(line[:WIDTH].rstrip() for line in lines)
    return "\n".join(printable_line(line) for line in lines)


def summary_sheet(
    head: str,
    reference: str | None,
    body: list[str],
    notices: Sequence[Notice],
    caution: str = SHORT_CAUTION,
) -> str:
    """A titled sheet: heading and reference, body, warnings and the caution."""
    lines = [title_line(head, reference), *body]
    if notices:
        lines += ["", "Warnings:"]
        for n in notices:
            lines += wrap_text(n.message, "- ")
    lines += ["", *wrap_text("Caution: " + caution)]
    return printable(lines)
