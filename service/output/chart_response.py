"""One way a chart is answered: SVG or PNG by ``?format=`` or Accept, the same headers."""

from __future__ import annotations

import enum
from collections.abc import Callable
from typing import Annotated, Any

from fastapi import Query
from starlette.requests import Request
from starlette.responses import Response

from service.http.negotiation import inline_disposition, negotiate
from service.http.openapi import PROBLEM_RESPONSES
from service.output.chart_data import RunChart, TractiveForceChart
from service.output.png_chart import ChartFormat, render_chart
from service.schemas.common import Problem

__all__ = ["CHART_RESPONSES", "OFFERED", "ImageName", "ImageQuery", "chart_response"]

OFFERED = (ChartFormat.SVG.value, ChartFormat.PNG.value)  # SVG: missing Accept, */*, JSON
_EXTENSIONS = {ChartFormat.SVG: "svg", ChartFormat.PNG: "png"}


class ImageName(enum.StrEnum):
    """Chart formats by name (``?format=``)."""

    SVG = "svg"
    PNG = "png"


_MEDIA = {ImageName.SVG.value: ChartFormat.SVG.value, ImageName.PNG.value: ChartFormat.PNG.value}

ImageQuery = Annotated[
    ImageName | None,
    Query(description="The format, overriding the Accept header: `svg` (default) or `png`."),
]
CHART_RESPONSES: dict[int | str, dict[str, Any]] = {
    200: {
        "description": "The chart: SVG (default, also for `Accept: application/json` or "
        "`*/*`) or PNG.",
        "content": {
            ChartFormat.SVG.value: {"schema": {"type": "string"}},
            ChartFormat.PNG.value: {"schema": {"type": "string", "format": "binary"}},
        },
    },
    406: {"model": Problem, "description": "The Accept header allows neither image type."},
    **PROBLEM_RESPONSES,
}


def chart_response(
    request: Request,
    chart: Callable[[], TractiveForceChart | RunChart],
    *,
    fmt: ImageName | None,
    reference: str | None,
    stem: str,
) -> Response:
    """The chart ``chart()`` makes, drawn in the negotiated image format; the format is
    settled first (406 when Accept allows neither), before any computing."""
    media = ChartFormat(negotiate(request.headers.get("accept"), fmt, _MEDIA, OFFERED))
    image = render_chart(chart(), media)
    headers = {
        "Vary": "Accept",
        "Content-Disposition": inline_disposition(stem, reference, _EXTENSIONS[media]),
    }
    return Response(image, media_type=media.value, headers=headers)
