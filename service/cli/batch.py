"""``gearwork batch``: many requests from a JSON-lines file, on local processes or Dask.

The input is read lazily, lines whose id is already in the output are skipped (resume),
the rest go in chunks to an engine (this process, a local process pool, or a Dask
cluster), and the records come back and are appended in input order, so an interrupted
and resumed batch writes the same file as an uninterrupted one, whichever engine runs it.
"""

from __future__ import annotations

import csv
import io
import os
import sys
import threading
import time
from collections import Counter, deque
from collections.abc import Callable, Iterable, Iterator
from concurrent.futures import Executor, ProcessPoolExecutor
from dataclasses import dataclass, field
from multiprocessing import get_context
from pathlib import Path
from typing import Any, Protocol, TextIO

import orjson

from service.cli.records import OutputSpec, Record, csv_header, run_chunk

__all__ = [
    "BatchSummary",
    "Progress",
    "completed_ids",
    "count_lines",
    "default_jobs",
    "run_batch",
]


class _Future(Protocol):
    def result(self) -> Any: ...


Submit = Callable[[list[tuple[int, bytes]], OutputSpec], _Future]


@dataclass
class BatchSummary:
    """What a batch did: lines read, skipped as already done, written, statuses, time."""

    lines: int = 0
    skipped: int = 0
    written: int = 0
    statuses: Counter[int] = field(default_factory=Counter)
    seconds: float = 0.0
    engine: str = ""

    @property
    def errors(self) -> int:
        """Records that carry problem details."""
        return sum(n for s, n in self.statuses.items() if not 200 <= s < 300)

    def text(self) -> str:
        """One line for stderr."""
        rate = self.written / self.seconds if self.seconds > 0 else 0.0
        by = ", ".join(f"{s}: {n}" for s, n in sorted(self.statuses.items()) if s >= 300)
        return (
            f"batch: {self.lines} lines; {self.written} written ({self.written - self.errors} "
            f"ok, {self.errors} problems{' - ' + by if by else ''}); {self.skipped} already "
            f"in the output; {self.seconds:.1f} s, {rate:.1f} runs/s on {self.engine}"
        )


class Progress:
    """A progress bar on stderr with the rate and the time left (redrawn at most 5x/s)."""

    def __init__(self, total: int, *, enabled: bool, stream: TextIO | None = None) -> None:
        self.total, self.enabled = total, enabled
        self.stream = stream or sys.stderr
        self.done = 0
        self._start = time.monotonic()
        self._drawn = 0.0

    def advance(self, n: int) -> None:
        """Count n more records and redraw when due."""
        self.done += n
        now = time.monotonic()
        if self.enabled and (now - self._drawn >= 0.2 or self.done >= self.total):
            self._drawn = now
            self.stream.write("\r" + self.line(now - self._start))
            self.stream.flush()

    def line(self, elapsed: float) -> str:
        """The bar: done/total, per cent, runs per second, time left."""
        frac = self.done / self.total if self.total else 1.0
        rate = self.done / elapsed if elapsed > 0 else 0.0
        left = (self.total - self.done) / rate if rate > 0 else float("nan")
        bar = "#" * int(frac * 24)
        eta = "--:--" if left != left else f"{int(left // 60):d}:{int(left % 60):02d}"
        return (
            f"[{bar:<24}] {self.done}/{self.total} {100 * frac:5.1f}% "
            f"{rate:7.1f} runs/s  {eta} left "
        )

    def close(self) -> None:
        """End the bar's line."""
        if self.enabled:
            self.stream.write("\n")
            self.stream.flush()


def completed_ids(path: Path, spec: OutputSpec) -> set[str]:
    """Ids already written to an output file; a torn last line (no newline) is cut off."""
    if not path.exists():
        return set()
    raw = path.read_bytes()
    end = raw.rfind(b"\n") + 1
    if end < len(raw):
        with path.open("r+b") as fh:
            fh.truncate(end)
        raw = raw[:end]
    text = raw.decode()
    if spec.kind == "csv":
        rows = list(csv.reader(io.StringIO(text)))
        if rows and rows[0] != next(csv.reader([csv_header(spec)])):
            raise ValueError(f"{path} has other columns than this batch: {rows[0]}")
        return {row[0] for row in rows[1:] if row}
    done = set()
    for line in text.splitlines():
        if line.strip():
            done.add(str(orjson.loads(line)["id"]))
    return done


def _line_id(line: bytes) -> str | None:
    try:
        item = orjson.loads(line)
    except orjson.JSONDecodeError:
        return None
    ident = item.get("id") if isinstance(item, dict) else None
    return None if ident is None or isinstance(ident, bool) else str(ident)


def _todo(source: Path, done: set[str], summary: BatchSummary) -> Iterator[tuple[int, bytes]]:
    """Numbered input lines not yet in the output (blank lines ignored)."""
    with source.open("rb") as fh:
        for number, line in enumerate(fh, start=1):
            if not line.strip():
                continue
            summary.lines += 1
            ident = _line_id(line)
            if (ident if ident is not None else f"line-{number}") in done:
                summary.skipped += 1
                continue
            yield number, line.rstrip(b"\r\n")


def _chunks(items: Iterable[tuple[int, bytes]], size: int) -> Iterator[list[tuple[int, bytes]]]:
    chunk: list[tuple[int, bytes]] = []
    for item in items:
        chunk.append(item)
        if len(chunk) >= size:
            yield chunk
            chunk = []
    if chunk:
        yield chunk


def _ordered(
    submit: Submit,
    chunks: Iterable[list[tuple[int, bytes]]],
    spec: OutputSpec,
    window: int,
) -> Iterator[list[Record]]:
    """Results chunk by chunk in input order, with at most ``window`` chunks in flight."""
    pending: deque[_Future] = deque()
    for chunk in chunks:
        pending.append(submit(chunk, spec))
        if len(pending) >= window:
            yield pending.popleft().result()
    while pending:
        yield pending.popleft().result()


class _Here:
    """Runs a chunk at once in this process (``--jobs 1``)."""

    def __init__(self, records: list[Record]) -> None:
        self._records = records

    def result(self) -> list[Record]:
        return self._records


def _preload() -> None:
    """Import the application once per worker before its first chunk."""
    from service.cli.endpoints import _app

    _app()


def _local_pool(jobs: int) -> Executor:
    """Worker processes forked from this one when it runs a single thread (they inherit
    the imported application), else from a fork server that imported it once."""
    if threading.active_count() == 1:
        _preload()
        return ProcessPoolExecutor(jobs, mp_context=get_context("fork"), initializer=_preload)
    server = get_context("forkserver")
    server.set_forkserver_preload(["service.app", "service.cli.records"])
    return ProcessPoolExecutor(jobs, mp_context=server, initializer=_preload)


def count_lines(source: Path) -> int:
    """Non-blank lines of the input (for the progress bar)."""
    with source.open("rb") as fh:
        return sum(1 for line in fh if line.strip())


@dataclass(frozen=True)
class _Engine:
    """Where chunks run: how to submit one, the workers there, its name, how to stop it."""

    submit: Submit
    workers: int
    name: str
    close: Callable[[], None]


def _engine(jobs: int, scheduler: Any) -> _Engine:
    """Dask when a scheduler is given, else ``jobs`` local processes, else this one."""
    if scheduler is not None:
        from distributed import Client

        client: Any = Client(scheduler, set_as_default=False)  # type: ignore[no-untyped-call]
        workers = max(1, sum(client.nthreads().values()))

        def on_dask(chunk: list[tuple[int, bytes]], s: OutputSpec) -> _Future:
            future: _Future = client.submit(run_chunk, chunk, s, pure=False)
            return future

        name = f"Dask ({workers} worker threads at {client.scheduler.address})"
        return _Engine(on_dask, workers, name, client.close)
    if jobs > 1:
        pool = _local_pool(jobs)

        def on_pool(chunk: list[tuple[int, bytes]], s: OutputSpec) -> _Future:
            return pool.submit(run_chunk, chunk, s)

        return _Engine(
            on_pool,
            jobs,
            f"{jobs} local processes",
            lambda: pool.shutdown(cancel_futures=True),
        )

    def here(chunk: list[tuple[int, bytes]], s: OutputSpec) -> _Future:
        return _Here(run_chunk(chunk, s))

    return _Engine(here, jobs, "this process", lambda: None)


def run_batch(
    source: Path,
    target: Path,
    spec: OutputSpec,
    *,
    jobs: int = 1,
    scheduler: Any = None,
    chunk_size: int | None = None,
    progress: bool = False,
    stream: TextIO | None = None,
) -> BatchSummary:
    """Run every line of ``source`` not yet in ``target`` and append the records.

    Parameters
    ----------
    source, target : Path
        The JSON-lines input and the JSON-lines or CSV output (appended to).
    spec : OutputSpec
        Output kind and columns.
    jobs : int
        Local worker processes (1: this process). Ignored with ``scheduler``.
    scheduler : str or object, optional
        A Dask scheduler address (``tcp://host:8786``) or cluster object: run on Dask.
    chunk_size : int, optional
        Lines per task; by default enough chunks for eight per worker, at most 64 lines.
    progress : bool
        Draw the progress bar on ``stream`` (stderr).

    Returns
    -------
    BatchSummary
    """
    summary = BatchSummary()
    started = time.monotonic()
    done = completed_ids(target, spec)
    total = count_lines(source)
    engine = _engine(jobs, scheduler)
    summary.engine, workers = engine.name, engine.workers
    left = max(0, total - len(done))
    size = chunk_size or max(1, min(64, -(-left // (8 * workers))))
    bar = Progress(left, enabled=progress, stream=stream)
    fresh = not target.exists() or target.stat().st_size == 0
    try:
        with target.open("a", encoding="utf-8", newline="") as out:
            if spec.kind == "csv" and fresh:
                out.write(csv_header(spec))
            todo = _chunks(_todo(source, done, summary), size)
            for records in _ordered(engine.submit, todo, spec, window=4 * workers):
                out.write("".join(r.text for r in records))
                out.flush()
                summary.written += len(records)
                summary.statuses.update(r.status for r in records)
                bar.advance(len(records))
    finally:
        bar.close()
        engine.close()
    summary.seconds = time.monotonic() - started
    return summary


def default_jobs() -> int:
    """Cores this process may use."""
    return len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else 1
