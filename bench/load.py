"""Served load: throughput, latency, errors and memory of uvicorn as the container runs it.

    python -m bench.load [--seconds 10] [--duration 60] [--workers N] [--connections 16]

Needs ``wrk`` (Debian package ``wrk``: ``apt-get install wrk``; ``make bench`` installs it).
The server is ``python -m service``, the container's command: workers from
GEARWORK_WORKERS (or ``--workers``), uvicorn's access log off, uvloop and httptools (what
uvicorn picks when they are installed; checked below), JSON request logs on (sent to
/dev/null) and metrics summed over the workers through PROMETHEUS_MULTIPROC_DIR.

In one run it loads GET /healthz, POST /v1/shift-plan (tests/data/demo_coupe_us.json) and
POST /v1/acceleration-run (tests/data/demo_sedan_run_metric.json) for ``--seconds`` each
and prints requests per second (also as a share of /healthz), p50 and p99 latency and the
error count. The POST bodies rotate through ``--variants`` final-drive ratios (a wrk Lua
script), more than the result cache holds, so every request is computed; the same body
repeated (answered from the cache) is reported on its own line, and an overload line
(``--overload`` connections, past what the workers admit) shows the busy answers: its
errors are the 503s (with Retry-After) of requests refused beyond GEARWORK_MAX_IN_FLIGHT
per worker, so the queue, and with it the wait, stays bounded. Then a soak of
``--duration`` seconds alternates both endpoints with varied bodies, in two halves, and the
resident memory (VmRSS from /proc/<pid>/status) of the uvicorn master and each worker is
printed at start, after warm-up (caches full) and after each half of the soak: a leak
would keep growing through the second half. Figures are printed, never
asserted: the machine is shared (wrk runs on the same two cores as the server).
"""

from __future__ import annotations

import argparse
import json
import os
import re
import shutil
import socket
import subprocess
import sys
import tempfile
import time
import urllib.request
from collections.abc import Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
DATA = ROOT / "tests" / "data"
SENTINEL = 1234.5678  # stands for the final-drive ratio in the body template

_LUA = """
local paths = {%(paths)s}
local heads = {%(heads)s}
local tails = {%(tails)s}
local variants = %(variants)d
local counter = 0
offset = 0  -- global: setup() sets it in each thread
local threads = 0

function setup(thread)
  thread:set("offset", threads * 7919)
  threads = threads + 1
end

request = function()
  counter = counter + 1
  local k = (counter %% #paths) + 1
  local body = nil
  local method = "GET"
  if heads[k] ~= "" then
    method = "POST"
    local ratio = %(first_ratio)f
    if variants > 1 then
      ratio = ratio + ((counter + offset) %% variants) * %(ratio_step)f
    end
    body = heads[k] .. string.format("%%.3f", ratio) .. tails[k]
  end
  return wrk.format(method, paths[k], {["Content-Type"] = "application/json"}, body)
end

done = function(summary, latency, requests)
  io.write(string.format(
    "JSON {\\"p50\\": %%f, \\"p99\\": %%f, \\"non2xx\\": %%d, \\"errors\\": %%d}\\n",
    latency:percentile(50) / 1000, latency:percentile(99) / 1000,
    summary.errors.status, summary.errors.connect + summary.errors.read +
    summary.errors.write + summary.errors.timeout))
end
"""


@dataclass(frozen=True)
class Load:
    """What one wrk run measured."""

    label: str
    requests_per_s: float
    p50_ms: float
    p99_ms: float
    errors: int


@dataclass(frozen=True)
class Target:
    """A path and, for a POST, the body split around its final-drive ratio."""

    path: str
    head: str = ""
    tail: str = ""


def _target(path: str, demo: str) -> Target:
    body = json.loads((DATA / f"{demo}.json").read_text())
    body["drivetrain"]["final_drive_ratio"] = SENTINEL
    head, tail = json.dumps(body, separators=(",", ":")).split(str(SENTINEL))
    return Target(path, head, tail)


def _lua_string(text: str) -> str:
    return json.dumps(text)  # a JSON string literal is a valid Lua string literal here


def _script(targets: list[Target], variants: int) -> str:
    return _LUA % {
        "paths": ", ".join(_lua_string(t.path) for t in targets),
        "heads": ", ".join(_lua_string(t.head) for t in targets),
        "tails": ", ".join(_lua_string(t.tail) for t in targets),
        "variants": variants,
        "first_ratio": 2.0,
        "ratio_step": 4.0 / max(variants, 1),
    }


def run_wrk(
    base: str,
    label: str,
    targets: list[Target],
    *,
    variants: int,
    seconds: int,
    connections: int,
    threads: int,
) -> Load:
    """Load ``targets`` in turn with wrk; ``variants`` > 1 rotates the final-drive ratio."""
    exe = shutil.which("wrk")
    if exe is None:
        raise SystemExit("wrk not found: install the Debian package (apt-get install wrk)")
    with tempfile.TemporaryDirectory() as tmp:
        script = Path(tmp) / "load.lua"
        script.write_text(_script(targets, variants))
        out = subprocess.run(
            [
                exe,
                f"-t{threads}",
                f"-c{connections}",
                f"-d{seconds}s",
                "--timeout",
                "10s",
                "-s",
                str(script),
                base + targets[0].path,
            ],
            capture_output=True,
            text=True,
            check=True,
        ).stdout
    found = re.search(r"Requests/sec:\s+([\d.]+)", out)
    if found is None:
        raise SystemExit(f"unexpected wrk output:\n{out}")
    stats = json.loads(out[out.index("JSON ") + 5 :].splitlines()[0])
    errors = int(stats["non2xx"]) + int(stats["errors"])
    return Load(label, float(found.group(1)), stats["p50"], stats["p99"], errors)


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@contextmanager
def serve(workers: int, request_log: bool, metrics_dir: str) -> Iterator[tuple[str, int]]:
    """Run ``python -m service`` on a free loopback port; yield (base URL, master pid)."""
    port = _free_port()
    env = {
        **os.environ,
        "GEARWORK_WORKERS": str(workers),
        "GEARWORK_LOG_LEVEL": "warning",
        "GEARWORK_REQUEST_LOG": "true" if request_log else "false",
        "PROMETHEUS_MULTIPROC_DIR": metrics_dir,
    }
    proc = subprocess.Popen(
        [sys.executable, "-m", "service", "--host", "127.0.0.1", "--port", str(port)],
        cwd=ROOT,
        env=env,
        stdout=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    try:
        for _ in range(400):
            try:
                with urllib.request.urlopen(base + "/readyz", timeout=1):
                    break
            except OSError:
                time.sleep(0.05)
        else:
            raise SystemExit("the server did not become ready")
        yield base, proc.pid
    finally:
        proc.terminate()
        proc.wait(timeout=15)


def _children(pid: int) -> list[int]:
    out = []
    for entry in Path("/proc").iterdir():
        if entry.name.isdigit():
            try:
                stat = (entry / "stat").read_text()
            except OSError:
                continue
            # the parent pid is the second field after the parenthesised command name
            if int(stat.rsplit(")", 1)[1].split()[1]) == pid:
                out.append(int(entry.name))
    return sorted(out)


def rss_kib(pid: int) -> int:
    """Resident memory of a process [KiB], VmRSS from /proc/<pid>/status."""
    for line in Path(f"/proc/{pid}/status").read_text().splitlines():
        if line.startswith("VmRSS:"):
            return int(line.split()[1])
    return 0


def _cmdline(pid: int) -> str:
    raw = Path(f"/proc/{pid}/cmdline").read_bytes().replace(b"\0", b" ").decode()
    return raw.strip()[:60]


def _metric_totals(base: str) -> dict[str, float]:
    with urllib.request.urlopen(base + "/metrics", timeout=5) as r:
        text = r.read().decode()
    totals: dict[str, float] = {}
    for line in text.splitlines():
        m = re.match(r'gearwork_result_cache_total\{outcome="(\w+)"\} ([\d.e+]+)', line)
        if m:
            totals[f"cache {m.group(1)}"] = float(m.group(2))
        m = re.match(r'gearwork_http_errors_total\{.*status="(\d+)"\} ([\d.e+]+)', line)
        if m:
            key = f"errors {m.group(1)}"
            totals[key] = totals.get(key, 0.0) + float(m.group(2))
    return totals


def _check_event_loop() -> str:
    found = []
    for name in ("uvloop", "httptools"):
        try:
            __import__(name)
            found.append(name)
        except ImportError:
            found.append(f"no {name}")
    return "/".join(found)


def main(argv: list[str] | None = None) -> None:
    """Parse flags, serve, load, print."""
    parser = argparse.ArgumentParser(prog="python -m bench.load", description=__doc__)
    parser.add_argument("--seconds", type=int, default=10, help="per endpoint [s]")
    parser.add_argument("--duration", type=int, default=60, help="memory soak [s]")
    parser.add_argument(
        "--workers",
        type=int,
        default=int(os.environ.get("GEARWORK_WORKERS", "2")),
        help="uvicorn workers (default GEARWORK_WORKERS, else 2 as in the container)",
    )
    parser.add_argument("--connections", type=int, default=16)
    parser.add_argument("--threads", type=int, default=1, help="wrk threads")
    parser.add_argument("--variants", type=int, default=4000, help="final-drive ratios")
    parser.add_argument("--no-request-log", action="store_true", help="JSON request logs off")
    parser.add_argument(
        "--overload",
        type=int,
        default=256,
        help="connections for an overload line (503s expected past GEARWORK_MAX_IN_FLIGHT "
        "per worker); 0 skips it",
    )
    args = parser.parse_args(argv)

    health = Target("/healthz")
    plan = _target("/v1/shift-plan", "demo_coupe_us")
    run = _target("/v1/acceleration-run", "demo_sedan_run_metric")
    common = {"connections": args.connections, "threads": args.threads}
    print(
        f"gearwork load: {args.workers} workers ({_check_event_loop()}, uvicorn access log "
        f"off, request log {'off' if args.no_request_log else 'on'}), wrk {args.threads} "
        f"thread x {args.connections} connections, {args.seconds} s per line, "
        f"{args.variants} body variants"
    )
    with (
        tempfile.TemporaryDirectory() as metrics_dir,
        serve(args.workers, not args.no_request_log, metrics_dir) as (base, master),
    ):
        pids = [master, *_children(master)]
        rss = {"start": {p: rss_kib(p) for p in pids}}
        for t in (health, plan, run):  # warm-up: imports, caches full, allocator settled
            run_wrk(base, "warm-up", [t], variants=args.variants, seconds=5, **common)
            run_wrk(base, "warm-up", [t], variants=1, seconds=2, **common)
        rss["after warm-up"] = {p: rss_kib(p) for p in pids}
        loads = [
            run_wrk(base, "GET  /healthz", [health], variants=1, seconds=args.seconds, **common),
            run_wrk(
                base,
                "POST /v1/shift-plan, varied",
                [plan],
                variants=args.variants,
                seconds=args.seconds,
                **common,
            ),
            run_wrk(
                base,
                "POST /v1/shift-plan, cached",
                [plan],
                variants=1,
                seconds=args.seconds,
                **common,
            ),
            run_wrk(
                base,
                "POST /v1/acceleration-run, varied",
                [run],
                variants=args.variants,
                seconds=args.seconds,
                **common,
            ),
            run_wrk(
                base,
                "POST /v1/acceleration-run, cached",
                [run],
                variants=1,
                seconds=args.seconds,
                **common,
            ),
        ]
        if args.overload > 0:
            loads.append(
                run_wrk(
                    base,
                    f"overload {args.overload} conn., run varied",
                    [run],
                    variants=args.variants,
                    seconds=args.seconds,
                    connections=args.overload,
                    threads=args.threads,
                )
            )
        half = max(args.duration // 2, 1)
        soaks = []
        for n in (1, 2):  # two halves: growth in the second would be a leak, not a fill
            soaks.append(
                run_wrk(
                    base,
                    f"soak {n}/2 ({half} s), both, varied",
                    [plan, run],
                    variants=args.variants,
                    seconds=half,
                    **common,
                )
            )
            rss[f"after soak {n}/2"] = {p: rss_kib(p) for p in pids}
        totals = _metric_totals(base)
        processes = "; ".join(f"{p} {_cmdline(p)}" for p in pids)

    reference = loads[0].requests_per_s
    print(
        f"\n{'endpoint':36s} {'req/s':>8s} {'of /healthz':>12s} {'p50 ms':>8s} "
        f"{'p99 ms':>8s} {'errors':>7s}"
    )
    for load in [*loads, *soaks]:
        share = load.requests_per_s / reference if reference else float("nan")
        print(
            f"{load.label:36s} {load.requests_per_s:8.0f} {share:11.1%} {load.p50_ms:8.2f} "
            f"{load.p99_ms:8.2f} {load.errors:7d}"
        )
    stages = list(rss)
    print(f"\n{'resident memory [MiB]':36s} " + " ".join(f"{s:>18s}" for s in stages))
    for pid in pids:
        role = "master" if pid == master else "worker"
        row = " ".join(f"{rss[s].get(pid, 0) / 1024:18.1f}" for s in stages)
        print(f"{role + ' ' + str(pid):36s} {row}")
    total = " ".join(f"{sum(rss[s].values()) / 1024:18.1f}" for s in stages)
    print(f"{'all':36s} {total}")
    print("\nfrom /metrics (all workers): " + ", ".join(f"{k} {v:.0f}" for k, v in totals.items()))
    print(f"processes: {processes}")


if __name__ == "__main__":
    main()
