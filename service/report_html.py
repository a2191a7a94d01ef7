"""A report as one printable HTML page: print CSS, the tables, the cautions, an inline SVG.

Plain string building; every text from the report is escaped with ``html.escape``. The page
fits A4 and US Letter alike: the content is at most 184 mm wide, and ``@page`` sets only
margins, so the printer's paper size stands.
"""

from __future__ import annotations

from html import escape

from service.report_model import Report, Section, Table

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
        f"<h3>{escape(table.title)}</h3>\n<table><thead><tr>{head}</tr></thead>"
        f"<tbody>{body}</tbody></table>{note}\n"
    )


def _section(section: Section) -> str:
    parts = [f"<section>\n<h2>{escape(section.heading)}</h2>\n"]
    if section.facts:
        items = "".join(
            f"<dt>{escape(label)}</dt><dd>{escape(value)}</dd>" for label, value in section.facts
        )
        parts.append(f'<dl class="facts">{items}</dl>\n')
    parts += [_table(t) for t in section.tables]
    if section.notes:
        items = "".join(f"<li>{escape(n)}</li>" for n in section.notes)
        parts.append(f'<ul class="notes">{items}</ul>\n')
    parts.append("</section>\n")
    return "".join(parts)


def render_html(report: Report, svg: str) -> str:
    """The page; ``svg`` is an ``<svg>`` element (trusted: drawn by ``service.charts``)."""
    ref = report.reference
    title = f"{report.kind} {ref} - gearwork" if ref else f"{report.kind} - gearwork"
    ident = (
        f'<div class="ident">Reference<br><span class="ref">{escape(ref)}</span></div>'
        if ref
        else '<div class="ident">No reference given</div>'
    )
    cautions = "".join(f"<li>{escape(c)}</li>" for c in report.cautions)
    return (
        '<!DOCTYPE html>\n<html lang="en">\n<head>\n<meta charset="utf-8">\n'
        '<meta name="viewport" content="width=device-width, initial-scale=1">\n'
        f"<title>{escape(title)}</title>\n<style>\n{CSS}</style>\n</head>\n<body>\n"
        '<header class="masthead">\n'
        f'<div><div class="brand">gearwork</div><h1>{escape(report.kind)}</h1></div>\n'
        f"{ident}\n</header>\n"
        f'<p class="units">Units: {escape(report.units)}</p>\n'
        f'<p class="short-caution"><strong>Caution:</strong> {escape(report.short_caution)}</p>\n'
        f'<figure class="chart">\n{svg}\n<figcaption>{escape(report.chart_caption)}'
        "</figcaption>\n</figure>\n"
        + "".join(_section(s) for s in report.sections)
        + '<section class="cautions">\n<h2>Cautions</h2>\n'
        f"<ul>{cautions}</ul>\n</section>\n"
        "<footer>Calculated by gearwork from the data supplied; not a measurement.</footer>\n"
        "</body>\n</html>\n"
    )
