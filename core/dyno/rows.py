"""The data rows of a dyno export: split into cells, checked, summary and blank rows skipped.

:mod:`core.dyno.parse` finds the header and the used columns; this module turns the lines
under it into one list of stripped cell texts per used column, in three passes that stay
in C where they can (one CSV reader over all lines, one regular-expression search over the
joined text for summary labels, one list per column):

* **Width.** A row with non-empty cells beyond the header's count (a decimal comma in a
  comma-separated file) or ending before a used column (a truncated file) is an error
  naming its line and column. Trailing empty cells and wholly empty rows are fine.
* **Summary rows.** Exports often end with rows such as ``Max;6500;352`` or
  ``Average;...``. A row whose first non-empty cell starts with ``max``, ``maximum``,
  ``min``, ``minimum``, ``peak``, ``average``, ``avg``, ``mean``, ``median``, ``total``,
  ``sum`` or ``std`` (any case, as a whole word), or whose x cell is not a number and holds
  such a word in any cell, is skipped with a notice naming its lines.
* **Blank cells.** A row whose x cell or curve cell is empty is skipped with a notice
  naming the first. An empty cell in the check column (power beside torque) only leaves
  that row out of the check.
"""

from __future__ import annotations

import re
from collections.abc import Sequence

import numpy as np

from core.dyno.columns import DynoColumn
from core.errors import DynoFileError
from core.notices import Notice

__all__ = ["column_texts"]

_SUMMARY_LABEL = re.compile(
    r"(?:^|[\t;,])[ \t\"]*(max|maximum|min|minimum|peak|average|avg|mean|median|total|sum"
    r"|std|stdev)(?![a-z])",
    re.IGNORECASE | re.MULTILINE,
)
_SUMMARY_WORDS = ("max", "min", "peak", "av", "mean", "median", "total", "sum", "std")
_NUMBER_LIKE = re.compile(r"[+-]?[\d.,]*\d[\d.,]*(?:[eE][+-]?\d+)?")
_SHOWN_LINES = 5

Lines = Sequence[tuple[int, str]]


def _check_widths(
    data: Lines, rows: list[list[str]], columns: Sequence[DynoColumn], width: int
) -> None:
    """Reject a row with cells beyond the header's or one ending before a used column."""
    need = max(c.column for c in columns)
    lengths = list(map(len, rows))
    if lengths.count(width) == len(lengths):
        return
    for k in (k for k, n in enumerate(lengths) if n != width):
        number, cells = data[k][0], rows[k]
        extra = [j for j in range(width, len(cells)) if cells[j].strip()]
        if extra:
            raise DynoFileError(
                f"`text` line {number} has {len(cells)} cells but the header has {width}; "
                "is a decimal comma used in a comma-separated file?",
                line=number,
                column=extra[0] + 1,
            )
        if len(cells) < need and any(c.strip() for c in cells):
            col = next(c for c in columns if c.column > len(cells))
            raise DynoFileError(
                f"`text` line {number} ends after {len(cells)} cell(s), before column "
                f"{col.column} ({col.header!r}); is the file truncated?",
                line=number,
                column=col.column,
            )


def _summary_rows(data: Lines, rows: list[list[str]], x: int) -> set[int]:
    """Indices of summary rows (rule in the module docstring)."""
    lines = [line for _, line in data]
    joined = "\n".join(lines)
    lower = joined.lower()
    if not any(word in lower for word in _SUMMARY_WORDS):
        return set()
    hits = list(_SUMMARY_LABEL.finditer(joined))
    if not hits:
        return set()
    starts = np.cumsum([0] + [len(line) + 1 for line in lines[:-1]])
    out = set()
    for hit in hits:
        k = int(np.searchsorted(starts, hit.start(), side="right")) - 1
        row = rows[k]
        first = next((c.strip().strip('"').lower() for c in row if c.strip()), "")
        x_cell = row[x - 1].strip() if x <= len(row) else ""
        if re.match(rf"{hit.group(1).lower()}(?![a-z])", first) or not _NUMBER_LIKE.fullmatch(
            x_cell
        ):
            out.add(k)
    return out


def _notices(data: Lines, summary: list[int], blank: list[tuple[int, int]]) -> list[Notice]:
    """Notices for the summary rows and blank rows skipped."""
    out = []
    if summary:
        shown = ", ".join(str(data[k][0]) for k in summary[:_SHOWN_LINES])
        more = ", ..." if len(summary) > _SHOWN_LINES else ""
        out.append(
            Notice(
                "summary_rows_skipped",
                f"{len(summary)} summary row(s) (max, average, peak ...) were skipped: "
                f"line(s) {shown}{more}.",
                "text",
            )
        )
    if blank:
        k, column = blank[0]
        out.append(
            Notice(
                "blank_rows_skipped",
                f"{len(blank)} row(s) with a blank cell in a used column were skipped (first "
                f"on line {data[k][0]}, column {column}).",
                "text",
            )
        )
    return out


def column_texts(
    data: Lines, rows: list[list[str]], columns: Sequence[DynoColumn], width: int
) -> tuple[list[int], list[list[str]], list[Notice]]:
    """The kept rows' lines and the stripped cells of each used column.

    Parameters
    ----------
    data : sequence of (int, str)
        1-based line number and text of each data line.
    rows : list of list of str
        Their cells, from :func:`split_rows`.
    columns : sequence of DynoColumn
        The x column, the curve's column, then a check column if any.
    width : int
        The header's cell count.

    Returns
    -------
    lines : list of int
        1-based line of each kept row.
    texts : list of list of str
        For each used column, its stripped cell on each kept row.
    notices : list of Notice
        Summary rows and blank rows skipped.

    Raises
    ------
    DynoFileError
        For a row too wide for the header or ending before a used column.
    """
    _check_widths(data, rows, columns, width)
    need = max(c.column for c in columns)
    if min(map(len, rows), default=need) >= need:
        texts = [[row[c.column - 1].strip() for row in rows] for c in columns]
    else:
        texts = [
            [row[c.column - 1].strip() if c.column <= len(row) else "" for row in rows]
            for c in columns
        ]
    summary = _summary_rows(data, rows, columns[0].column)
    blank: dict[int, int] = {}
    for col, cells in zip(columns[:2], texts[:2], strict=False):
        if "" in cells:
            for k in (k for k, t in enumerate(cells) if not t and k not in summary):
                blank.setdefault(k, col.column)
    notices = _notices(data, sorted(summary), sorted(blank.items()))
    skip = summary | blank.keys()
    lines = [number for number, _ in data]
    if skip:
        kept = [k for k in range(len(rows)) if k not in skip]
        lines = [lines[k] for k in kept]
        texts = [[cells[k] for k in kept] for cells in texts]
    return lines, texts, notices
