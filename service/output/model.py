"""A printable report as plain records: sections of facts, tables and notes.

The builders (``service.output.shift_plan_report``, ``service.output.run_report``) fill
these from a computation in
the caller's units, with every number already formatted; the text, HTML and PDF writers
only lay them out, so the three formats always say the same thing.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass, replace

import numpy as np

__all__ = [
    "Column",
    "KeyFigure",
    "Report",
    "Section",
    "Table",
    "fmt",
    "gear_groups",
    "join_numbers",
    "thin_rows",
    "with_inputs",
]

MAX_TABLE_ROWS = 25  # rows of a printed table: a page, not a data dump


@dataclass(frozen=True)
class Column:
    """A table column: its name, its unit (empty for none) and whether it holds text."""

    name: str
    unit: str = ""
    text: bool = False


@dataclass(frozen=True)
class Table:
    """A titled table of formatted cells, one tuple per row."""

    title: str
    columns: tuple[Column, ...]
    rows: tuple[tuple[str, ...], ...]
    note: str = ""


@dataclass(frozen=True)
class Section:
    """A headed part of a report: label/value facts, tables and sentence notes."""

    heading: str
    facts: tuple[tuple[str, str], ...] = ()
    tables: tuple[Table, ...] = ()
    notes: tuple[str, ...] = ()


@dataclass(frozen=True)
class KeyFigure:
    """A figure set large in the summary block at the head of a sheet."""

    label: str
    value: str
    unit: str = ""
    note: str = ""


@dataclass(frozen=True)
class Report:
    """A whole report.

    Attributes
    ----------
    kind : str
        What it reports, e.g. ``"Shift plan"``.
    reference : str or None
        The caller's reference (work order).
    units : str
        One line naming the unit of every quantity.
    short_caution : str
        One paragraph of caution for the head of the page.
    sections : tuple of Section
        The body.
    cautions : tuple of str
        Every caution, in full.
    chart_caption : str
        What the chart shows (empty for a sheet without a chart).
    key_figures : tuple of KeyFigure
        The figures a reader looks for first, set large at the top.
    job : tuple of (str, str)
        The caller's job block (customer, vehicle, technician, date, work order).
    appendix : tuple of Section
        Long tables, printed after the cautions only when asked for.
    """

    kind: str
    reference: str | None
    units: str
    short_caution: str
    sections: tuple[Section, ...]
    cautions: tuple[str, ...]
    chart_caption: str = ""
    key_figures: tuple[KeyFigure, ...] = ()
    job: tuple[tuple[str, str], ...] = ()
    appendix: tuple[Section, ...] = ()


def with_inputs(report: Report, inputs: Section) -> Report:
    """The report with its inputs part after the results, before any warnings."""
    body = list(report.sections)
    at = len(body) - 1 if body and body[-1].heading == "Warnings" else len(body)
    body.insert(at, inputs)
    return replace(report, sections=tuple(body))


def thin_rows(count: int, most: int = MAX_TABLE_ROWS) -> list[int]:
    """Indexes of at most ``most`` rows spread evenly over ``count``, first and last kept.

    >>> thin_rows(5)
    [0, 1, 2, 3, 4]
    >>> thin_rows(100, 5)
    [0, 25, 50, 74, 99]
    """
    if count <= most:
        return list(range(count))
    picked = np.unique(np.round(np.linspace(0, count - 1, most)).astype(np.int64))
    return [int(i) for i in picked]


def gear_groups(count: int, per_table: int = 6) -> list[range]:
    """Gear indexes split so a table of one column per gear fits 80 columns.

    >>> gear_groups(8)
    [range(0, 6), range(6, 8)]
    """
    return [range(a, min(a + per_table, count)) for a in range(0, count, per_table)]


def fmt(value: object, digits: int = 0) -> str:
    """A number for print (``-`` for none), fixed decimals.

    >>> fmt(1234.567, 1), fmt(None)
    ('1234.6', '-')
    """
    if value is None:
        return "-"
    if isinstance(value, (int, float, np.floating, np.integer)):
        return f"{float(value):.{digits}f}"
    return str(value)


def join_numbers(values: Sequence[float], digits: int = 3) -> str:
    """Numbers as a comma list with the fewest decimals that show them (``%g``).

    >>> join_numbers([3.1, 2.05, 1.48])
    '3.1, 2.05, 1.48'
    """
    return ", ".join(f"{float(v):.{digits + 1}g}" for v in values)
