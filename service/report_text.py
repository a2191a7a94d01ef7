"""A report as plain text for work orders: at most 80 columns, printable ASCII only."""

from __future__ import annotations

import textwrap

from service.letterhead import Letterhead, get_letterhead
from service.report_model import Report, Section, Table
from service.sheets import printable, printable_line

__all__ = ["WIDTH", "render_text", "report_body_lines", "table_lines", "wrap_text"]

WIDTH = 80
_LABEL = 16  # column where a fact's value starts


def wrap_text(text: str, first: str = "", rest: str = "  ") -> list[str]:
    return textwrap.wrap(
        text, WIDTH, initial_indent=first, subsequent_indent=rest, break_on_hyphens=False
    ) or [first.rstrip()]


def table_lines(table: Table) -> list[str]:
    """A table: title, column names, units in brackets, a rule, the rows, the note."""
    names = [c.name for c in table.columns]
    units = [f"[{c.unit}]" if c.unit else "" for c in table.columns]
    widths = [
        max(len(names[i]), len(units[i]), *(len(row[i]) for row in table.rows))
        for i in range(len(table.columns))
    ]

    def line(cells: list[str] | tuple[str, ...]) -> str:
        return "  ".join(
            cell.ljust(w) if col.text else cell.rjust(w)
            for cell, w, col in zip(cells, widths, table.columns, strict=True)
        ).rstrip()

    out = [table.title, line(names)]
    if any(units):
        out.append(line(units))
    out.append("  ".join("-" * w for w in widths))
    out += [line(row) for row in table.rows] or ["(none)"]
    if table.note:
        out += wrap_text(table.note)
    return out


def _section_lines(section: Section) -> list[str]:
    out = [section.heading.upper(), "-" * len(section.heading)]
    for label, value in section.facts:
        if len(label) < _LABEL - 1:
            out += wrap_text(value, label.ljust(_LABEL), " " * _LABEL)
        else:
            out += wrap_text(f"{label}: {value}")
    for table in section.tables:
        out.append("")
        out += table_lines(table)
    if section.notes:
        out.append("")
        for note in section.notes:
            out += wrap_text(note, "- ")
    return out


def report_body_lines(report: Report) -> list[str]:
    """Everything below the head: the sections, then the cautions in full."""
    lines: list[str] = []
    for section in report.sections:
        lines += _section_lines(section)
        lines.append("")
    lines += ["CAUTIONS", "--------"]
    for caution in report.cautions:
        lines += wrap_text(caution, "- ")
    if report.appendix:
        lines += ["", "APPENDIX", "========", ""]
        for section in report.appendix:
            lines += _section_lines(section)
            lines.append("")
        lines.pop()
    return [printable_line(line) for line in lines]


def _shop_lines(head: Letterhead) -> list[str]:
    """The shop's letterhead, when one is set."""
    if head.neutral:
        return []
    return [head.name, *head.lines, "=" * WIDTH]


def _job_lines(report: Report) -> list[str]:
    """The job block and the key figures."""
    lines: list[str] = []
    for label, value in report.job:
        lines += wrap_text(value, f"{label}:".ljust(_LABEL), " " * _LABEL)
    if report.key_figures:
        cells = [
            f"{f.label}: {f.value} {f.unit}".rstrip() + (f" ({f.note})" if f.note else "")
            for f in report.key_figures
        ]
        lines += wrap_text("; ".join(cells), "Key figures: ")
    return lines


def render_text(report: Report, letterhead: Letterhead | None = None) -> str:
    """The whole report as text lines of at most 80 columns, ending with a newline."""

    head = f"GEARWORK {report.kind.upper()}"
    ref = f"ref: {report.reference}" if report.reference else ""
    if len(head) + 2 + len(ref) <= WIDTH:
        lines = [head + ref.rjust(WIDTH - len(head))] if ref else [head]
    else:
        lines = [head, ref]
    lines = _shop_lines(letterhead or get_letterhead()) + lines + _job_lines(report)
    lines += wrap_text("Units: " + report.units)
    lines += wrap_text("Caution: " + report.short_caution)
    lines.append("")
    lines += report_body_lines(report)
    return printable(lines) + "\n"
