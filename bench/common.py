"""Benchmark helpers: repeated timing with median/p99, a uvicorn server, wrk runs."""

from __future__ import annotations

import json
import math
import os
import re
import shutil
import socket
import subprocess
import sys
import tempfile
import time
import urllib.request
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import numpy as np

__all__ = [
    "VARY",
    "Timing",
    "WrkResult",
    "app_cpu_per_request",
    "median_wrk",
    "ratio_line",
    "serve",
    "server_cpu",
    "side_by_side",
    "time_call",
    "wrk",
]

VARY = "__N__"  # in a wrk body: replaced by a request counter, so no two bodies are alike


@dataclass(frozen=True)
class Timing:
    """Wall-clock statistics of repeated calls [s]."""

    median: float
    p99: float
    runs: int

    def __str__(self) -> str:
        return (
            f"median {self.median * 1e3:8.3f} ms   p99 {self.p99 * 1e3:8.3f} ms"
            f"   ({self.runs} runs)"
        )


def time_call(fn: Callable[[], object], *, runs: int = 300, warmup: int = 20) -> Timing:
    """Call ``fn`` repeatedly and report the median and 99th percentile."""
    for _ in range(warmup):
        fn()
    samples = np.empty(runs)
    for i in range(runs):
        t0 = time.perf_counter()
        fn()
        samples[i] = time.perf_counter() - t0
    return Timing(float(np.median(samples)), float(np.percentile(samples, 99)), runs)


def side_by_side(
    fns: dict[str, Callable[[], object]], *, rounds: int = 9, calls: int = 20, warmup: int = 3
) -> dict[str, Timing]:
    """CPU time of several calls, interleaved round by round; each figure is the median
    over ``rounds * calls`` calls, p99 too.

    CPU time of this process, not wall time: on a shared machine a call that outlasts its
    time slice waits for the others' work, which would make longer calls look superlinearly
    dearer than short ones and spoil the ratios."""
    for fn in fns.values():
        for _ in range(warmup):
            fn()
    samples: dict[str, list[float]] = {k: [] for k in fns}
    for _ in range(rounds):
        for name, fn in fns.items():
            for _ in range(calls):
                t0 = time.process_time()
                fn()
                samples[name].append(time.process_time() - t0)
    return {
        k: Timing(float(np.median(v)), float(np.percentile(v, 99)), len(v))
        for k, v in samples.items()
    }


def app_cpu_per_request(
    app: Any,
    requests: dict[str, tuple[str, list[bytes] | None]],
    *,
    rounds: int = 7,
    calls: int = 40,
) -> dict[str, float]:
    """CPU seconds per request through the whole ASGI app (every middleware, no socket),
    per target, interleaved round by round; the median of the rounds. CPU time of this
    process, so other work on a shared machine does not count. A target is a path and
    either None (GET) or bodies to POST in turn, each one different."""
    import asyncio

    def scope(path: str, body: bytes | None) -> dict[str, Any]:
        headers = [(b"host", b"127.0.0.1"), (b"content-type", b"application/json")]
        if body is not None:
            headers.append((b"content-length", str(len(body)).encode()))
        return {
            "type": "http",
            "asgi": {"version": "3.0"},
            "http_version": "1.1",
            "method": "GET" if body is None else "POST",
            "scheme": "http",
            "path": path,
            "raw_path": path.encode(),
            "query_string": b"",
            "root_path": "",
            "headers": headers,
            "client": ("127.0.0.1", 1),
            "server": ("127.0.0.1", 80),
        }

    async def one(path: str, body: bytes | None) -> None:
        sent = False

        async def receive() -> dict[str, Any]:
            nonlocal sent
            if sent:
                await asyncio.sleep(3600)
            sent = True
            return {"type": "http.request", "body": body or b"", "more_body": False}

        async def send(message: dict[str, Any]) -> None:
            if message["type"] == "http.response.start" and message["status"] != 200:
                raise SystemExit(f"{path} answered {message['status']}")

        await app(scope(path, body), receive, send)

    async def run() -> dict[str, float]:
        per: dict[str, list[float]] = {k: [] for k in requests}
        counters = dict.fromkeys(requests, 0)
        for warm in (True, False):
            for _ in range(1 if warm else rounds):
                for name, (path, bodies) in requests.items():
                    t0 = time.process_time()
                    for _ in range(calls):
                        body = None
                        if bodies is not None:
                            body = bodies[counters[name] % len(bodies)]
                            counters[name] += 1
                        await one(path, body)
                    if not warm:
                        per[name].append((time.process_time() - t0) / calls)
        return {k: float(np.median(v)) for k, v in per.items()}

    return asyncio.run(run())


def ratio_line(label: str, value: float, target: str) -> str:
    """One ratio with its target, for the benchmark's closing lines."""
    return f"   RATIO {label:<48} {value:8.2f}x   (target {target})"


def _free_port() -> int:
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@contextmanager
def serve(workers: int = 1, env: dict[str, str] | None = None) -> Iterator[str]:
    """Run ``python -m service`` on a free loopback port; yield its base URL."""
    port = _free_port()
    env = {**os.environ, "GEARWORK_LOG_LEVEL": "warning", **(env or {})}
    proc = subprocess.Popen(
        [sys.executable, "-m", "service", "--port", str(port), "--workers", str(workers)],
        env=env,
    )
    base = f"http://127.0.0.1:{port}"
    _SERVERS[base] = proc.pid
    try:
        deadline = time.monotonic() + 60.0  # a loaded machine can take a while to import
        while True:
            try:
                with urllib.request.urlopen(base + "/healthz", timeout=1):
                    break
            except OSError:
                if time.monotonic() > deadline or proc.poll() is not None:
                    raise SystemExit(f"the service did not come up on {base}") from None
                time.sleep(0.05)
        yield base
    finally:
        proc.terminate()
        proc.wait(timeout=10)
        _SERVERS.pop(base, None)


_SERVERS: dict[str, int] = {}  # base URL -> pid of the server started by serve()


def _cpu_ticks(pid: int) -> tuple[int, int]:
    """(parent pid, user + system clock ticks) of a live process, from /proc."""
    with open(f"/proc/{pid}/stat") as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return int(fields[1]), int(fields[11]) + int(fields[12])


def server_cpu(base: str) -> Callable[[], float]:
    """A clock of the CPU seconds used so far by the server at ``base`` (started by
    :func:`serve`) and its worker processes, read from /proc (Linux). CPU time of the
    server alone: the load generator and other work on a shared machine do not count."""
    root = _SERVERS[base]
    tick = os.sysconf("SC_CLK_TCK")

    def clock() -> float:
        family, found = {root}, True
        stats = {}
        for entry in os.listdir("/proc"):
            if entry.isdigit():
                try:
                    stats[int(entry)] = _cpu_ticks(int(entry))
                except OSError:  # the process ended meanwhile
                    continue
        while found:
            found = False
            for pid, (parent, _) in stats.items():
                if parent in family and pid not in family:
                    family.add(pid)
                    found = True
        total = sum(stats[pid][1] for pid in family if pid in stats)
        return total / tick

    return clock


@dataclass(frozen=True)
class WrkResult:
    """What wrk reported."""

    requests_per_s: float
    p50_ms: float
    p99_ms: float
    errors: int
    server_cpu_ms: float = math.nan  # server CPU per request, when measured [ms]

    def __str__(self) -> str:
        cpu = "" if math.isnan(self.server_cpu_ms) else f"   CPU {self.server_cpu_ms:6.3f} ms/req"
        return (
            f"{self.requests_per_s:9.0f} req/s   p50 {self.p50_ms:7.2f} ms   "
            f"p99 {self.p99_ms:7.2f} ms   errors {self.errors}{cpu}"
        )


_LUA = """
wrk.method = "{method}"
wrk.body = {body}
wrk.headers["Content-Type"] = "application/json"
local counter = 0
if wrk.body ~= nil and string.find(wrk.body, "{vary}", 1, true) then
  request = function()
    counter = counter + 1
    local body = string.gsub(wrk.body, "{vary}", tostring(counter))
    return wrk.format(nil, nil, nil, body)
  end
end
done = function(summary, latency, requests)
  io.write(string.format(
    "JSON {{\\"p50\\": %f, \\"p99\\": %f, \\"non2xx\\": %d, \\"errors\\": %d}}\\n",
    latency:percentile(50) / 1000, latency:percentile(99) / 1000,
    summary.errors.status, summary.errors.connect + summary.errors.read +
    summary.errors.write + summary.errors.timeout))
end
"""


def wrk(
    url: str,
    *,
    body: bytes | None = None,
    seconds: int = 8,
    connections: int = 16,
    cpu: Callable[[], float] | None = None,
) -> WrkResult:
    """Load ``url`` with wrk (one thread, keep-alive) and parse its figures.

    Where the body holds ``VARY`` each request replaces it with its own number, so every
    body differs and a result cache never answers. With ``cpu`` (a clock of the server's
    CPU seconds, :func:`server_cpu`) the server's CPU time per answered request is
    reported too; the server is first left to finish what an earlier run left in flight."""
    exe = shutil.which("wrk")
    if exe is None:
        raise SystemExit("wrk not found: apt-get install wrk")
    lua = _LUA.format(
        method="POST" if body is not None else "GET",
        body=json.dumps(body.decode()) if body is not None else "nil",
        vary=VARY,
    )
    with tempfile.TemporaryDirectory() as tmp:
        script = Path(tmp) / "req.lua"
        script.write_text(lua)
        if cpu is not None:
            time.sleep(0.5)  # requests a previous run left in flight are answered by now
            cpu0 = cpu()
        done = subprocess.run(
            [exe, "-t1", f"-c{connections}", f"-d{seconds}s", "-s", str(script), url],
            capture_output=True,
            text=True,
            check=False,
        )
        cpu_s = cpu() - cpu0 if cpu is not None else math.nan
    if done.returncode != 0:
        raise SystemExit(f"wrk failed on {url}: {done.stdout[-300:]} {done.stderr[-300:]}")
    out = done.stdout
    rps = float(re.search(r"Requests/sec:\s+([\d.]+)", out).group(1))  # type: ignore[union-attr]
    stats = json.loads(out[out.index("JSON ") + 5 :].splitlines()[0])
    answered = int(re.search(r"(\d+) requests in", out).group(1))  # type: ignore[union-attr]
    return WrkResult(
        rps,
        stats["p50"],
        stats["p99"],
        int(stats["non2xx"]) + int(stats["errors"]),
        cpu_s * 1e3 / max(answered, 1),
    )


def median_wrk(
    runs: dict[str, tuple[str, bytes | None]],
    *,
    repeats: int = 3,
    seconds: int = 3,
    cpu: Callable[[], float] | None = None,
) -> dict[str, WrkResult]:
    """wrk runs of several targets, interleaved ``repeats`` times; per target the median
    throughput, p50, p99 and (with ``cpu``) server CPU per request over the repeats
    (errors summed)."""
    got: dict[str, list[WrkResult]] = {k: [] for k in runs}
    for _ in range(repeats):
        for name, (url, body) in runs.items():
            got[name].append(wrk(url, body=body, seconds=seconds, cpu=cpu))
    return {
        k: WrkResult(
            float(np.median([r.requests_per_s for r in v])),
            float(np.median([r.p50_ms for r in v])),
            float(np.median([r.p99_ms for r in v])),
            sum(r.errors for r in v),
            float(np.median([r.server_cpu_ms for r in v])),
        )
        for k, v in got.items()
    }
