"""Delimited text exports, as dyno and data-logger software write them.

What the dyno and logger readers share: uniform line breaks and a byte-order mark dropped;
characters a text export cannot hold found with their place; blank and comment lines
skipped; the delimiter of a header line chosen by how many of the lines under it split into
as many cells; data lines split into cells with each row keeping its line number. Each
reader raises its own error (:class:`~core.errors.DynoFileError`,
:class:`~core.errors.LogDataError`), passed in as ``error``, naming line and column.
"""

from __future__ import annotations

import csv
import enum
import re
from collections.abc import Sequence

import numpy as np

from core.errors import DynoFileError, LogDataError

__all__ = [
    "MAX_TEXT_CHARS",
    "Delimiter",
    "best_delimiter",
    "cells_or_none",
    "forbidden_character",
    "normalised_text",
    "significant_lines",
    "split_rows",
]

MAX_TEXT_CHARS = 1_000_000
"""Most characters an export may hold."""

Lines = Sequence[tuple[int, str]]
ReaderError = type[DynoFileError] | type[LogDataError]

_FORBIDDEN = re.compile("[\x00-\x08\x0b-\x0c\x0e-\x1f\x7f-\x9f\ufffd\ufffe\uffff\ud800-\udfff]")
# a line break before a blank or comment line (searched in "\n" + text: a literal prefix)
_SKIPPED_LINE = re.compile(r"\n(?=[^\S\n]*(?:#|//|\n|\Z))")


class Delimiter(enum.Enum):
    """The cell separator of an export."""

    TAB = "\t"
    SEMICOLON = ";"
    COMMA = ","


def normalised_text(text: str) -> str:
    """``text`` without a leading byte-order mark and with ``\\n`` line breaks only."""
    return text.removeprefix("\ufeff").replace("\r\n", "\n").replace("\r", "\n")


def forbidden_character(text: str) -> tuple[int, int, str] | None:
    """1-based line and character position, and the character, of the first character a
    text export cannot hold (a control character, NUL, a replacement character or a lone
    surrogate), or None; ``text`` has ``\\n`` line breaks only.

    Examples
    --------
    >>> forbidden_character("rpm;Nm\\n2000;1\\x0050")
    (2, 7, '\\x00')
    """
    bad = _FORBIDDEN.search(text)
    if bad is None:
        return None
    index = bad.start()
    line_start = text.rfind("\n", 0, index) + 1
    return text.count("\n", 0, index) + 1, index - line_start + 1, bad.group()


def significant_lines(text: str) -> list[tuple[int, str]]:
    """(line number, line) for every line that is neither blank nor a comment.

    A comment line's first non-blank characters are ``#`` or ``//``; ``text`` has ``\\n``
    line breaks only.

    Examples
    --------
    >>> significant_lines("# made-up run\\nrpm;Nm\\n\\n2000;150\\n")
    [(2, 'rpm;Nm'), (4, '2000;150')]
    """
    lines = text.split("\n")
    hits = [m.start() for m in _SKIPPED_LINE.finditer("\n" + text)]
    if not hits:
        return list(enumerate(lines, start=1))
    starts = np.cumsum([0] + [len(line) + 1 for line in lines[:-1]])
    skipped = set(np.searchsorted(starts, hits, side="right").tolist())
    return [(k, line) for k, line in enumerate(lines, start=1) if k not in skipped]


def cells_or_none(line: str, delimiter: Delimiter) -> list[str] | None:
    """The stripped cells of a line, or None when it does not split cleanly."""
    try:
        return [c.strip() for c in next(csv.reader([line], delimiter=delimiter.value))]
    except csv.Error:
        return None


def best_delimiter(
    cell_counts: Sequence[int], delimiters: Sequence[Delimiter], probe: Lines
) -> int:
    """Index of the delimiter under which most ``probe`` lines split into as many cells as
    the header line does (``cell_counts``, one per delimiter); the first on a tie."""
    scores = [
        sum(len(cells_or_none(t, delimiter) or ()) == count for _, t in probe)
        for delimiter, count in zip(delimiters, cell_counts, strict=True)
    ]
    return scores.index(max(scores))


def _split_line(
    line: str, number: int, delimiter: str, max_columns: int | None, error: ReaderError
) -> list[str]:
    """The cells of one line, strictly quoted."""
    try:
        cells = next(csv.reader([line], delimiter=delimiter, strict=True))
    except csv.Error as exc:
        raise error(
            f"`text` line {number} cannot be split into cells: {exc}",
            parameter="text",
            line=number,
        ) from exc
    if max_columns is not None and len(cells) > max_columns:
        raise error(
            f"`text` line {number} must have at most {max_columns} cells, got {len(cells)}",
            parameter="text",
            line=number,
            column=max_columns + 1,
        )
    return cells


def split_rows(
    data: Lines, delimiter: Delimiter, error: ReaderError, max_columns: int | None = None
) -> list[list[str]]:
    """The cells of every data line (unstripped).

    Without quotes a line is split at each delimiter (what a CSV reader does then); with
    one, each line goes through a strict CSV reader of its own, so a quote cannot join
    lines and each row keeps its own line number.

    Parameters
    ----------
    data : sequence of (int, str)
        1-based line number and text of each data line.
    delimiter : Delimiter
        The cell separator.
    error : type of DynoFileError or LogDataError
        The reader's error.
    max_columns : int or None
        Most cells a line may have.

    Returns
    -------
    list of list of str

    Raises
    ------
    DynoFileError or LogDataError
        ``error`` for a line that cannot be split or has too many cells.
    """
    lines = [line for _, line in data]
    if '"' not in "\n".join(lines):
        rows = [line.split(delimiter.value) for line in lines]
        if max_columns is None or max(map(len, rows), default=0) <= max_columns:
            return rows
    return [_split_line(line, k, delimiter.value, max_columns, error) for k, line in data]
