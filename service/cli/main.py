"""The ``gearwork`` command: every endpoint in process, batch runs, and the service.

Each endpoint family is a subcommand that reads the endpoint's JSON body from a file (or
stdin) and answers exactly what the endpoint answers: the printable summary by default,
or ``--format json|text|html|pdf|svg|png`` (to ``-o FILE``). Bad input prints the
endpoint's RFC 9457 problem details on stderr and exits with status 2.
"""

from __future__ import annotations

import sys
from pathlib import Path
from typing import Any, BinaryIO

import click
import orjson

from service.cli.batch_command import batch
from service.cli.endpoints import ENDPOINTS, Answer, Endpoint, call_endpoint

__all__ = ["cli", "main"]

EXIT_BAD_INPUT = 2  # the same status click gives a usage error
EXIT_FAILED = 1

_EXAMPLES = {
    "shift-plan": "gearwork shift-plan tests/data/demo_coupe_us.json\n"
    "gearwork shift-plan car.json --format pdf -o plan.pdf",
    "run": "gearwork run tests/data/demo_sedan_run_metric.json\n"
    "gearwork run car.json --format json -o run.json",
    "compare": "gearwork compare tests/data/demo_comparison_us.json",
    "sweep": "gearwork sweep tests/data/demo_sweep_us.json --format json",
    "spacing": "gearwork spacing tests/data/demo_gear_spacing_us.json",
    "speedometer": "gearwork speedometer tests/data/demo_speedometer_us.json",
    "dyno-correct": "gearwork dyno-correct tests/data/demo_dyno_correction_metric.json",
    "import": "gearwork import tests/data/demo_dyno_export.csv -p units=us",
    "log-check": "gearwork log-check tests/data/demo_log_text_request_metric.json",
    "chassis": "gearwork chassis tests/data/demo_chassis_metric.json",
    "coast-down": "gearwork coast-down tests/data/demo_coastdown_metric.json",
    "shift-window": "gearwork shift-window tests/data/demo_shift_window_metric.json",
    "weather": "gearwork weather tests/data/demo_weather_metric.json",
    "calibrate": "gearwork calibrate tests/data/demo_calibration_metric.json",
}


def _read(source: str) -> bytes:
    if source == "-":
        return sys.stdin.buffer.read()
    try:
        return Path(source).read_bytes()
    except OSError as exc:
        raise click.BadParameter(
            f"cannot read {source}: {exc.strerror}", param_hint="FILE"
        ) from exc


def _params(pairs: tuple[str, ...]) -> dict[str, str]:
    out = {}
    for pair in pairs:
        name, sep, value = pair.partition("=")
        if not sep or not name:
            raise click.BadParameter(f"{pair!r} is not NAME=VALUE", param_hint="--param")
        out[name] = value
    return out


def _write(data: bytes, target: str | None) -> None:
    if target is None or target == "-":
        stream: BinaryIO = sys.stdout.buffer
        stream.write(data)
        stream.flush()
    else:
        Path(target).write_bytes(data)


def _fail(answer: Answer) -> None:
    """Problem details on stderr; exit 2 for bad input, 1 for anything else."""
    sys.stderr.buffer.write(answer.body + b"\n")
    sys.stderr.flush()
    sys.exit(EXIT_BAD_INPUT if 400 <= answer.status < 500 else EXIT_FAILED)


def _shown(ep: Endpoint, answer: Answer, fmt: str | None) -> bytes:
    """The bytes to print: the summary by default, else the format asked for."""
    if fmt in {"json", "html", "pdf", "svg", "png"} or (fmt == "text" and ep.report):
        return answer.body
    doc: Any = orjson.loads(answer.body)
    summary = doc.get("summary") if isinstance(doc, dict) else None
    if isinstance(summary, str):
        return summary.encode() + (b"" if summary.endswith("\n") else b"\n")
    return orjson.dumps(doc, option=orjson.OPT_INDENT_2) + b"\n"


def _command(ep: Endpoint) -> click.Command:
    body_kind = "the dyno export (delimited text)" if ep.raw_body else "the JSON request body"

    @click.argument("source", metavar="FILE", default="-")
    @click.option(
        "-f",
        "--format",
        "fmt",
        type=click.Choice(ep.formats),
        default=None,
        help="Answer format (default: the printable summary). "
        + ("text/html/pdf: the printable report. " if ep.report else "")
        + ("svg/png: the tractive-force chart." if ep.chart else ""),
    )
    @click.option("-o", "--output", default=None, help="Write here instead of stdout.")
    @click.option(
        "-p",
        "--param",
        "params",
        multiple=True,
        metavar="NAME=VALUE",
        help="A query parameter of the endpoint (repeatable).",
    )
    def run(source: str, fmt: str | None, output: str | None, params: tuple[str, ...]) -> None:
        answer = call_endpoint(ep, _read(source), fmt=fmt or "json", query=_params(params))
        if not answer.ok:
            _fail(answer)
        _write(_shown(ep, answer, fmt), output)

    run.__doc__ = (
        f"Compute POST {ep.path} in process from FILE ({body_kind}; '-' or nothing: "
        f"stdin).\n\nExample:\n\n\b\n{_EXAMPLES.get(ep.name, '')}"
    )
    return click.command(ep.name)(run)


@click.group(context_settings={"help_option_names": ["-h", "--help"]})
@click.version_option("0.1.0", prog_name="gearwork")
def cli() -> None:
    """Gearing and shift points from the command line: each endpoint in process, batch
    runs over a catalogue on local processes or a Dask cluster, and the HTTP service.

    \b
    Examples:
      gearwork shift-plan tests/data/demo_coupe_us.json
      gearwork run car.json --format pdf -o run.pdf
      gearwork batch runs.jsonl -o answers.csv --columns finish.elapsed --jobs 2
      gearwork serve --port 8000
    """


for _ep in ENDPOINTS:
    cli.add_command(_command(_ep))


@cli.command(
    "serve",
    context_settings={"ignore_unknown_options": True, "allow_extra_args": True},
)
@click.pass_context
def serve(ctx: click.Context) -> None:
    """Start the HTTP service (the flags of ``python -m service``: --host, --port,
    --workers, --log-level; defaults from GEARWORK_* variables).

    \b
    Example:
      gearwork serve --host 127.0.0.1 --port 8000 --workers 2
    """
    from service.__main__ import main as serve_main

    serve_main(list(ctx.args))


cli.add_command(batch)


def main() -> None:
    """Console entry point (``gearwork``)."""
    cli()
