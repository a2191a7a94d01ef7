"""A report as one printable HTML page: print CSS, the tables, the cautions, an inline SVG.

Plain string building; every text from the report is escaped with ``html.escape``. The page
fits A4 and US Letter alike: the content is at most 184 mm wide, and ``@page`` sets only
margins, so the printer's paper size stands.
"""

from __future__ import annotations

from html import escape

from service.output.letterhead import Letterhead, get_letterhead
from service.output.model import KeyFigure, Report, Section, Table

__all__ = ["CSS", "render_html"]

CSS = """\
@page { margin: 14mm 13mm 16mm 13mm; }
:root { color: #161616; background: #fff;
  font: 9.5pt/1.38 "DejaVu Sans", "Helvetica Neue", Arial, sans-serif; }
body { max-width: 184mm; margin: 0 auto; padding: 8mm 4mm; }
header.masthead { display: flex; justify-content: space-between; align-items: flex-end;
  border-bottom: 2.2pt solid #14213d; padding-bottom: 2mm; gap: 6mm; }
.brand { font-size: 8pt; letter-spacing: .28em; text-transform: uppercase; color: #555; }
h1 { font-size: 19pt; margin: .5mm 0 0; color: #14213d; letter-spacing: .01em; }
.ident { text-align: right; font-size: 9pt; }
.ident .ref { font: 700 13pt/1.2 "DejaVu Sans Mono", Menlo, Consolas, monospace;
  border: 1pt solid #14213d; padding: .6mm 2.4mm; display: inline-block; }
p.units { font-size: 8pt; color: #444; margin: 1.6mm 0 0; }
p.short-caution { font-size: 8.5pt; border-left: 2.4pt solid #9a3b1b; padding: .4mm 0 .4mm 3mm;
  margin: 3mm 0; }
figure.chart { margin: 3mm 0 2mm; break-inside: avoid; page-break-inside: avoid; }
figure.chart svg { display: block; width: 100%; height: auto; }
figcaption { font-size: 8pt; color: #444; margin-top: 1mm; }
h2 { font-size: 10.5pt; text-transform: uppercase; letter-spacing: .09em; color: #14213d;
  border-bottom: .7pt solid #8a8a8a; margin: 5.5mm 0 2mm; padding-bottom: .6mm;
  break-after: avoid; page-break-after: avoid; }
h3 { font-size: 9pt; margin: 3.5mm 0 1mm; break-after: avoid; page-break-after: avoid; }
dl.facts { display: grid; grid-template-columns: 30mm 1fr; gap: .6mm 3mm; margin: 0; }
dl.facts dt { font-weight: 700; color: #333; }
dl.facts dd { margin: 0; }
table { border-collapse: collapse; font-size: 8.3pt; font-variant-numeric: tabular-nums;
  margin: 0 0 1mm; }
thead { display: table-header-group; }
th { font-weight: 700; text-align: right; vertical-align: bottom; padding: .5mm 2.2mm;
  border-bottom: .9pt solid #222; }
th .unit { display: block; font-weight: 400; color: #555; }
td { text-align: right; padding: .35mm 2.2mm; border-bottom: .3pt solid #cfcfcf; }
th.text, td.text { text-align: left; }
tbody tr:nth-child(5n) td { border-bottom-color: #8f8f8f; }
tr { break-inside: avoid; page-break-inside: avoid; }
p.note { font-size: 7.8pt; color: #444; margin: .5mm 0 0; }
ul.notes { margin: 1mm 0; padding-left: 5mm; }
section.cautions { border: 1.2pt solid #14213d; padding: 1mm 4mm 2mm; margin-top: 6mm;
  break-inside: avoid; page-break-inside: avoid; }
section.cautions h2 { border: 0; margin-top: 2mm; }
section.cautions li { margin: .6mm 0; }
footer { margin-top: 4mm; font-size: 7.5pt; color: #666; text-align: right; }
.shop { display: flex; justify-content: space-between; align-items: flex-start; gap: 6mm;
  border-bottom: .9pt solid #14213d; padding-bottom: 1.6mm; margin-bottom: 3mm; }
.shop .name { font-size: 13pt; font-weight: 700; color: #14213d; }
.shop .lines { font-size: 8pt; color: #333; white-space: pre-line; }
.shop img { max-height: 14mm; max-width: 40mm; }
dl.job { display: grid; grid-template-columns: repeat(3, auto 1fr); gap: .5mm 2mm;
  background: #f4f1eb; padding: 1.2mm 2mm; margin: 2.5mm 0 0; font-size: 8.5pt; }
dl.job dt { font-size: 7pt; text-transform: uppercase; color: #555; font-weight: 700;
  align-self: baseline; }
dl.job dd { margin: 0; }
.key-figures { display: grid; grid-template-columns: repeat(4, 1fr); gap: 1.6mm;
  margin: 3mm 0 1mm; break-inside: avoid; page-break-inside: avoid; }
.key-figures div { background: #f4f1eb; padding: 1.4mm 2.4mm; }
.key-figures .label { font-size: 7pt; letter-spacing: .06em; text-transform: uppercase;
  color: #555; font-weight: 700; }
.key-figures .value { font-size: 15pt; font-weight: 700; color: #14213d; line-height: 1.15;
  white-space: nowrap;
  font-variant-numeric: tabular-nums; }
.key-figures .unit { font-size: 9pt; font-weight: 400; color: #161616; margin-left: .8mm; }
.key-figures .note { font-size: 7pt; color: #555; }
section.appendix { break-before: page; page-break-before: always; }
.side-by-side { display: flex; flex-wrap: wrap; gap: 0 8mm; align-items: flex-start; }
@media print { body { padding: 0; max-width: none; } }
"""


def _table(table: Table) -> str:
    head = "".join(
        f'<th scope="col"{" class=text" if c.text else ""}>{escape(c.name)}'
        + (f'<span class="unit">[{escape(c.unit)}]</span>' if c.unit else "")
        + "</th>"
        for c in table.columns
    )
    body = "".join(
        "<tr>"
        + "".join(
            f"<td{' class=text' if c.text else ''}>{escape(cell)}</td>"
            for cell, c in zip(row, table.columns, strict=True)
        )
        + "</tr>"
        for row in table.rows
    )
    if not table.rows:
        body = f'<tr><td class=text colspan="{len(table.columns)}">none</td></tr>'
    note = f'<p class="note">{escape(table.note)}</p>' if table.note else ""
    return (
        f'<div class="table"><h3>{escape(table.title)}</h3>\n<table><thead><tr>{head}</tr>'
        f"</thead><tbody>{body}</tbody></table>{note}</div>\n"
    )


def _section(section: Section) -> str:
    parts = [f"<section>\n<h2>{escape(section.heading)}</h2>\n"]
    if section.facts:
        items = "".join(
            f"<dt>{escape(label)}</dt><dd>{escape(value)}</dd>" for label, value in section.facts
        )
        parts.append(f'<dl class="facts">{items}</dl>\n')
    short = len(section.tables) > 1 and all(len(t.rows) <= 12 for t in section.tables)
    tables = "".join(_table(t) for t in section.tables)
    parts.append(f'<div class="side-by-side">{tables}</div>\n' if short else tables)
    if section.notes:
        items = "".join(f"<li>{escape(n)}</li>" for n in section.notes)
        parts.append(f'<ul class="notes">{items}</ul>\n')
    parts.append("</section>\n")
    return "".join(parts)


def _letterhead(head: Letterhead) -> str:
    if head.neutral:
        return ""
    logo = f'<img src="{head.logo_uri}" alt="">' if head.logo else ""
    lines = escape("\n".join(head.lines))
    return (
        f'<div class="shop"><div><div class="name">{escape(head.name)}</div>'
        f'<div class="lines">{lines}</div></div>{logo}</div>\n'
    )


def _job(job: tuple[tuple[str, str], ...]) -> str:
    if not job:
        return ""
    items = "".join(f"<dt>{escape(label)}</dt><dd>{escape(value)}</dd>" for label, value in job)
    return f'<dl class="job">{items}</dl>\n'


def _key_figures(figures: tuple[KeyFigure, ...]) -> str:
    if not figures:
        return ""
    cells = "".join(
        f'<div><div class="label">{escape(f.label)}</div><div class="value">{escape(f.value)}'
        f'<span class="unit">{escape(f.unit)}</span></div>'
        + (f'<div class="note">{escape(f.note)}</div>' if f.note else "")
        + "</div>"
        for f in figures
    )
    return f'<div class="key-figures">{cells}</div>\n'


def render_html(report: Report, svg: str | None, letterhead: Letterhead | None = None) -> str:
    """The page; ``svg`` is an ``<svg>`` element (trusted: drawn by
    ``service.output.svg_chart``) or None for a sheet without a chart. One template for
    every sheet."""
    head = letterhead or get_letterhead()
    ref = report.reference
    title = f"{report.kind} {ref} - {head.name}" if ref else f"{report.kind} - {head.name}"
    ident = (
        f'<div class="ident">Reference<br><span class="ref">{escape(ref)}</span></div>'
        if ref
        else '<div class="ident">No reference given</div>'
    )
    chart = (
        f'<figure class="chart">\n{svg}\n<figcaption>{escape(report.chart_caption)}'
        "</figcaption>\n</figure>\n"
        if svg is not None
        else ""
    )
    appendix = "".join(_section(s) for s in report.appendix)
    if appendix:
        appendix = f'<section class="appendix">\n{appendix}</section>\n'
    cautions = "".join(f"<li>{escape(c)}</li>" for c in report.cautions)
    brand = "gearwork" if head.neutral else "calculated with gearwork"
    return (
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n'
        f"<title>{escape(title)}</title>\n<style>\n{CSS}</style>\n</head>\n<body>\n"
        + _letterhead(head)
        + '<header class="masthead">\n'
        f'<div><div class="brand">{brand}</div><h1>{escape(report.kind)}</h1></div>\n'
        f"{ident}\n</header>\n"
        + _job(report.job)
        + f'<p class="units">Units: {escape(report.units)}</p>\n'
        f'<p class="short-caution"><strong>Caution:</strong> {escape(report.short_caution)}</p>\n'
        + _key_figures(report.key_figures)
        + chart
        + "".join(_section(s) for s in report.sections)
        + '<section class="cautions">\n<h2>Cautions</h2>\n'
        f"<ul>{cautions}</ul>\n</section>\n"
        + appendix
        + "<footer>Calculated by gearwork from the data supplied; not a measurement.</footer>\n"
        "</body>\n</html>\n"
    )
