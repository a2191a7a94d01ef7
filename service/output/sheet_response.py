"""One way every printable sheet is answered: format by ``?format=`` or Accept, the job
block from the request, the appendix when asked, paper by setting or units, the same
headers.
"""

from __future__ import annotations

import dataclasses
import enum
from collections.abc import Callable
from typing import Annotated, Any

from fastapi import Query
from starlette.requests import Request
from starlette.responses import Response

from service.http.negotiation import inline_disposition, negotiate
from service.http.openapi import PROBLEM_RESPONSES
from service.output.chart_data import RunChart, TractiveForceChart
from service.output.chart_data_track import PlotChart
from service.output.html import render_html
from service.output.letterhead import get_letterhead, job_facts
from service.output.model import Report
from service.output.pdf import paper_for, render_pdf
from service.output.svg_chart_track import sheet_svg
from service.output.text import render_text
from service.schemas.common import Problem
from service.schemas.job import JobIn
from service.settings import get_settings
from service.units import UnitSystem

__all__ = [
    "OFFERED",
    "SHEET_RESPONSES",
    "AppendixQuery",
    "FormatQuery",
    "SheetFormat",
    "sheet_response",
]

HTML, TEXT, PDF = "text/html", "text/plain", "application/pdf"
OFFERED = (HTML, TEXT, PDF)  # the first is the default for a missing Accept, */* or JSON
_EXTENSIONS = {HTML: "html", TEXT: "txt", PDF: "pdf"}


class SheetFormat(enum.StrEnum):
    """Formats a sheet is printed in, by name (``?format=``)."""

    HTML = "html"
    TEXT = "text"
    PDF = "pdf"


_MEDIA = {SheetFormat.HTML: HTML, SheetFormat.TEXT: TEXT, SheetFormat.PDF: PDF}

FormatQuery = Annotated[
    SheetFormat | None,
    Query(
        description="The format, overriding the Accept header: `html` (default), `text` or `pdf`.",
    ),
]
AppendixQuery = Annotated[
    bool,
    Query(
        description="Add the long tables (per-gear tables, the run over time) in an "
        "appendix after the cautions.",
    ),
]
SHEET_RESPONSES: dict[int | str, dict[str, Any]] = {
    200: {
        "description": "The sheet: one printable HTML page with print CSS (default, also for "
        "`Accept: application/json` or `*/*`); 80-column plain text; or a typeset PDF on "
        "A4 or US Letter.",
        "content": {
            HTML: {"schema": {"type": "string"}},
            TEXT: {"schema": {"type": "string"}},
            PDF: {"schema": {"type": "string", "format": "binary"}},
        },
    },
    406: {"model": Problem, "description": "The Accept header allows none of the formats."},
    **PROBLEM_RESPONSES,
}

ChartMaker = Callable[[], TractiveForceChart | RunChart | PlotChart | None]


async def sheet_response(
    request: Request,
    report: Report,
    *,
    chart: ChartMaker | None,
    fmt: SheetFormat | None,
    appendix: bool,
    job: JobIn | None,
    units: UnitSystem,
    stem: str,
) -> Response:
    """Render ``report`` in the negotiated format; drawing runs on a worker thread."""
    names = {f.value: m for f, m in _MEDIA.items()}
    media = negotiate(request.headers.get("accept"), fmt, names, OFFERED)
    report = dataclasses.replace(
        report, job=job_facts(job), appendix=report.appendix if appendix else ()
    )
    head = get_letterhead()
    if media == TEXT:
        content: bytes | str = render_text(report, head)
    elif media == HTML:
        drawn = None if chart is None else chart()  # None: nothing to draw after all
        svg = None if drawn is None else sheet_svg(drawn)
        content = render_html(report, svg, head)
    else:
        paper = paper_for(get_settings().sheet_paper, units.value)
        drawn = None if chart is None else chart()
        content = render_pdf(report, drawn, paper, head)
    headers = {
        "Vary": "Accept",
        "Content-Disposition": inline_disposition(stem, report.reference, _EXTENSIONS[media]),
    }
    return Response(content, media_type=media, headers=headers)
