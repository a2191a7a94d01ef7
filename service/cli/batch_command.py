"""The ``gearwork batch`` subcommand (options, then ``service.cli.batch.run_batch``)."""

from __future__ import annotations

import sys
from pathlib import Path

import click

from service.cli.batch import default_jobs, run_batch
from service.cli.records import OutputSpec

__all__ = ["batch"]


@click.command("batch")
@click.argument("source", metavar="INPUT", type=click.Path(exists=True, dir_okay=False))
@click.option(
    "-o",
    "--output",
    required=True,
    type=click.Path(dir_okay=False),
    help="Output file; appended to, and ids already in it are skipped (resume).",
)
@click.option(
    "--format",
    "kind",
    type=click.Choice(["jsonl", "csv"]),
    default=None,
    help="JSON lines or CSV (default: from the output's extension, else jsonl).",
)
@click.option(
    "-c",
    "--columns",
    default="",
    help="Comma-separated dotted paths of each answer to keep (needed for CSV), "
    "e.g. 'finish.elapsed,shifts[0].rpm_after'.",
)
@click.option(
    "-j",
    "--jobs",
    type=click.IntRange(1, 256),
    default=None,
    help="Local processes (default: the cores available).",
)
@click.option(
    "--scheduler",
    default=None,
    metavar="ADDRESS",
    help="Run on a Dask cluster instead (tcp://host:8786; needs the [cluster] extra).",
)
@click.option("--chunk-size", type=click.IntRange(1, 10_000), default=None, help="Lines per task.")
@click.option(
    "--progress/--no-progress",
    default=None,
    help="Progress bar on stderr (default: when stderr is a terminal).",
)
def batch(
    source: str,
    output: str,
    kind: str | None,
    columns: str,
    jobs: int | None,
    scheduler: str | None,
    chunk_size: int | None,
    progress: bool | None,
) -> None:
    """Run every line of INPUT (JSON lines: {"id": ..., "endpoint": ..., "body": {...}})
    and write one record per line, in input order: the answer or chosen columns of it, or
    the problem details. Endpoints: shift-plan, run, compare, sweep, spacing, speedometer,
    dyno-correct, import, log-check, chassis, coast-down, shift-window, weather (or the
    route's name, e.g. acceleration-run). A summary goes to stderr at the end.

    \b
    Example:
      gearwork batch examples/catalogue/runs.jsonl -o fitment.csv \\
        --columns 'finish.elapsed,speeds[0].elapsed' --jobs 2
      gearwork batch runs.jsonl -o answers.jsonl --scheduler tcp://127.0.0.1:8786
    """
    chosen = "csv" if kind == "csv" or (kind is None and output.endswith(".csv")) else "jsonl"
    cols = tuple(c.strip() for c in columns.split(",") if c.strip())
    if chosen == "csv" and not cols:
        raise click.UsageError("CSV output needs --columns.")
    spec = OutputSpec("csv" if chosen == "csv" else "jsonl", cols)
    if scheduler is not None:
        try:
            import distributed  # noqa: F401
        except ImportError as exc:
            raise click.UsageError(
                "--scheduler needs Dask: pip install 'gearwork[cluster]'."
            ) from exc
    try:
        summary = run_batch(
            Path(source),
            Path(output),
            spec,
            jobs=jobs or default_jobs(),
            scheduler=scheduler,
            chunk_size=chunk_size,
            progress=sys.stderr.isatty() if progress is None else progress,
        )
    except (ValueError, OSError) as exc:
        raise click.UsageError(str(exc)) from exc
    click.echo(summary.text(), err=True)
