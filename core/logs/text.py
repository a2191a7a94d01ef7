"""Reading a data logger's delimited text export into a logged pass.

The rules:

* Text of at most ``MAX_TEXT_CHARS`` characters and ``MAX_SAMPLES`` data rows; a NUL or
  another control character (binary data, not a text export) is rejected with its line.
  Blank lines and lines starting with ``#`` or ``//`` are skipped.
* The header is the first line (of the first 50 that are not skipped) naming a time column
  and a road-speed column under one delimiter: tab, semicolon or comma, whichever splits
  the most following lines into as many cells as the header. Lines above it are skipped
  with a notice. A line right under the header holding only units (``s;km/h;rpm;g``) is a
  units row.
* A header cell is a name with its unit in brackets (``Speed [km/h]``, ``time (s)``) or
  after the name (``speed km/h``, ``accel_g``). Columns, by name or unit (case ignored):

  ============  =============================================  ============================
  column        name                                           units
  ============  =============================================  ============================
  time          ``time``, ``t``, ``timestamp``, ``elapsed``     ``s``, ``ms``; none: ``s``
  speed         ``speed``, ``velocity``, ``vel``, ``v``         ``km/h`` ``kph`` ``mph``
                                                               ``m/s`` (required)
  rpm           ``rpm``, ``revs``, ``engine speed``, ``n``      ``rpm`` ``1/min``; optional
  acceleration  a word starting ``acc``, ``g``, ``longg``       ``g``, ``m/s^2`` (required)
  ============  =============================================  ============================

  A name with ``lat``, ``lateral``, ``vert``, ``vertical``, ``y`` or ``z`` is not the
  longitudinal acceleration; other columns are ignored. The first column of each kind is
  used.
* Numbers: decimal point or decimal comma, decided over the whole file as in
  :mod:`core.dyno.numbers`, each column checked and converted at once. Every data row
  needs a cell in each used column: a short row (a truncated file) is an error naming its
  line and column.
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from core.dyno.numbers import number_format_of_texts, parse_column
from core.errors import DynoFileError, LogDataError
from core.logs.header import LogColumn, LogQuantity, read_header
from core.logs.pass_data import (
    MAX_SAMPLES,
    AccelerationUnit,
    PassLog,
    SpeedUnit,
    TimeUnit,
    pass_log,
)
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

__all__ = ["MAX_TEXT_CHARS", "LogText", "read_log_text"]

_HEADER_SEARCH_LINES = 50
_PROBE_LINES = 20
_COMMENTS = ("#", "//")
_INDEXED = re.compile(r"^(?P<name>[a-z_]+)\[(?P<index>\d+)\]$")


@dataclass(frozen=True)
class LogText:
    """A log export read into a pass.

    Attributes
    ----------
    log : PassLog
        The pass in SI units.
    delimiter : Delimiter
        The cell separator found.
    header_line : int
        1-based line of the header.
    columns : tuple of LogColumn
        The columns used: time, speed, then rpm and acceleration if present.
    rows : int
        Data rows read.
    """

    log: PassLog
    delimiter: Delimiter
    header_line: int
    columns: tuple[LogColumn, ...]
    rows: int


def _checked(text: str) -> list[tuple[int, str]]:
    """Significant (line number, line) pairs of a size- and content-checked text."""
    if len(text) > MAX_TEXT_CHARS:
        raise LogDataError(
            f"`text` must be at most {MAX_TEXT_CHARS} characters, got {len(text)}",
            parameter="text",
        )
    text = normalised_text(text)
    bad = forbidden_character(text)
    if bad is not None:
        at, _, char = bad
        what = "a NUL character" if char == "\x00" else f"U+{ord(char):04X}"
        raise LogDataError(
            f"`text` line {at} holds {what}: this looks like binary data, not a text export",
            parameter="text",
            line=at,
        )
    out = significant_lines(text)
    if not out:
        raise LogDataError(
            "`text` must hold a header row and data rows, got none", parameter="text"
        )
    return out


def _find_header(
    lines: list[tuple[int, str]],
) -> tuple[int, Delimiter, tuple[LogColumn, ...], bool]:
    """Index of the header line, its delimiter, the used columns, and a units row flag."""
    for index, (number, line) in enumerate(lines[:_HEADER_SEARCH_LINES]):
        below = lines[index + 1][1] if index + 1 < len(lines) else None
        found = []
        for delimiter in Delimiter:
            if delimiter.value not in line:
                continue
            cells = cells_or_none(line, delimiter)
            under = None if below is None else cells_or_none(below, delimiter)
            if cells is None:
                continue
            header = read_header(cells, under, number)
            if header is not None:
                found.append((len(cells), delimiter, header))
        if found:
            probe = lines[index + 1 : index + 1 + _PROBE_LINES]
            best = best_delimiter([f[0] for f in found], [f[1] for f in found], probe)
            _, delimiter, (columns, units_row) = found[best]
            return index, delimiter, columns, units_row
    raise LogDataError(
        f"`text` has no header row (searched {_HEADER_SEARCH_LINES} lines) naming a time "
        "column and a road-speed column with its unit, e.g. 'time [s],speed [km/h],rpm'",
        parameter="text",
    )


def read_log_text(text: str) -> LogText:
    """Read a logger's delimited text export into a logged pass.

    Parameters
    ----------
    text : str
        The whole export, decoded.

    Returns
    -------
    LogText

    Raises
    ------
    LogDataError
        With the line (and column) at fault: binary or oversize text, no header, a column
        without its unit, a short row, a cell that is not a number, time that does not
        increase, a value out of range.

    Examples
    --------
    >>> rows = "\\n".join(f"{0.05 * i:.2f};{3.6 * i:.1f};{900 + 150 * i}" for i in range(30))
    >>> out = read_log_text("Time [s];Speed [km/h];RPM\\n" + rows)
    >>> out.delimiter.value, out.rows, round(float(out.log.speed_m_s[10]), 3)
    (';', 30, 10.0)
    """
    lines = _checked(text)
    index, delimiter, columns, units_row = _find_header(lines)
    header_line = lines[index][0]
    data = lines[index + (2 if units_row else 1) :]
    if len(data) > MAX_SAMPLES:
        raise LogDataError(
            f"`text` must hold at most {MAX_SAMPLES} data rows, got {len(data)}", parameter="text"
        )
    need = max(c.column for c in columns)
    rows = split_rows(data, delimiter, LogDataError)
    lengths = list(map(len, rows))
    short = (
        None
        if min(lengths, default=need) >= need
        else next(k for k, n in enumerate(lengths) if n < need)
    )
    if short is not None:
        number, row = data[short][0], rows[short]
        raise LogDataError(
            f"`text` line {number} has {len(row)} cell(s), the header {need} or more: "
            f"column {len(row) + 1} is missing (a truncated file?)",
            parameter="text",
            line=number,
            column=len(row) + 1,
        )
    numbers = [number for number, _ in data]
    texts = [[row[col.column - 1].strip() for row in rows] for col in columns]
    try:
        number_format = number_format_of_texts(
            [(t, numbers, col.column) for t, col in zip(texts, columns, strict=True)]
        )
        values = {
            col.quantity: parse_column(t, numbers, col.column, number_format)
            for t, col in zip(texts, columns, strict=True)
        }
    except DynoFileError as exc:
        raise LogDataError(
            exc.message, parameter="text", line=exc.line, column=exc.column
        ) from exc
    units = {col.quantity: col.unit for col in columns}
    try:
        log = pass_log(
            values[LogQuantity.TIME],
            values[LogQuantity.SPEED],
            speed_unit=SpeedUnit(units[LogQuantity.SPEED]),
            rpm=values.get(LogQuantity.RPM),
            acceleration=values.get(LogQuantity.ACCELERATION),
            acceleration_unit=AccelerationUnit(units.get(LogQuantity.ACCELERATION, "g")),
            time_unit=TimeUnit(units[LogQuantity.TIME]),
        )
    except LogDataError as exc:
        raise _located(exc, columns, [n for n, _ in data]) from exc
    notes = list(log.notices)
    if index > 0:
        notes.insert(
            0, Notice("lines_skipped", f"{index} line(s) above the header were skipped.", "text")
        )
    log = PassLog(log.time_s, log.speed_m_s, log.rpm, log.acceleration_m_s2, tuple(notes))
    return LogText(log, delimiter, header_line, columns, len(data))


def _located(exc: LogDataError, columns: tuple[LogColumn, ...], lines: list[int]) -> LogDataError:
    """A channel error of :func:`core.logs.pass_data.pass_log`, with its line and column."""
    m = _INDEXED.match(exc.parameter or "")
    if m is None:
        return LogDataError(f"`text` data rows: {exc.message}", parameter="text")
    row = int(m["index"])
    column = next(c.column for c in columns if c.quantity.value == m["name"])
    return LogDataError(
        f"`text` line {lines[row]}, column {column}: {exc.message}",
        parameter="text",
        line=lines[row],
        column=column,
    )
