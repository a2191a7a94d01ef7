"""Reading the numbers of a dyno export: its decimal mark and each cell's value.

The decimal mark is decided over all the cells to be read: when a cell holds both ``.`` and
``,`` the later one is the decimal mark and the other groups thousands; otherwise a lone
comma is a decimal comma (``6,500`` reads 6.5: a thousands separator is recognised only
together with the other mark); a file mixing cells like ``1.250`` and ``3,5`` takes the
mark that only ever appears in three-digit groups as the thousands separator. A number is
an optional sign, digits with an optional decimal part, and an optional exponent
(``2.5e3``); ``nan``, ``inf`` and text are rejected with the cell's line and column.

Whole columns are read at once (:func:`number_format_of_texts`, :func:`parse_column`): one
precompiled regular expression checks the column joined into one string and NumPy converts
it; a cell is looked at on its own only to name the one at fault.
"""

from __future__ import annotations

import enum
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from core.dyno.parse import Cell
from core.errors import DynoFileError

__all__ = [
    "DecimalMark",
    "NumberFormat",
    "number_format_of",
    "number_format_of_texts",
    "parse_column",
    "parse_number",
]


class DecimalMark(enum.Enum):
    """The decimal separator of an export's numbers."""

    POINT = "."
    COMMA = ","


@dataclass(frozen=True)
class NumberFormat:
    """How an export writes its numbers.

    Attributes
    ----------
    decimal_mark : DecimalMark
        Decimal point or decimal comma.
    thousands_separator : str or None
        ``","`` or ``"."`` when the other mark groups thousands, else None.
    """

    decimal_mark: DecimalMark
    thousands_separator: str | None = None


_GROUPED = {m: re.compile(rf"[+-]?\d{{1,3}}(?:{re.escape(m)}\d{{3}})+") for m in ".,"}
# a line of a joined column holding both marks; one holding a mark not as thousands groups
_BOTH_MARKS = re.compile(r"^[^\n]*(?:,[^\n]*\.|\.[^\n]*,)[^\n]*$", re.MULTILINE)
_UNGROUPED = {
    m: re.compile(
        rf"^(?![+-]?\d{{1,3}}(?:{re.escape(m)}\d{{3}})+$)[^\n]*{re.escape(m)}", re.MULTILINE
    )
    for m in ".,"
}


def _grouped(text: str, mark: str) -> bool:
    """Whether ``mark`` appears in ``text`` only as a thousands separator."""
    return _GROUPED[mark].fullmatch(text) is not None


def number_format_of(cells: Sequence[Cell]) -> NumberFormat:
    """The decimal mark of a set of number cells, and the thousands separator if any.

    Parameters
    ----------
    cells : sequence of Cell
        The cells to read as numbers.

    Returns
    -------
    NumberFormat
        Decimal mark and thousands separator.

    Raises
    ------
    DynoFileError
        When cells mix decimal points and decimal commas.

    Examples
    --------
    >>> number_format_of([Cell(2, 2, "1.234,5")])
    NumberFormat(decimal_mark=<DecimalMark.COMMA: ','>, thousands_separator='.')
    >>> number_format_of([Cell(2, 2, "250,5")]).decimal_mark
    <DecimalMark.COMMA: ','>
    """
    both = [c for c in cells if "," in c.text and "." in c.text]
    if both:
        first = both[0].text
        if first.rfind(",") > first.rfind("."):
            return NumberFormat(DecimalMark.COMMA, ".")
        return NumberFormat(DecimalMark.POINT, ",")
    commas = [c for c in cells if "," in c.text]
    points = [c for c in cells if "." in c.text]
    if not commas:
        return NumberFormat(DecimalMark.POINT)
    if not points:
        return NumberFormat(DecimalMark.COMMA)
    if all(_grouped(c.text, ".") for c in points):
        return NumberFormat(DecimalMark.COMMA, ".")
    if all(_grouped(c.text, ",") for c in commas):
        return NumberFormat(DecimalMark.POINT, ",")
    odd = min(commas[0], points[0], key=lambda c: (c.line, c.column))
    raise DynoFileError(
        f"`text` line {odd.line}, column {odd.column}: {odd.text!r} — the file mixes "
        "decimal points and decimal commas",
        line=odd.line,
        column=odd.column,
    )


def number_format_of_texts(
    columns: Sequence[tuple[Sequence[str], Sequence[int], int]],
) -> NumberFormat:
    """The decimal mark of whole columns of number cells (as :func:`number_format_of`).

    Parameters
    ----------
    columns : sequence of (texts, lines, column)
        Each column's cell texts, the 1-based line of each, and its 1-based column number.

    Returns
    -------
    NumberFormat

    Raises
    ------
    DynoFileError
        When cells mix decimal points and decimal commas.

    Examples
    --------
    >>> number_format_of_texts([(["1.500", "2.000"], [2, 3], 1), (["95,5", "99"], [2, 3], 2)])
    NumberFormat(decimal_mark=<DecimalMark.COMMA: ','>, thousands_separator='.')
    """
    joined = "\n".join("\n".join(texts) for texts, _, _ in columns)
    if "," not in joined:
        return NumberFormat(DecimalMark.POINT)
    if "." not in joined:
        return NumberFormat(DecimalMark.COMMA)
    both = _BOTH_MARKS.search(joined)
    if both is not None:
        first = both.group()
        if first.rfind(",") > first.rfind("."):
            return NumberFormat(DecimalMark.COMMA, ".")
        return NumberFormat(DecimalMark.POINT, ",")
    if _UNGROUPED["."].search(joined) is None:
        return NumberFormat(DecimalMark.COMMA, ".")
    if _UNGROUPED[","].search(joined) is None:
        return NumberFormat(DecimalMark.POINT, ",")
    cells = [
        Cell(line, column, text)
        for texts, lines, column in columns
        for text, line in zip(texts, lines, strict=True)
        if "," in text or "." in text
    ]
    return number_format_of(cells)  # raises, naming the first cell of the mix


def _one_number(number_format: NumberFormat) -> str:
    """The regular expression of one number in a format."""
    decimal, thousands = number_format.decimal_mark, number_format.thousands_separator
    d = re.escape(decimal.value)
    digits = rf"\d{{1,3}}(?:{re.escape(thousands)}\d{{3}})+|\d+" if thousands else r"\d+"
    return rf"[+-]?(?:(?:{digits})(?:{d}\d*)?|{d}\d+)(?:[eE][+-]?\d+)?"


_FORMATS = [
    NumberFormat(mark, sep)
    for mark, sep in (
        (DecimalMark.POINT, None),
        (DecimalMark.POINT, ","),
        (DecimalMark.COMMA, None),
        (DecimalMark.COMMA, "."),
    )
]
_NUMBER = {f: re.compile(_one_number(f)) for f in _FORMATS}
_COLUMN = {f: re.compile(rf"(?:{_one_number(f)}\n)*{_one_number(f)}") for f in _FORMATS}


_NOT_IN_A_NUMBER = re.compile(r"[^0-9.eE+\-\n]")


def _fast_column(joined: str, number_format: NumberFormat) -> NDArray[np.float64] | None:
    """The numbers of a column joined by line breaks, or None when a cell is not one.

    Without a thousands separator, a column holding only digits, signs, exponents and the
    decimal mark is converted by ``float``, which refuses what the grammar refuses over
    those characters (a lone sign or mark, two marks, a bare exponent); with one, the
    column is first matched against the grammar.
    """
    if number_format.thousands_separator:
        if _COLUMN[number_format].fullmatch(joined) is None:
            return None
        joined = joined.replace(number_format.thousands_separator, "")
    if number_format.decimal_mark is DecimalMark.COMMA:
        joined = joined.replace(",", ".")
    if _NOT_IN_A_NUMBER.search(joined) is not None:
        return None
    try:
        return np.array(list(map(float, joined.split("\n"))), dtype=np.float64)
    except ValueError:
        return None


def parse_column(
    texts: Sequence[str], lines: Sequence[int], column: int, number_format: NumberFormat
) -> NDArray[np.float64]:
    """Read a whole column of cells as finite numbers.

    Parameters
    ----------
    texts : sequence of str
        The cells' texts, stripped.
    lines : sequence of int
        The 1-based line of each cell, to name a bad one.
    column : int
        The 1-based column number, to name a bad cell.
    number_format : NumberFormat
        Decimal mark and thousands separator of the file.

    Returns
    -------
    ndarray, shape (n,)

    Raises
    ------
    DynoFileError
        At the first cell that is empty, not a number or too large.

    Examples
    --------
    >>> fmt = NumberFormat(DecimalMark.COMMA)
    >>> parse_column(["1,5", "-2", "3e2"], [2, 3, 4], 2, fmt).tolist()
    [1.5, -2.0, 300.0]
    """
    values = _fast_column("\n".join(texts), number_format) if texts else None
    if values is not None:
        finite = np.isfinite(values)
        if finite.all():
            return values
        k = int(np.argmin(finite))
        parse_number(Cell(lines[k], column, texts[k]), number_format)  # raises
    for text, line in zip(texts, lines, strict=True):
        parse_number(Cell(line, column, text), number_format)  # raises at the first bad cell
    return np.zeros(0)


def parse_number(cell: Cell, number_format: NumberFormat) -> float:
    """Read one cell as a finite number.

    Parameters
    ----------
    cell : Cell
        The cell.
    number_format : NumberFormat
        Decimal mark and thousands separator of the file.

    Returns
    -------
    float

    Raises
    ------
    DynoFileError
        When the cell is empty or not a number in the file's notation.

    Examples
    --------
    >>> parse_number(Cell(3, 2, "1.234,5"), NumberFormat(DecimalMark.COMMA, "."))
    1234.5
    """
    decimal, thousands = number_format.decimal_mark, number_format.thousands_separator
    if _NUMBER[number_format].fullmatch(cell.text) is None:
        what = (
            "the cell is empty; every data row needs a number in each used column"
            if not cell.text
            else f"{cell.text!r} is not a number (decimal mark {decimal.value!r})"
        )
        raise DynoFileError(
            f"`text` line {cell.line}, column {cell.column}: {what}",
            line=cell.line,
            column=cell.column,
        )
    plain = cell.text.replace(thousands, "") if thousands else cell.text
    value = float(plain.replace(decimal.value, "."))
    if not math.isfinite(value):
        raise DynoFileError(
            f"`text` line {cell.line}, column {cell.column}: {cell.text!r} is too large",
            line=cell.line,
            column=cell.column,
        )
    return value
