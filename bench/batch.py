"""Batch benchmark: acceleration runs per second on one process, two local processes and a
local Dask cluster of two workers, as ratios to the one-process figure.

The runs are the invented catalogue's (examples/catalogue): every vehicle, stocked ratio and
tire size in turn, acceleration runs only. Also printed: the batch machinery's cost per run
(reading, parsing, writing records) against calling the endpoint directly in a loop.

    python -m bench.batch [--runs 10000] [--repeats 1]

Run with ``make bench``. Figures are printed, never asserted: the machine is shared, so
the load average is printed beside them.
"""

from __future__ import annotations

import argparse
import importlib
import json
import os
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

from service.cli.batch import run_batch
from service.cli.endpoints import call_endpoint, endpoint_named
from service.cli.records import OutputSpec

ROOT = Path(__file__).resolve().parent.parent
COLUMNS = ("finish.elapsed", "speeds[0].elapsed", "top_speed.speed")


def _catalogue_runs(n: int) -> list[str]:
    """n acceleration-run batch lines from the invented catalogue (cycled when short)."""
    sys.path.insert(0, str(ROOT / "examples" / "catalogue"))
    expand = importlib.import_module("expand")  # the catalogue's own expansion script

    runs = [line for line in expand.lines(None) if '"endpoint": "run"' in line]
    out = []
    for i in range(n):
        item = json.loads(runs[i % len(runs)])
        item["id"] = f"{item['id']}#{i}"
        out.append(json.dumps(item))
    return out


def _direct(lines: list[str]) -> float:
    """Seconds for the endpoint calls alone, in a loop (no batch machinery)."""
    ep = endpoint_named("run")
    if ep is None:
        raise LookupError("no run endpoint")
    bodies = [json.dumps(json.loads(line)["body"]).encode() for line in lines]
    t0 = time.perf_counter()
    for body in bodies:
        call_endpoint(ep, body)
    return time.perf_counter() - t0


def _batched(source: Path, **engine: Any) -> float:
    with tempfile.TemporaryDirectory() as tmp:
        target = Path(tmp) / "out.csv"
        t0 = time.perf_counter()
        summary = run_batch(source, target, OutputSpec("csv", COLUMNS), **engine)
        seconds = time.perf_counter() - t0
        if summary.errors:
            raise RuntimeError(f"{summary.errors} runs failed: {summary.text()}")
    return seconds


ENGINES = {
    "direct": "direct calls (no batch)",
    "one": "batch, one process",
    "jobs2": "batch, --jobs 2",
    "dask": "batch, Dask 2 workers",
}


def _cpu() -> float:
    """CPU seconds of this process and its reaped children (local and Dask workers)."""
    me, kids = (
        resource.getrusage(resource.RUSAGE_SELF),
        resource.getrusage(resource.RUSAGE_CHILDREN),
    )
    return me.ru_utime + me.ru_stime + kids.ru_utime + kids.ru_stime


def _process_cpu() -> float:
    import psutil  # type: ignore[import-untyped]  # a dependency of distributed

    t = psutil.Process().cpu_times()
    return float(t.user + t.system)


def _worker_cpu(cluster: Any) -> float:
    """CPU seconds of the Dask worker processes so far (0 without a cluster)."""
    if cluster is None:
        return 0.0
    from distributed import Client

    with Client(cluster, set_as_default=False) as client:  # type: ignore[no-untyped-call]
        return float(sum(client.run(_process_cpu).values()))


def _measure(engine: str, n: int) -> dict[str, float]:
    """Time one engine on n runs in this (fresh, single-threaded) process."""
    lines = _catalogue_runs(n)
    with tempfile.TemporaryDirectory() as tmp:
        source = Path(tmp) / "runs.jsonl"
        source.write_text("\n".join(lines) + "\n")
        warm = Path(tmp) / "warm.jsonl"
        warm.write_text("\n".join(lines[:8]) + "\n")
        _direct(lines[:8])  # imports and first-call costs out of the way
        cluster: Any = None
        if engine == "dask":
            from distributed import LocalCluster

            cluster = LocalCluster(  # type: ignore[no-untyped-call]
                n_workers=2, threads_per_worker=1, processes=True, dashboard_address=None
            )
            _batched(warm, scheduler=cluster, chunk_size=1)  # workers import the app
        workers0 = _worker_cpu(cluster)
        cpu0 = _cpu()
        if engine == "direct":
            seconds = _direct(lines)
        elif engine == "one":
            seconds = _batched(source, jobs=1)
        elif engine == "jobs2":
            seconds = _batched(source, jobs=2)
        else:
            seconds = _batched(source, scheduler=cluster)
        cpu = _cpu() - cpu0
        if cluster is not None:  # the Dask workers' CPU in the timed region only
            cpu += _worker_cpu(cluster) - workers0
            cluster.close()
    return {"seconds": seconds, "cpu": cpu}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=10_000, help="runs per batch")
    parser.add_argument("--repeats", type=int, default=1, help="repeats (median shown)")
    parser.add_argument("--no-dask", action="store_true", help="skip the Dask cluster")
    parser.add_argument("--only", choices=sorted(ENGINES), help=argparse.SUPPRESS)
    args = parser.parse_args()
    n = max(10, min(args.runs, 200_000))
    if args.only:  # one engine in a fresh process: no threads left over from another engine
        print(json.dumps(_measure(args.only, n)))
        return
    cores = len(os.sched_getaffinity(0))
    print(f"batch benchmark: {n} acceleration runs, {cores} cores, load {os.getloadavg()[0]:.1f}")
    engines = [e for e in ENGINES if not (args.no_dask and e == "dask")]
    got: dict[str, list[dict[str, float]]] = {e: [] for e in engines}
    for _ in range(max(1, args.repeats)):  # interleaved, so load shifts hit all alike
        for engine in engines:
            cmd = [sys.executable, "-m", "bench.batch", "--runs", str(n), "--only", engine]
            done = subprocess.run(cmd, check=True, capture_output=True, text=True, cwd=ROOT)
            got[engine].append(json.loads(done.stdout.strip().splitlines()[-1]))
    wall = {e: statistics.median(r["seconds"] for r in got[e]) for e in engines}
    cpu = {e: statistics.median(r["cpu"] for r in got[e]) for e in engines}
    for e in engines:
        print(
            f"  {ENGINES[e]:<26} {wall[e]:8.1f} s wall  {n / wall[e]:7.1f} runs/s  "
            f"x{wall['one'] / wall[e]:5.2f} of one process;  {n / cpu[e]:7.1f} runs per "
            f"CPU-second  x{(n / cpu[e]) / (n / cpu['one']):5.2f}"
        )
    overhead = (cpu["one"] - cpu["direct"]) / cpu["direct"]
    print(f"  batch machinery per run: {100 * overhead:+.1f} % of a run's CPU (target <= 10 %)")
    print(
        f"  load average after: {os.getloadavg()[0]:.1f} on {cores} cores (shared machine: "
        "wall ratios depend on the others' load; CPU figures are less affected)"
    )


if __name__ == "__main__":
    main()
