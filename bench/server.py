"""A served gearwork for the load benchmarks: ``python -m service`` on a loopback port,
ready when ``/readyz`` answers, and wrk runs against it."""

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

import numpy as np

__all__ = [
    "ROOT",
    "VARY",
    "Server",
    "WrkResult",
    "free_port",
    "median_wrk",
    "serve",
    "server_cpu",
    "wrk",
]

ROOT = Path(__file__).resolve().parent.parent
VARY = "__N__"  # in a wrk body: replaced by a request counter, so no two bodies are alike


def free_port() -> int:
    """A free port on the loopback interface."""
    with socket.socket() as s:
        s.bind(("127.0.0.1", 0))
        return int(s.getsockname()[1])


@dataclass(frozen=True)
class Server:
    """A running service: its base URL, port and master process id."""

    base: str
    port: int
    pid: int


def _wait_ready(base: str, proc: subprocess.Popen[bytes], seconds: float) -> None:
    deadline = time.monotonic() + seconds  # a loaded machine can take a while to import
    while True:
        try:
            with urllib.request.urlopen(base + "/readyz", timeout=2):
                return
        except OSError:
            if time.monotonic() > deadline or proc.poll() is not None:
                raise SystemExit(f"the service did not become ready on {base}") from None
            time.sleep(0.1)


@contextmanager
def serve(
    workers: int = 1,
    env: dict[str, str] | None = None,
    *,
    ready_s: float = 120.0,
    module: str = "service",
) -> Iterator[Server]:
    """Run ``python -m service`` (or another ``module`` taking its flags) with ``workers``
    on a free loopback port until it is ready (``/readyz`` answers 200); yield it, and stop
    it after."""
    port = free_port()
    proc = subprocess.Popen(
        [
            sys.executable,
            "-m",
            module,
            "--host",
            "127.0.0.1",
            "--port",
            str(port),
            "--workers",
            str(workers),
        ],
        cwd=ROOT,
        env={**os.environ, "GEARWORK_LOG_LEVEL": "warning", **(env or {})},
        stdout=subprocess.DEVNULL,
    )
    base = f"http://127.0.0.1:{port}"
    try:
        _wait_ready(base, proc, ready_s)
        yield Server(base, port, proc.pid)
    finally:
        proc.terminate()
        proc.wait(timeout=60)


def _cpu_ticks(pid: int) -> tuple[int, int]:
    """(parent pid, user + system clock ticks) of a live process, from /proc."""
    with open(f"/proc/{pid}/stat") as f:
        fields = f.read().rsplit(")", 1)[1].split()
    return int(fields[1]), int(fields[11]) + int(fields[12])


def server_cpu(server: Server) -> Callable[[], float]:
    """A clock of the CPU seconds used so far by ``server`` (started by :func:`serve`) and
    its worker processes, read from /proc (Linux). CPU time of the server alone: the load
    generator and other work on a shared machine do not count."""
    root = server.pid
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
    cpu: Callable[[], float] | dict[str, Callable[[], float]] | None = None,
) -> dict[str, WrkResult]:
    """wrk runs of several targets, interleaved ``repeats`` times; per target the median
    throughput, p50, p99 and (with ``cpu``, one clock or a clock per target) server CPU per
    request over the repeats (errors summed)."""
    got: dict[str, list[WrkResult]] = {k: [] for k in runs}
    clocks = cpu if isinstance(cpu, dict) else dict.fromkeys(runs, cpu)
    for _ in range(repeats):
        for name, (url, body) in runs.items():
            got[name].append(wrk(url, body=body, seconds=seconds, cpu=clocks.get(name)))
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
