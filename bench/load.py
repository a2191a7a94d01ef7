"""Served load on a mix of every endpoint: errors, statuses, latency, queue waits, memory.

    python -m bench.load [--seconds 60] [--connections 64] [--workers 1,2]
    python -m bench.load --soak 100000 [--workers 1]

Needs ``wrk`` (Debian package ``wrk``; ``make load`` installs it). The server is
``python -m service``, the container's command, with request logs on (to /dev/null) and
metrics summed over the workers through PROMETHEUS_MULTIPROC_DIR.

Load (``make load``): for each worker count, ``--connections`` keep-alive connections
for ``--seconds`` on a rotation through every endpoint (each POST under /v1/, the probes
and /metrics; every body carries a new reference, so the result cache never answers and
every calculation is computed). It prints requests per second, socket errors, answers by
status, p50/p99/max latency, the queue waits the server recorded
(``gearwork_calculation_wait_seconds`` by outcome, with its p50/p99 read off the
histogram) and the resident memory of every process before and after.

Soak (``make soak``): the same rotation until ``--soak`` requests have been answered, in
ten rounds; the memory after the first round (warm: imports done, caches full) is the
base, and the growth of the last round over it is printed with the 5 % target.

Figures are printed, never asserted: the machine is shared and wrk runs on the same
cores as the server.
"""

from __future__ import annotations

import argparse
import json
import shutil
import subprocess
import tempfile
import urllib.request
from dataclasses import dataclass
from pathlib import Path

from prometheus_client.parser import text_string_to_metric_families

from bench.server import ROOT, serve

DATA = ROOT / "tests" / "data"
MARK = "REF-0000000000"  # stands for the varying reference in a body template

_LUA = """
local reqs = {%(reqs)s}
local variants = %(variants)d
local counter = 0
statuses = {}  -- global: done() reads each thread's copy
local threads = {}
id = 0

function setup(thread)
  thread:set("id", #threads)
  table.insert(threads, thread)
end

function init(args)
  math.randomseed(1000 + id)
end

request = function()
  counter = counter + 1
  local r = reqs[(counter %% #reqs) + 1]
  local v = string.format("%%d-%%d", id, counter)
  if variants > 0 then v = tostring(math.random(variants)) end
  local body = nil
  local path = r[2]
  if r[6] then
    path = path .. v
    body = r[4]
  elseif r[4] ~= "" then
    body = r[4] .. v .. r[5]
  end
  return wrk.format(r[1], path, r[3], body)
end

response = function(status, headers, body)
  statuses[status] = (statuses[status] or 0) + 1
end

done = function(summary, latency, requests)
  local parts = {}
  for _, t in ipairs(threads) do
    for k, n in pairs(t:get("statuses")) do
      parts[#parts + 1] = string.format("\\"%%d\\": %%d", k, n)
    end
  end
  io.write(string.format(
    "JSON {\\"p50\\": %%f, \\"p99\\": %%f, \\"max\\": %%f, \\"requests\\": %%d, " ..
    "\\"socket_errors\\": %%d, \\"statuses\\": [{%%s}]}\\n",
    latency:percentile(50) / 1000, latency:percentile(99) / 1000, latency.max / 1000,
    summary.requests, summary.errors.connect + summary.errors.read +
    summary.errors.write + summary.errors.timeout, table.concat(parts, "}, {")))
end
"""


@dataclass(frozen=True)
class Target:
    """One request of the rotation: the body (or path) is split around the varying part."""

    method: str
    path: str
    headers: dict[str, str]
    head: str = ""
    tail: str = ""
    vary_path: bool = False


def _json_target(path: str, body: dict[str, object], accept: str | None = None) -> Target:
    head, tail = json.dumps({**body, "reference": MARK}, separators=(",", ":")).split(MARK)
    headers = {"Content-Type": "application/json"}
    if accept:
        headers["Accept"] = accept
    return Target("POST", path, headers, head, tail)


def _demo(name: str) -> dict[str, object]:
    data: dict[str, object] = json.loads((DATA / f"{name}.json").read_text())
    return data


def targets() -> list[Target]:
    """The rotation: every endpoint once, the probes and a scrape."""
    coupe, sedan = _demo("demo_coupe_us"), _demo("demo_sedan_run_metric")
    csv = "Engine Speed (rpm),Torque [N*m]\n2000,200\n3000,240\n4000,250\n5000,230\n"
    ambient = {"temperature": 30, "relative_humidity": 50, "station_pressure": 95.0}
    return [
        _json_target("/v1/shift-plan", coupe),
        _json_target("/v1/acceleration-run", sedan),
        _json_target("/v1/comparison", _demo("demo_comparison_us")),
        _json_target("/v1/final-drive-sweep", _demo("demo_sweep_us")),
        _json_target("/v1/gear-spacing", _demo("demo_gear_spacing_us")),
        _json_target("/v1/speedometer-correction", _demo("demo_speedometer_us")),
        _json_target("/v1/chassis-dyno/convert", _demo("demo_chassis_metric")),
        _json_target("/v1/log-analysis", _demo("demo_log_text_request_metric")),
        _json_target("/v1/dyno-correction", {"ambient": ambient}),
        _json_target("/v1/reports/shift-plan", coupe, "text/html"),
        _json_target("/v1/reports/acceleration-run", sedan, "application/pdf"),
        _json_target("/v1/charts/tractive-force", coupe, "image/svg+xml"),
        Target(
            "POST",
            "/v1/torque-curves/import?units=us&ref=",
            {"Content-Type": "text/csv"},
            csv,
            "",
            vary_path=True,
        ),
        Target("GET", "/healthz", {}),
        Target("GET", "/readyz", {}),
        Target("GET", "/metrics", {}),
    ]


def _lua(items: list[Target], variants: int = 0) -> str:
    def q(text: str) -> str:
        return json.dumps(text)  # a JSON string literal is a valid Lua string literal here

    rows = []
    for t in items:
        headers = "{" + ", ".join(f"[{q(k)}] = {q(v)}" for k, v in t.headers.items()) + "}"
        rows.append(
            f"{{{q(t.method)}, {q(t.path)}, {headers}, {q(t.head)}, {q(t.tail)}, "
            f"{'true' if t.vary_path else 'false'}}}"
        )
    return _LUA % {"reqs": ",\n  ".join(rows), "variants": variants}


@dataclass(frozen=True)
class Load:
    """What one wrk run measured."""

    seconds: float
    requests: int
    socket_errors: int
    statuses: dict[int, int]
    p50_ms: float
    p99_ms: float
    max_ms: float


def run_wrk(
    base: str, seconds: int, connections: int, threads: int = 2, variants: int = 0
) -> Load:
    """Load the rotation with wrk for ``seconds``; ``variants`` > 0 draws each reference
    from that many (some answers then come from the result cache), else every one is new."""
    exe = shutil.which("wrk")
    if exe is None:
        raise SystemExit("wrk not found: install the Debian package (apt-get install wrk)")
    with tempfile.TemporaryDirectory() as tmp:
        script = Path(tmp) / "mix.lua"
        script.write_text(_lua(targets(), variants))
        out = subprocess.run(
            [
                exe,
                f"-t{threads}",
                f"-c{connections}",
                f"-d{seconds}s",
                "--timeout",
                "30s",
                "-s",
                str(script),
                base + "/healthz",
            ],
            capture_output=True,
            text=True,
            check=True,
        ).stdout
    stats = json.loads(out[out.index("JSON ") + 5 :].splitlines()[0])
    statuses: dict[int, int] = {}
    for item in stats["statuses"]:
        for k, n in item.items():
            statuses[int(k)] = statuses.get(int(k), 0) + int(n)
    return Load(
        seconds,
        int(stats["requests"]),
        int(stats["socket_errors"]),
        statuses,
        stats["p50"],
        stats["p99"],
        stats["max"],
    )


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


def rss_mib(pids: list[int]) -> float:
    """Summed resident memory of ``pids`` [MiB], VmRSS from /proc/<pid>/status."""
    total = 0
    for pid in pids:
        try:
            for line in Path(f"/proc/{pid}/status").read_text().splitlines():
                if line.startswith("VmRSS:"):
                    total += int(line.split()[1])
        except OSError:
            continue
    return total / 1024


def check_rotation(base: str) -> None:
    """Every request of the rotation answers 2xx once, or the benchmark stops."""
    for t in targets():
        path = t.path + ("check" if t.vary_path else "")
        data = (t.head + ("" if t.vary_path else "check") + t.tail).encode() if t.head else None
        request = urllib.request.Request(base + path, data=data, headers=t.headers)
        request.method = t.method
        try:
            with urllib.request.urlopen(request, timeout=60) as r:
                r.read()
        except urllib.error.HTTPError as e:
            raise SystemExit(f"{t.method} {t.path}: {e.code} {e.read()[:300]!r}") from e


def queue_waits(base: str) -> dict[str, tuple[int, float, float]]:
    """Outcome -> (count, p50 [ms], p99 [ms]) of gearwork_calculation_wait_seconds."""
    with urllib.request.urlopen(base + "/metrics", timeout=30) as r:
        text = r.read().decode()
    buckets: dict[str, list[tuple[float, float]]] = {}
    for family in text_string_to_metric_families(text):
        for s in family.samples:
            if s.name == "gearwork_calculation_wait_seconds_bucket":
                le = float(s.labels["le"])
                buckets.setdefault(s.labels["outcome"], []).append((le, s.value))
    out = {}
    for outcome, rows in buckets.items():
        rows.sort()
        total = rows[-1][1]

        def quantile(
            q: float, rows: list[tuple[float, float]] = rows, total: float = total
        ) -> float:
            return next((le for le, n in rows if n >= q * total), float("inf")) * 1e3

        out[outcome] = (int(total), quantile(0.5), quantile(0.99))
    return out


def _print_load(
    label: str, load: Load, before: float, after: float, waits: dict[str, tuple[int, float, float]]
) -> None:
    answered = sum(load.statuses.values())
    non2xx = {k: v for k, v in sorted(load.statuses.items()) if not 200 <= k < 300}
    print(
        f"{label}: {answered / load.seconds:.1f} req/s, {answered} answered, socket errors "
        f"{load.socket_errors}, non-2xx {non2xx or 'none'}; latency p50 {load.p50_ms:.1f} "
        f"ms, p99 {load.p99_ms:.1f} ms, max {load.max_ms:.1f} ms; RSS {before:.0f} -> "
        f"{after:.0f} MiB"
    )
    for outcome, (n, p50, p99) in sorted(waits.items()):
        print(
            f"    queue wait {outcome:12s} {n:7d} requests, p50 <= {p50:.0f} ms, "
            f"p99 <= {p99:.0f} ms"
        )


def main(argv: list[str] | None = None) -> None:
    """Parse flags, serve, load or soak, print."""
    parser = argparse.ArgumentParser(prog="python -m bench.load", description=__doc__)
    parser.add_argument("--seconds", type=int, default=60, help="load duration [s]")
    parser.add_argument("--connections", type=int, default=64)
    parser.add_argument("--workers", default="1,2", help="comma-separated worker counts")
    parser.add_argument("--soak", type=int, default=0, help="requests for a memory soak")
    parser.add_argument(
        "--variants",
        type=int,
        default=48,
        help="soak: references drawn from this many (16 x 48 requests against a cache of "
        "512: about two in three answered from it, the rest computed)",
    )
    args = parser.parse_args(argv)
    for workers in [int(w) for w in args.workers.split(",")]:
        with (
            tempfile.TemporaryDirectory() as metrics_dir,
            serve(workers, {"PROMETHEUS_MULTIPROC_DIR": metrics_dir}) as server,
        ):
            base = server.base
            pids = [server.pid, *_children(server.pid)]
            check_rotation(base)
            if args.soak:
                soak(base, pids, args.soak, args.connections, workers, args.variants)
                continue
            before = rss_mib(pids)
            load = run_wrk(base, args.seconds, args.connections)
            after = rss_mib(pids)
            _print_load(
                f"{workers} worker(s), {args.connections} connections, {args.seconds} s, "
                f"{len(targets())}-request rotation",
                load,
                before,
                after,
                queue_waits(base),
            )


def soak(
    base: str, pids: list[int], total: int, connections: int, workers: int, variants: int
) -> None:
    """Load in ten rounds until ``total`` requests are answered; print memory per round."""
    rate = run_wrk(base, 30, connections, variants=variants)  # also the warm-up round
    per_s = max(sum(rate.statuses.values()) / rate.seconds, 1.0)
    warm = rss_mib(pids)
    done = sum(rate.statuses.values())
    print(
        f"soak, {workers} worker(s): warm after {done} requests, RSS {warm:.1f} MiB; "
        f"{per_s:.0f} req/s"
    )
    rounds = 10
    per_round = max(int((total - done) / rounds / per_s), 1)
    for n in range(rounds):
        load = run_wrk(base, per_round, connections, variants=variants)
        done += sum(load.statuses.values())
        non2xx = {k: v for k, v in sorted(load.statuses.items()) if not 200 <= k < 300}
        print(
            f"  round {n + 1:2d}: {done:7d} requests, RSS {rss_mib(pids):7.1f} MiB, "
            f"p99 {load.p99_ms:.0f} ms, non-2xx {non2xx or 'none'}, socket errors "
            f"{load.socket_errors}"
        )
    end = rss_mib(pids)
    growth = (end - warm) / warm
    print(f"RSS growth once warm: {growth:+.1%} over {done} requests (target under 5 %)")


if __name__ == "__main__":
    main()
