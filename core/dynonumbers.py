"""Reading the numbers of a dyno export: its decimal mark and each cell's value.

The decimal mark is decided over all the cells to be read: when a cell holds both ``.`` and
``,`` the later one is the decimal mark and the other groups thousands; otherwise a lone
comma is a decimal comma (``6,500`` reads 6.5: a thousands separator is recognised only
together with the other mark); a file mixing cells like ``1.250`` and ``3,5`` takes the
mark that only ever appears in three-digit groups as the thousands separator. A number is
an optional sign, digits with an optional decimal part, and an optional exponent
(``2.5e3``); ``nan``, ``inf`` and text are rejected with the cell's line and column.
"""

from __future__ import annotations

import enum
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass

from core.dynoparse import Cell
from core.errors import DynoFileError

__all__ = ["DecimalMark", "NumberFormat", "number_format_of", "parse_number"]


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


def _grouped(text: str, mark: str) -> bool:
    """Whether ``mark`` appears in ``text`` only as a thousands separator."""
    return re.fullmatch(rf"[+-]?\d{{1,3}}(?:{re.escape(mark)}\d{{3}})+", text) is not None


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
    d = re.escape(decimal.value)
    digits = rf"\d{{1,3}}(?:{re.escape(thousands)}\d{{3}})+|\d+" if thousands else r"\d+"
    pattern = rf"[+-]?(?:(?:{digits})(?:{d}\d*)?|{d}\d+)(?:[eE][+-]?\d+)?"
    if re.fullmatch(pattern, cell.text) is None:
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
