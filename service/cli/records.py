"""One batch line in, one output record out: parsing, computing, choosing columns.

A batch line is a JSON object ``{"id": ..., "endpoint": ..., "body": ...}`` (and optionally
``"params"``, the route's query parameters). Whatever happens, it gives exactly one output
record: the answer (or the chosen columns of it) or the problem details. Records are made
as text here, in the worker, so every engine writes the same bytes.
"""

from __future__ import annotations

import csv
import io
from collections.abc import Sequence
from dataclasses import dataclass
from typing import Any, Literal

import orjson

from service.cli.endpoints import Endpoint, call_endpoint, endpoint_named
from service.http.problems import problem_response

__all__ = [
    "OutputSpec",
    "Record",
    "column_value",
    "csv_header",
    "run_chunk",
    "run_line",
]

_OPTIONS = orjson.OPT_SERIALIZE_NUMPY


@dataclass(frozen=True)
class OutputSpec:
    """How each record is written.

    Attributes
    ----------
    kind : {"jsonl", "csv"}
        JSON lines (one object per input) or CSV (one row per input).
    columns : tuple of str
        Dotted paths into each answer (``finish.elapsed``, ``shifts[0].shift_rpm``
        or ``shifts.0.shift_rpm``); empty keeps the whole answer (JSON lines only).
    """

    kind: Literal["jsonl", "csv"] = "jsonl"
    columns: tuple[str, ...] = ()


@dataclass(frozen=True)
class Record:
    """One output record: the input's id, the answer's status and the written text."""

    id: str
    status: int
    text: str


def column_value(doc: Any, path: str) -> Any:
    """The value at a dotted path (``a.b[0].c`` or ``a.b.0.c``), or None when absent.

    >>> column_value({"shifts": [{"shift_rpm": 6500.0}]}, "shifts[0].shift_rpm")
    6500.0
    >>> column_value({"top_speed": None}, "top_speed.speed") is None
    True
    """
    node = doc
    for part in path.replace("[", ".").replace("]", "").split("."):
        if part == "":
            continue
        if isinstance(node, dict):
            node = node.get(part)
        elif isinstance(node, list) and part.lstrip("-").isdigit() and -len(node) <= int(part):
            node = node[int(part)] if int(part) < len(node) else None
        else:
            return None
    return node


def csv_header(spec: OutputSpec) -> str:
    """The CSV header line (with its newline)."""
    return _csv_row(["id", "endpoint", "status", *spec.columns, "problem"])


def _csv_row(cells: Sequence[Any]) -> str:
    out = io.StringIO()
    csv.writer(out, lineterminator="\n").writerow([_cell(c) for c in cells])
    return out.getvalue()


def _cell(value: Any) -> str:
    """A CSV cell on one physical line: scalars as text, lists, objects and text with a
    line break as JSON."""
    if value is None:
        return ""
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int | float):
        return orjson.dumps(value).decode()
    if isinstance(value, str) and "\n" not in value and "\r" not in value:
        return value
    return orjson.dumps(value, option=_OPTIONS).decode()


def _problem(status: int, detail: str, number: int, field: str) -> dict[str, Any]:
    """Problem details for a line that never reached an endpoint (the service's shape)."""
    response = problem_response(status, detail, f"batch:line {number}", field=field)
    doc: dict[str, Any] = orjson.loads(bytes(response.body))
    return doc


class _LineError(ValueError):
    """A line that cannot reach an endpoint, with what is known of it."""

    def __init__(self, status: int, detail: str, field: str, ident: str, name: str = "") -> None:
        super().__init__(detail)
        self.status, self.detail, self.field = status, detail, field
        self.ident, self.name = ident, name


def _parse(line: bytes, number: int) -> tuple[str, Endpoint, Any, dict[str, str]]:
    """(id, endpoint, body, params) of one input line; raises _LineError."""
    fallback = f"line-{number}"
    try:
        item = orjson.loads(line)
    except orjson.JSONDecodeError as exc:
        detail = f"The line is not valid JSON: {exc.msg}."
        raise _LineError(400, detail, "line", fallback) from None
    if not isinstance(item, dict):
        raise _LineError(422, "The line must be a JSON object.", "line", fallback)
    ident = item.get("id")
    if not isinstance(ident, str | int) or isinstance(ident, bool) or str(ident) == "":
        raise _LineError(422, "`id` must be a non-empty string or an integer.", "id", fallback)
    name = item.get("endpoint")
    ep = endpoint_named(name) if isinstance(name, str) else None
    if ep is None:
        detail = f"`endpoint` must name an endpoint, got {str(name)[:40]!r}."
        raise _LineError(422, detail, "endpoint", str(ident), str(name or ""))
    params = item.get("params") or {}
    if not isinstance(params, dict):
        raise _LineError(422, "`params` must be an object.", "params", str(ident), ep.name)
    if "body" not in item:
        raise _LineError(422, "`body` is required.", "body", str(ident), ep.name)
    return str(ident), ep, item["body"], {str(k): str(v) for k, v in params.items()}


def run_line(line: bytes, number: int, spec: OutputSpec) -> Record:
    """Compute one input line and write its record (never raises for bad input)."""
    answer: Any = None
    problem: dict[str, Any] | None = None
    try:
        ident, ep, body, params = _parse(line, number)
    except _LineError as bad:
        ident, name, status = bad.ident, bad.name, bad.status
        problem = _problem(bad.status, bad.detail, number, bad.field)
    else:
        name = ep.name
        done = call_endpoint(ep, body, query=params)
        status = done.status
        parsed = orjson.loads(done.body)
        answer, problem = (parsed, None) if done.ok else (None, parsed)
    if spec.kind == "csv":
        values = [column_value(answer, c) if answer is not None else None for c in spec.columns]
        text = _csv_row([ident, name, status, *values, problem])
    else:
        record: dict[str, Any] = {"id": ident, "endpoint": name, "status": status}
        if problem is not None:
            record["problem"] = problem
        elif spec.columns:
            record["result"] = {c: column_value(answer, c) for c in spec.columns}
        else:
            record["result"] = answer
        text = orjson.dumps(record, option=_OPTIONS).decode() + "\n"
    return Record(ident, status, text)


def run_chunk(lines: Sequence[tuple[int, bytes]], spec: OutputSpec) -> list[Record]:
    """Records of a chunk of numbered input lines, in order (the unit of work an engine
    runs)."""
    return [run_line(line, number, spec) for number, line in lines]
