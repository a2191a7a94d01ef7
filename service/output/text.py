"""A report as plain text for work orders: at most 80 columns, printable ASCII only."""

from __future__ import annotations

import textwrap

from service.output.letterhead import Letterhead, get_letterhead
from service.output.model import Report, Section, Table
from service.output.sheets import printable, printable_line

__all__ = ["WIDTH", "render_text", "report_body_lines", "table_lines", "wrap_text"]

WIDTH = 80
_LABEL = 16  # column where a fact's value starts


def wrap_text(text: str, first: str = "", rest: str = "  ") -> list[str]:
    return textwrap.wrap(
        text, WIDTH, initial_indent=first, subsequent_indent=rest, break_on_hyphens=False
    ) or [first.rstrip()]


def _column_groups(widths: list[int]) -> list[list[int]]:
    """Column indexes in groups that fit 80 columns, each repeating the first column."""
    groups: list[list[int]] = [[0]]
    used = widths[0]
    for i in range(1, len(widths)):
        if used + 2 + widths[i] > WIDTH and len(groups[-1]) > 1:
            groups.append([0])
            used = widths[0]
        groups[-1].append(i)
        used += 2 + widths[i]
    return groups


def table_lines(table: Table) -> list[str]:
    """A table: title, column names, units in brackets, a rule, the rows, the note. A table
    wider than 80 columns is printed in parts, each repeating the first column."""
    names = [c.name for c in table.columns]
    units = [f"[{c.unit}]" if c.unit else "" for c in table.columns]
    widths = [
        max(len(names[i]), len(units[i]), *(len(row[i]) for row in table.rows))
        for i in range(len(table.columns))
    ]
    out: list[str] = []
    groups = _column_groups(widths)
    for k, group in enumerate(groups):

        def line(cells: list[str] | tuple[str, ...], group: list[int] = group) -> str:
            return "  ".join(
                cells[i].ljust(widths[i]) if table.columns[i].text else cells[i].rjust(widths[i])
                for i in group
            ).rstrip()

        if k:
            out.append("")
        out.append(table.title if k == 0 else f"{table.title} (continued)")
        out.append(line(names))
        if any(units[i] for i in group):
            out.append(line(units))
        out.append("  ".join("-" * widths[i] for i in group))
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
