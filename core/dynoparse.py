"""Splitting a dyno export into its header and the cells of the used columns.

The rules (size limits, skipped lines, delimiter, decimal mark) are described in
:mod:`core.dynofile`, which builds the torque curve from the cells found here. Every error
is a :class:`~core.errors.DynoFileError` carrying the 1-based line and column.
"""

from __future__ import annotations

import csv
import enum
import re
from dataclasses import dataclass

from core.dynocolumns import (
    ColumnQuantity,
    DynoColumn,
    HeaderCell,
    read_header_cell,
    unit_from_text,
)
from core.errors import DynoFileError
from core.plan import Notice

__all__ = [
    "MAX_COLUMNS",
    "MAX_LINES",
    "MAX_TEXT_CHARS",
    "Cell",
    "Delimiter",
    "Table",
    "read_table",
]

MAX_TEXT_CHARS = 1_000_000
MAX_LINES = 20_000
MAX_COLUMNS = 64
_DELIMITER_PROBE_LINES = 20
_HEADER_SEARCH_LINES = 100

_FORBIDDEN = re.compile("[\x00-\x08\x0b-\x0c\x0e-\x1f\x7f-\x9f\ufffd\ufffe\uffff\ud800-\udfff]")
_COMMENT_PREFIXES = ("#", "//")


class Delimiter(enum.Enum):
    """The cell separator of an export."""

    TAB = "\t"
    SEMICOLON = ";"
    COMMA = ","


@dataclass(frozen=True)
class Cell:
    """One cell of the export.

    Attributes
    ----------
    line : int
        1-based line number.
    column : int
        1-based column (cell) number.
    text : str
        The cell's text, stripped of surrounding space.
    """

    line: int
    column: int
    text: str


@dataclass(frozen=True)
class Table:
    """The used columns of an export and their cells.

    Attributes
    ----------
    delimiter : Delimiter
        The cell separator found.
    header_line : int
        1-based line of the header row.
    columns : tuple of DynoColumn
        The engine-speed column, then torque and/or power, in that order.
    rows : tuple of tuple of Cell
        One tuple per data row, a cell for each entry of ``columns``.
    notices : tuple of Notice
        Lines skipped above the header, further candidate columns left unused.
    """

    delimiter: Delimiter
    header_line: int
    columns: tuple[DynoColumn, ...]
    rows: tuple[tuple[Cell, ...], ...]
    notices: tuple[Notice, ...]


def _position(text: str, index: int) -> tuple[int, int]:
    """1-based (line, character) of ``text[index]``."""
    line_start = text.rfind("\n", 0, index) + 1
    return text.count("\n", 0, index) + 1, index - line_start + 1


def _check_text(text: object) -> str:
    """Validate size and content; return the text with uniform line breaks."""
    if not isinstance(text, str):
        raise DynoFileError(
            f"`text` must be a str (decode the file first), got {type(text).__name__}"
        )
    if len(text) > MAX_TEXT_CHARS:
        raise DynoFileError(f"`text` must be at most {MAX_TEXT_CHARS} characters, got {len(text)}")
    text = text.removeprefix("\ufeff").replace("\r\n", "\n").replace("\r", "\n")
    bad = _FORBIDDEN.search(text)
    if bad is not None:
        line, column = _position(text, bad.start())
        char = bad.group()
        if char == "\x00":
            what = "a NUL character: this looks like binary data, not a text export"
        elif char == "\ufffd" or "\ud800" <= char <= "\udfff":
            what = f"U+{ord(char):04X}, left by bytes that were not valid text when decoded"
        else:
            what = f"the control character U+{ord(char):04X}, which a text export cannot hold"
        raise DynoFileError(
            f"`text` line {line}, character {column} is {what}", line=line, column=column
        )
    lines = text.count("\n") + (0 if text.endswith("\n") else 1)
    if lines > MAX_LINES:
        raise DynoFileError(f"`text` must be at most {MAX_LINES} lines, got {lines}")
    if not text.strip():
        raise DynoFileError("`text` must hold a header row and data rows, got empty text")
    return text


def _split(line: str, number: int, delimiter: Delimiter) -> list[str]:
    """The stripped cells of one line."""
    try:
        cells = next(csv.reader([line], delimiter=delimiter.value, strict=True))
    except csv.Error as exc:
        raise DynoFileError(
            f"`text` line {number} cannot be split into cells: {exc}", line=number
        ) from exc
    if len(cells) > MAX_COLUMNS:
        raise DynoFileError(
            f"`text` line {number} must have at most {MAX_COLUMNS} cells, got {len(cells)}",
            line=number,
            column=MAX_COLUMNS + 1,
        )
    return [c.strip() for c in cells]


def _significant(text: str) -> list[tuple[int, str]]:
    """(line number, line) for every line that is neither blank nor a comment."""
    out = []
    for number, line in enumerate(text.split("\n"), start=1):
        stripped = line.strip()
        if stripped and not stripped.startswith(_COMMENT_PREFIXES):
            out.append((number, line))
    return out


_NUMBER_LIKE = re.compile(r"[+-]?[\d.,]*\d[\d.,]*(?:[eE][+-]?\d+)?")


@dataclass(frozen=True)
class _Header:
    """The header row found: its place, delimiter, cells and what each cell says."""

    index: int
    line: int
    delimiter: Delimiter
    cells: list[str]
    read: list[HeaderCell]
    units_row: int | None


def _cells_or_none(line: str, delimiter: Delimiter) -> list[str] | None:
    """The stripped cells of a line, or None when it does not split cleanly."""
    try:
        return [c.strip() for c in next(csv.reader([line], delimiter=delimiter.value))]
    except csv.Error:
        return None


def _header_candidates(
    line: str, below: str | None
) -> list[tuple[Delimiter, list[str], list[HeaderCell], bool]]:
    """Delimiters that split a line into engine-speed and torque or power columns.

    ``below`` is the next line, read as a units row when it is one.
    """
    found = []
    for delimiter in Delimiter:
        cells = _cells_or_none(line, delimiter) if delimiter.value in line else None
        if cells is None:
            continue
        under = _cells_or_none(below, delimiter) if below is not None else None
        is_units = (
            under is not None
            and any(unit_from_text(u) is not None for u in under)
            and not any(_NUMBER_LIKE.fullmatch(u) for u in under)
        )
        if under is None or not is_units:
            under = []
        under += [""] * (len(cells) - len(under))
        pairs = zip(cells[: MAX_COLUMNS + 1], under, strict=False)
        read = [read_header_cell(c, u) for c, u in pairs]
        kinds = {r.quantity for r in read}
        if ColumnQuantity.ENGINE_SPEED in kinds and kinds & {
            ColumnQuantity.TORQUE,
            ColumnQuantity.POWER,
        }:
            found.append((delimiter, cells, read, is_units))
    return found


def _find_header(significant: list[tuple[int, str]]) -> _Header:
    """The first line naming engine speed and torque or power, split at its best delimiter."""
    for index, (number, line) in enumerate(significant[:_HEADER_SEARCH_LINES]):
        below = significant[index + 1] if index + 1 < len(significant) else None
        candidates = _header_candidates(line, below[1] if below else None)
        if not candidates:
            continue
        probe = significant[index + 1 : index + 1 + _DELIMITER_PROBE_LINES]
        scores = [
            sum(len(_cells_or_none(t, delimiter) or ()) == len(cells) for _, t in probe)
            for delimiter, cells, _, _ in candidates
        ]
        delimiter, cells, read, is_units = candidates[scores.index(max(scores))]
        if len(cells) > MAX_COLUMNS:
            raise DynoFileError(
                f"`text` line {number} must have at most {MAX_COLUMNS} cells, got {len(cells)}",
                line=number,
                column=MAX_COLUMNS + 1,
            )
        units_row = below[0] if below is not None and is_units else None
        return _Header(index, number, delimiter, cells, read, units_row)
    raise DynoFileError(
        f"`text` has no header row (searched {_HEADER_SEARCH_LINES} lines, not counting "
        "blank and comment lines) naming an engine-speed column (e.g. 'RPM') and a torque or "
        "power column with its unit (e.g. 'Torque (Nm)', 'Power [hp]')"
    )


def _pick(quantity: ColumnQuantity, header: _Header) -> tuple[int, HeaderCell] | None:
    """The column to use for a quantity: the first with a unit, else the first without."""
    read = header.read
    usable = [(i, r) for i, r in enumerate(read) if r.quantity is quantity and r.problem is None]
    with_unit = [(i, r) for i, r in usable if r.unit is not None]
    if with_unit or usable:
        return (with_unit or usable)[0]
    faulty = [(i, r) for i, r in enumerate(read) if r.quantity is quantity]
    if faulty:
        i, r = faulty[0]
        line = header.units_row if r.problem_in_units_row else header.line
        raise DynoFileError(
            f"`text` line {line}, column {i + 1}: {r.problem}", line=line, column=i + 1
        )
    return None


def _used_columns(header: _Header) -> list[DynoColumn]:
    """The used columns with their units: engine speed, then torque and/or power."""
    columns = []
    for pick in (_pick(q, header) for q in ColumnQuantity):
        if pick is None:
            continue
        i, read = pick
        if read.unit is None:
            raise DynoFileError(
                f"`text` line {header.line}, column {i + 1}: header {header.cells[i]!r} "
                "names no unit; write it in brackets, e.g. 'Torque (Nm)' or 'Power [kW]'",
                line=header.line,
                column=i + 1,
            )
        columns.append(DynoColumn(i + 1, header.cells[i], read.unit.quantity, read.unit))
    return columns


def read_table(text: str) -> Table:
    """Find the header, delimiter and used columns of an export, and collect their cells.

    Parameters
    ----------
    text : str
        The whole export.

    Returns
    -------
    Table
        Delimiter, header line, used columns and their cells, notices.

    Raises
    ------
    DynoFileError
        On oversize or binary text, a missing header, a header naming a wrong unit, rows
        too short for the used columns (a truncated file) or too long for the header.
    """
    significant = _significant(_check_text(text))
    header = _find_header(significant)
    columns = _used_columns(header)
    data = significant[header.index + (2 if header.units_row is not None else 1) :]
    notices = []
    if header.index:
        notices.append(
            Notice(
                "lines_above_header_skipped",
                f"{header.index} line(s) above the header on line {header.line} were skipped.",
                "text",
            )
        )
    used = {c.column for c in columns}
    unused = [
        repr(header.cells[i])
        for i, r in enumerate(header.read)
        if r.quantity is not None and i + 1 not in used
    ]
    if unused:
        notices.append(
            Notice(
                "columns_unused",
                f"Further column(s) {', '.join(unused)} were not used; the first usable "
                "column of each quantity was.",
                "text",
            )
        )
    width = len(header.cells)
    rows = tuple(_row(n, t, header.delimiter, columns, width) for n, t in data)
    return Table(header.delimiter, header.line, tuple(columns), rows, tuple(notices))


def _row(
    number: int, line: str, delimiter: Delimiter, columns: list[DynoColumn], width: int
) -> tuple[Cell, ...]:
    """The used cells of one data row."""
    cells = _split(line, number, delimiter)
    extra = [j for j in range(width, len(cells)) if cells[j]]
    if extra:
        raise DynoFileError(
            f"`text` line {number} has {len(cells)} cells but the header has {width}; "
            "is a decimal comma used in a comma-separated file?",
            line=number,
            column=extra[0] + 1,
        )
    out = []
    for col in columns:
        if col.column > len(cells):
            raise DynoFileError(
                f"`text` line {number} ends after {len(cells)} cell(s), before column "
                f"{col.column} ({col.header!r}); is the file truncated?",
                line=number,
                column=col.column,
            )
        out.append(Cell(number, col.column, cells[col.column - 1]))
    return tuple(out)
