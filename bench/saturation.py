"""Probes while the worker is saturated: /healthz latency with every calculation slot busy.

    python -m bench.saturation [--seconds 20] [--clients 12] [--slots 0,1,2,4] [--pin true]

For each slot count (``GEARWORK_CALC_SLOTS``; 0 computes on the event loop, as before the
slots existed) it serves ``python -m service`` with one worker, keeps ``--clients``
connections posting the heaviest admissible requests (the PDF and HTML reports of the
largest optimised acceleration run, and the largest optimised run itself; the reference
varies so the cache never answers), and meanwhile opens a new connection to GET /healthz
every 50 ms, as a kubelet probe does (``--pin true,false`` adds rows with the worker left
unpinned, ``GEARWORK_PIN_CPU``). It prints the probe's p50, p99 and max latency, the
calculations answered per second and their statuses. The target (issue 11): /healthz p99
under 100 ms and max under 500 ms. Figures are printed, never asserted: the machine is
shared, and the load generator runs on the same cores as the server.
"""

from __future__ import annotations

import argparse
import http.client
import json
import threading
import time
from collections import Counter

import numpy as np

from bench.server import serve
from bench.worst_case import cases


def request(
    port: int,
    method: str,
    path: str,
    body: bytes | None = None,
    headers: dict[str, str] | None = None,
    timeout: float = 30,
) -> tuple[int, bytes]:
    """One request on a new connection: (status, body)."""
    conn = http.client.HTTPConnection("127.0.0.1", port, timeout=timeout)
    try:
        conn.request(method, path, body=body, headers=headers or {})
        r = conn.getresponse()
        return r.status, r.read()
    finally:
        conn.close()


def heaviest() -> list[tuple[str, dict[str, str], dict[str, object]]]:
    """(path, headers, body) of the heaviest admissible requests."""
    by_label = {label: (path, body) for label, path, body, _ in cases()}
    _, run = by_label["acceleration run, largest, optimised"]
    return [
        ("/v1/reports/acceleration-run", {"Accept": "application/pdf"}, run),
        ("/v1/reports/acceleration-run", {"Accept": "text/html"}, run),
        ("/v1/acceleration-run", {}, run),
    ]


def saturate(port: int, seconds: float, clients: int) -> tuple[list[float], Counter[int], int]:
    """Load the worker and probe /healthz; (probe latencies [s], statuses, answered)."""
    stop = time.monotonic() + seconds
    statuses: Counter[int] = Counter()
    lock = threading.Lock()
    work = heaviest()

    def client(k: int) -> None:
        conn = http.client.HTTPConnection("127.0.0.1", port, timeout=60)
        i = 0
        while time.monotonic() < stop:
            path, headers, body = work[(k + i) % len(work)]
            data = json.dumps({**body, "reference": f"sat-{k}-{i}"}).encode()
            try:
                sent = {"Content-Type": "application/json", **headers}
                conn.request("POST", path, body=data, headers=sent)
                r = conn.getresponse()
                r.read()
                status = r.status
                if r.getheader("connection", "").lower() == "close":
                    conn.close()
            except OSError:
                status = 0
                conn.close()
            with lock:
                statuses[status] += 1
            if status == 503:
                time.sleep(0.2)
            i += 1
        conn.close()

    threads = [threading.Thread(target=client, args=(k,)) for k in range(clients)]
    for t in threads:
        t.start()
    time.sleep(min(2.0, seconds / 4))  # let the queue fill
    probes = []
    while time.monotonic() < stop:
        t0 = time.perf_counter()
        try:
            status, _ = request(port, "GET", "/healthz", timeout=30)
        except OSError:
            status = 0
        probes.append(time.perf_counter() - t0 if status == 200 else float("inf"))
        time.sleep(0.05)
    for t in threads:
        t.join()
    return probes, statuses, sum(statuses.values())


def main(argv: list[str] | None = None) -> None:
    """Serve at each slot count, saturate, print the probe figures."""
    parser = argparse.ArgumentParser(prog="python -m bench.saturation", description=__doc__)
    parser.add_argument("--seconds", type=float, default=20)
    parser.add_argument("--clients", type=int, default=12)
    parser.add_argument("--slots", default="0,1,2,4", help="comma-separated slot counts")
    parser.add_argument("--pin", default="true", help="GEARWORK_PIN_CPU values, comma-separated")
    args = parser.parse_args(argv)
    print(
        f"gearwork saturation: 1 worker, {args.clients} clients posting the heaviest "
        f"requests for {args.seconds:g} s; /healthz probed on a new connection every 50 ms"
    )
    print(
        f"{'slots':>5s} {'pin':>5s} {'probes':>7s} {'p50 ms':>8s} {'p99 ms':>8s} {'max ms':>8s} "
        f"{'calc/s':>7s}  statuses"
    )
    runs = [(int(s), p) for s in args.slots.split(",") for p in args.pin.split(",")]
    for slots, pin in runs:
        env = {
            "GEARWORK_PIN_CPU": pin,
            "GEARWORK_REQUEST_LOG": "false",
            "GEARWORK_CALC_SLOTS": str(slots),
            "GEARWORK_WAIT_BUDGET_S": "10",
        }
        with serve(1, env) as server:
            port = server.port
            for path, headers, body in heaviest():  # warm-up: imports, fonts, caches
                request(
                    port,
                    "POST",
                    path,
                    json.dumps(body).encode(),
                    {"Content-Type": "application/json", **headers},
                )
            probes, statuses, answered = saturate(port, args.seconds, args.clients)
        ms = np.array(probes) * 1e3
        print(
            f"{slots:5d} {pin:>5s} {len(ms):7d} {np.percentile(ms, 50):8.1f} "
            f"{np.percentile(ms, 99):8.1f} "
            f"{ms.max():8.1f} {answered / args.seconds:7.1f}  "
            + ", ".join(f"{k}: {v}" for k, v in sorted(statuses.items()))
        )


if __name__ == "__main__":
    main()
