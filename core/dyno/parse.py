"""Splitting a dyno export into its header and the cells of the used columns.

The rules (size limits, skipped lines, delimiter, decimal mark) are described in
:mod:`core.dyno.file`, which builds the torque curve from the cells found here. Every error
is a :class:`~core.errors.DynoFileError` carrying the 1-based line and column.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from core.dyno.columns import (
    ColumnQuantity,
    DynoColumn,
    HeaderCell,
    read_header_cell,
    unit_from_text,
)
from core.dyno.rows import column_texts
from core.errors import DynoFileError
from core.notices import Notice
from core.readers.delimited import (
    MAX_TEXT_CHARS,
    Delimiter,
    best_delimiter,
    cells_or_none,
    forbidden_character,
    normalised_text,
    significant_lines,
    split_rows,
)

__all__ = [
    "MAX_COLUMNS",
    "MAX_LINES",
    "MAX_TEXT_CHARS",
    "Cell",
    "Table",
    "read_table",
]

MAX_LINES = 20_000
MAX_COLUMNS = 64
_DELIMITER_PROBE_LINES = 20
_HEADER_SEARCH_LINES = 100


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
    """The used columns of an export and their cells, column by column.

    Attributes
    ----------
    delimiter : Delimiter
        The cell separator found.
    header_line : int
        1-based line of the header row.
    columns : tuple of DynoColumn
        The x column (engine speed, or road speed in a speed-based export), then the
        column the curve is read from (torque, else power, else tractive force), then a
        power column to check torque against, if any.
    lines : tuple of int
        1-based line of each data row kept.
    cells : tuple of tuple of str
        For each entry of ``columns``, its stripped cell on each kept row; a check column
        may hold empty cells.
    notices : tuple of Notice
        Lines skipped above the header, summary rows and rows with blank cells skipped,
        further candidate columns left unused.
    """

    delimiter: Delimiter
    header_line: int
    columns: tuple[DynoColumn, ...]
    lines: tuple[int, ...]
    cells: tuple[tuple[str, ...], ...]
    notices: tuple[Notice, ...]

    @property
    def speed_based(self) -> bool:
        """Whether the x column is road speed rather than engine speed."""
        return self.columns[0].quantity is ColumnQuantity.ROAD_SPEED


def _check_text(text: object) -> str:
    """Validate size and content; return the text with uniform line breaks."""
    if not isinstance(text, str):
        raise DynoFileError(
            f"`text` must be a str (decode the file first), got {type(text).__name__}"
        )
    if len(text) > MAX_TEXT_CHARS:
        raise DynoFileError(f"`text` must be at most {MAX_TEXT_CHARS} characters, got {len(text)}")
    text = normalised_text(text)
    bad = forbidden_character(text)
    if bad is not None:
        line, column, char = bad
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


_NUMBER_LIKE = re.compile(r"[+-]?[\d.,]*\d[\d.,]*(?:[eE][+-]?\d+)?")
# the x column and the columns a curve may be read from beside it, in order of preference
_CURVE_COLUMNS = {
    ColumnQuantity.ENGINE_SPEED: {ColumnQuantity.TORQUE, ColumnQuantity.POWER},
    ColumnQuantity.ROAD_SPEED: {ColumnQuantity.POWER, ColumnQuantity.FORCE},
}


@dataclass(frozen=True)
class _Header:
    """The header row found: its place, delimiter, cells and what each cell says."""

    index: int
    line: int
    delimiter: Delimiter
    cells: list[str]
    read: list[HeaderCell]
    units_row: int | None


def _header_candidates(
    line: str, below: str | None
) -> list[tuple[Delimiter, list[str], list[HeaderCell], bool]]:
    """Delimiters that split a line into engine-speed and torque or power columns.

    ``below`` is the next line, read as a units row when it is one.
    """
    found = []
    for delimiter in Delimiter:
        cells = cells_or_none(line, delimiter) if delimiter.value in line else None
        if cells is None:
            continue
        under = cells_or_none(below, delimiter) if below is not None else None
        is_units = (
            under is not None
            and any(unit_from_text(u) is not None for u in under)
            and not any(_NUMBER_LIKE.fullmatch(u) for u in under)
            and not _is_named_header(under)
        )
        if under is None or not is_units:
            under = []
        under += [""] * (len(cells) - len(under))
        pairs = zip(cells[: MAX_COLUMNS + 1], under, strict=False)
        read = [read_header_cell(c, u) for c, u in pairs]
        if _names_a_curve(read):
            found.append((delimiter, cells, read, is_units))
    return found


def _names_a_curve(read: list[HeaderCell]) -> bool:
    """Whether header cells name an x column and a column a curve may be read from."""
    kinds = {r.quantity for r in read}
    return any(x in kinds and kinds & ys for x, ys in _CURVE_COLUMNS.items())


def _is_named_header(cells: list[str]) -> bool:
    """Whether a line is a header in its own right, with names and not only units (so
    not the units row of the line above, e.g. ``RPM,WHP,Whl Tq (lb-ft)``)."""
    named = any(c and unit_from_text(c) is None for c in cells)
    return named and _names_a_curve([read_header_cell(c) for c in cells])


def _find_header(significant: list[tuple[int, str]]) -> _Header:
    """The first line naming engine speed and torque or power, split at its best delimiter."""
    for index, (number, line) in enumerate(significant[:_HEADER_SEARCH_LINES]):
        below = significant[index + 1] if index + 1 < len(significant) else None
        candidates = _header_candidates(line, below[1] if below else None)
        if not candidates:
            continue
        probe = significant[index + 1 : index + 1 + _DELIMITER_PROBE_LINES]
        counts = [len(cells) for _, cells, _, _ in candidates]
        best = best_delimiter(counts, [c[0] for c in candidates], probe)
        delimiter, cells, read, is_units = candidates[best]
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
        "power column with its unit (e.g. 'Torque (Nm)', 'Power [hp]'), or a road-speed "
        "column (e.g. 'Speed (km/h)') and a power or tractive-force column (e.g. 'Tractive "
        "force (N)')"
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
    """The used columns with their units: the x column, the curve's column, a check column.

    An engine-speed column makes an rpm-based export (torque, else power; power beside
    torque is a check). Without one, a road-speed column makes a speed-based export (power,
    else tractive force). A power column measured elsewhere than the torque column (one at
    the wheels, the other not) is not used as a check.
    """
    kinds = {r.quantity for r in header.read}
    x = ColumnQuantity.ENGINE_SPEED
    if x not in kinds or not kinds & _CURVE_COLUMNS[x]:
        x = ColumnQuantity.ROAD_SPEED
    wanted = [x, *sorted(_CURVE_COLUMNS[x], key=lambda q: list(ColumnQuantity).index(q))]
    columns = []
    for pick in (_pick(q, header) for q in wanted):
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
        column = DynoColumn(i + 1, header.cells[i], read.unit.quantity, read.unit, read.at_wheels)
        columns.append(column)
    if x is ColumnQuantity.ROAD_SPEED or (
        len(columns) == 3 and columns[1].at_wheels != columns[2].at_wheels
    ):
        columns = columns[:2]
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
    significant = significant_lines(_check_text(text))
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
    quiet = (
        set()
        if columns[0].quantity is ColumnQuantity.ROAD_SPEED
        else {ColumnQuantity.ROAD_SPEED, ColumnQuantity.FORCE}
    )
    unused = [
        repr(header.cells[i])
        for i, r in enumerate(header.read)
        if r.quantity is not None and r.quantity not in quiet and i + 1 not in used
    ]
    if unused:
        notices.append(
            Notice(
                "columns_unused",
                f"Further column(s) {', '.join(unused)} were not used; the curve was read "
                f"from {', '.join(repr(c.header) for c in columns)}.",
                "text",
            )
        )
    rows = split_rows(data, header.delimiter, DynoFileError, MAX_COLUMNS)
    lines, texts, skipped = column_texts(data, rows, columns, len(header.cells))
    notices.extend(skipped)
    return Table(
        header.delimiter,
        header.line,
        tuple(columns),
        tuple(lines),
        tuple(tuple(t) for t in texts),
        tuple(notices),
    )
