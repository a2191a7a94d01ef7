"""In-process baselines and interleaved medians for the run and sweep benchmarks.

The baseline is ``GET /healthz`` answered in the same process through httpx's ASGI
transport: what the service costs a caller before it computes anything. Every figure is
the median over rounds of the median of a few calls, the cases interleaved round by round
so that a busy moment of the shared machine touches all of them alike. Calls are timed in
CPU time of this process (``time.process_time``): on a machine shared with other work a
long call is preempted more often than a short one, which wall-clock ratios would count
against it.
"""

from __future__ import annotations

import asyncio
import statistics
import time
from collections.abc import Callable

import httpx

__all__ = ["healthz_call", "interleaved_ms"]


def healthz_call() -> tuple[Callable[[], object], Callable[[], None]]:
    """A callable that answers ``GET /healthz`` in process, and one that closes it."""
    from service.app import app

    loop = asyncio.new_event_loop()
    client = httpx.AsyncClient(transport=httpx.ASGITransport(app=app), base_url="http://bench")

    def call() -> object:
        response = loop.run_until_complete(client.get("/healthz"))
        response.raise_for_status()
        return response

    def close() -> None:
        loop.run_until_complete(client.aclose())
        loop.close()

    return call, close


def interleaved_ms(
    cases: dict[str, tuple[Callable[[], object], int]], rounds: int
) -> dict[str, float]:
    """Median cost [ms] of each case: ``rounds`` rounds, each timing every case ``calls``
    times in turn and keeping the median; the figure is the median of the rounds."""
    for fn, _ in cases.values():  # warm up
        fn()
    per_round: dict[str, list[float]] = {k: [] for k in cases}
    for _ in range(rounds):
        for key, (fn, calls) in cases.items():
            samples = []
            for _ in range(calls):
                t0 = time.process_time()
                fn()
                samples.append(time.process_time() - t0)
            per_round[key].append(statistics.median(samples) * 1e3)
    return {k: statistics.median(v) for k, v in per_round.items()}
